package verdict

import (
	"math"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// Recipe is a transform that makes a series stationary, with what is needed
// to undo it. Its steps, in the order applied:
//
//  1. a Box-Cox transform g_λ (when BoxCox);
//
//  2. deterministic parts subtracted: a fixed seasonal pattern
//     (SeasonalMeans), a straight line (Trend) and a level shift (Shift),
//     each a known function of the position t (0 at the first observation);
//
//  3. D seasonal differences at lag Period, then d plain differences:
//
//     y_t = (1 - B)^d (1 - B^s)^D [g_λ(x_t) - m_t],
//     m_t = S[t mod s] + (a + b·t) + δ·1[t ≥ τ].
//
// Every step is exactly invertible: Apply records the anchors of the
// differencing (Head, Tail) and the series length; Restore and
// RestoreForecast undo the steps in reverse order, adding m_t back at each
// value's own position, so that a restored forecast continues the trend,
// keeps the shifted level and repeats the seasonal pattern.
type Recipe struct {
	// BoxCox says whether to apply the Box-Cox transform with Lambda.
	BoxCox bool
	Lambda float64
	// Period is the seasonal period s used by SeasonalMeans and by the
	// seasonal differences.
	Period int
	// SeasonalMeans, when not nil, holds Period effects (summing to zero)
	// of a fixed seasonal pattern: SeasonalMeans[t mod Period] is
	// subtracted at position t.
	SeasonalMeans []float64
	// SeasonalDifferences is D (0 or more).
	SeasonalDifferences int
	// Trend, when set, subtracts TrendIntercept + TrendSlope·t.
	Trend                      bool
	TrendIntercept, TrendSlope float64
	// Shift, when set, subtracts ShiftSize from position ShiftIndex on.
	Shift      bool
	ShiftIndex int
	ShiftSize  float64
	// Differences is d, the number of plain differences.
	Differences int
	// Head holds, for each differencing pass in the order applied, the
	// first lag values of the series that pass differenced: the anchors that
	// restore the transformed series itself. Tail holds the last lag values
	// of each, the anchors that continue it into forecasts.
	Head, Tail [][]float64
	// Length is the number of observations the recipe was applied to; a
	// forecast's first value sits at position Length.
	Length int
}

// Identity reports whether the recipe changes nothing.
func (r *Recipe) Identity() bool {
	return !r.BoxCox && r.SeasonalMeans == nil && r.SeasonalDifferences == 0 &&
		!r.Trend && !r.Shift && r.Differences == 0
}

// Lags returns the lag of each differencing pass in the order applied:
// D times Period, then d times 1 (the anchors Head and Tail hold one set of
// values per pass, each its lag long).
func (r *Recipe) Lags() []int {
	var out []int
	for i := 0; i < r.SeasonalDifferences; i++ {
		out = append(out, r.Period)
	}
	for i := 0; i < r.Differences; i++ {
		out = append(out, 1)
	}
	return out
}

// Lost is the number of observations the differencing consumes.
func (r *Recipe) Lost() int {
	return r.SeasonalDifferences*r.Period + r.Differences
}

// check validates the recipe's shape.
func (r *Recipe) check() error {
	if r.SeasonalDifferences < 0 || r.Differences < 0 {
		return numeric.Errorf("recipe: difference counts must not be negative")
	}
	if (r.SeasonalDifferences > 0 || r.SeasonalMeans != nil) && r.Period < 2 {
		return numeric.Errorf("recipe: a seasonal step needs a period of at least 2, got %d", r.Period)
	}
	if r.SeasonalMeans != nil && len(r.SeasonalMeans) != r.Period {
		return numeric.Errorf("recipe: %d seasonal means for period %d", len(r.SeasonalMeans), r.Period)
	}
	if r.BoxCox && !finite(r.Lambda) {
		return numeric.Errorf("recipe: the Box-Cox lambda must be finite")
	}
	for _, v := range r.SeasonalMeans {
		if !finite(v) {
			return numeric.Errorf("recipe: the seasonal means must be finite")
		}
	}
	if r.Trend && !(finite(r.TrendIntercept) && finite(r.TrendSlope)) {
		return numeric.Errorf("recipe: the trend's intercept and slope must be finite")
	}
	if r.Shift && (!finite(r.ShiftSize) || r.ShiftIndex < 0) {
		return numeric.Errorf("recipe: the level shift needs a finite size and a position of at least 0")
	}
	return nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// Deterministic returns m_t, the deterministic part the recipe subtracts,
// at position t (0 at the first observation).
func (r *Recipe) Deterministic(t int) float64 {
	m := 0.0
	if r.SeasonalMeans != nil {
		j := t % r.Period
		if j < 0 {
			j += r.Period
		}
		m += r.SeasonalMeans[j]
	}
	if r.Trend {
		m += r.TrendIntercept + r.TrendSlope*float64(t)
	}
	if r.Shift && t >= r.ShiftIndex {
		m += r.ShiftSize
	}
	return m
}

// HasDeterministic reports whether the recipe subtracts anything.
func (r *Recipe) HasDeterministic() bool {
	return r.SeasonalMeans != nil || r.Trend || r.Shift
}

// Apply transforms x, recording the anchors and the length in r. The
// result is Lost() values shorter than x. Status too_short when nothing
// would be left; non_positive when Box-Cox meets a value ≤ 0; non_finite
// for NaN or ±Inf.
func (r *Recipe) Apply(x []float64) ([]float64, stats.Status, error) {
	y, s, err := r.Level(x)
	if err != nil || s != stats.StatusOK {
		return nil, s, err
	}
	r.Head, r.Tail = nil, nil
	for _, lag := range r.Lags() {
		r.Head = append(r.Head, append([]float64(nil), y[:lag]...))
		r.Tail = append(r.Tail, append([]float64(nil), y[len(y)-lag:]...))
		y, _ = stats.Difference(y, lag, 1)
	}
	return y, stats.StatusOK, nil
}

// Level applies the recipe's steps before differencing (Box-Cox and the
// deterministic parts) to x and records its length: the series whose
// differences Apply returns, the scale on which forecast errors accumulate
// through the differencing. It returns a new slice.
func (r *Recipe) Level(x []float64) ([]float64, stats.Status, error) {
	if err := r.check(); err != nil {
		return nil, "", err
	}
	if s := stats.CheckFinite(x); s != stats.StatusOK {
		return nil, s, nil
	}
	if len(x) <= r.Lost() {
		return nil, stats.StatusTooShort, nil
	}
	if r.Shift && r.ShiftIndex > len(x) {
		return nil, "", numeric.Errorf("recipe: the level shift at position %d lies beyond the series' %d values", r.ShiftIndex, len(x))
	}
	y := append([]float64(nil), x...)
	if r.BoxCox {
		var s stats.Status
		if y, s = stats.BoxCox(y, r.Lambda); s != stats.StatusOK {
			return nil, s, nil
		}
	}
	if r.HasDeterministic() {
		for t := range y {
			y[t] -= r.Deterministic(t)
		}
	}
	r.Length = len(x)
	return y, stats.StatusOK, nil
}

// Restore undoes Apply on the transformed series y (which must have the
// length Apply returned), giving back the original series.
func (r *Recipe) Restore(y []float64) ([]float64, stats.Status, error) {
	return r.undo(y, r.Head, true, 0)
}

// RestoreForecast turns values f on the transformed scale that continue the
// series after its last observation (forecasts, at positions Length,
// Length+1, ...) into original units, anchored on the series' last
// observations at every differencing level. Status non_positive when a
// value falls outside the Box-Cox range (it becomes NaN).
func (r *Recipe) RestoreForecast(f []float64) ([]float64, stats.Status, error) {
	return r.undo(f, r.Tail, false, r.Length)
}

// Finish adds the deterministic part back to values z on the Level scale
// at positions start, start+1, ... and undoes the Box-Cox transform: the
// last steps of RestoreForecast, for forecasts and their interval bounds
// alike (the Box-Cox transform is monotone, so it maps quantiles to
// quantiles). Values outside the Box-Cox range become NaN with status
// non_positive.
func (r *Recipe) Finish(z []float64, start int) ([]float64, stats.Status) {
	out := append([]float64(nil), z...)
	if r.HasDeterministic() {
		for i := range out {
			out[i] += r.Deterministic(start + i)
		}
	}
	if r.BoxCox {
		return stats.InverseBoxCox(out, r.Lambda)
	}
	return out, stats.StatusOK
}

func (r *Recipe) integrate(y []float64, anchors [][]float64, prepend bool) ([]float64, error) {
	lags := r.Lags()
	if len(anchors) != len(lags) {
		return nil, numeric.Errorf("recipe: %d anchor sets for %d differencing passes: apply the recipe first", len(anchors), len(lags))
	}
	out := append([]float64(nil), y...)
	for i := len(lags) - 1; i >= 0; i-- {
		restored, err := stats.Undifference(out, anchors[i], lags[i])
		if err != nil {
			return nil, err
		}
		if prepend {
			out = append(append([]float64(nil), anchors[i]...), restored...)
		} else {
			out = restored
		}
	}
	return out, nil
}

func (r *Recipe) undo(y []float64, anchors [][]float64, prepend bool, start int) ([]float64, stats.Status, error) {
	if err := r.check(); err != nil {
		return nil, "", err
	}
	out, err := r.integrate(y, anchors, prepend)
	if err != nil {
		return nil, "", err
	}
	out, s := r.Finish(out, start)
	return out, s, nil
}
