package stats

import "math"

// Recipe is a transform that makes a series stationary, with what is needed
// to undo it: an optional Box-Cox transform, then SeasonalDifferences
// differences at lag Period, then Differences plain differences:
//
//	y = (1 - B)^d (1 - B^s)^D g_λ(x).
//
// Apply fills Head and Tail; Restore and RestoreForecast use them.
type Recipe struct {
	// BoxCox says whether to apply the Box-Cox transform with Lambda.
	BoxCox bool
	Lambda float64
	// Period is the seasonal lag s; SeasonalDifferences is D (0 or more).
	Period              int
	SeasonalDifferences int
	// Differences is d, the number of plain differences.
	Differences int
	// Head holds, for each differencing pass in the order applied, the
	// first lag values of the series that pass differenced: the anchors that
	// restore the transformed series itself. Tail holds the last lag values
	// of each, the anchors that continue it into forecasts.
	Head, Tail [][]float64
}

// lags returns the lag of each differencing pass in the order applied.
func (r *Recipe) lags() []int {
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
		return errorf("recipe: difference counts must not be negative")
	}
	if r.SeasonalDifferences > 0 && r.Period < 2 {
		return errorf("recipe: seasonal differencing needs a period of at least 2, got %d", r.Period)
	}
	if r.BoxCox && (math.IsNaN(r.Lambda) || math.IsInf(r.Lambda, 0)) {
		return errorf("recipe: the Box-Cox lambda must be finite")
	}
	return nil
}

// Apply transforms x, recording the anchors in r. The result is Lost()
// values shorter than x. Status too_short when nothing would be left;
// non_positive when Box-Cox meets a value ≤ 0; non_finite for NaN or ±Inf.
func (r *Recipe) Apply(x []float64) ([]float64, Status, error) {
	if err := r.check(); err != nil {
		return nil, "", err
	}
	if s := checkFinite(x); s != StatusOK {
		return nil, s, nil
	}
	if len(x) <= r.Lost() {
		return nil, StatusTooShort, nil
	}
	y := append([]float64(nil), x...)
	if r.BoxCox {
		var s Status
		if y, s = BoxCox(y, r.Lambda); s != StatusOK {
			return nil, s, nil
		}
	}
	r.Head, r.Tail = nil, nil
	for _, lag := range r.lags() {
		r.Head = append(r.Head, append([]float64(nil), y[:lag]...))
		r.Tail = append(r.Tail, append([]float64(nil), y[len(y)-lag:]...))
		y, _ = Difference(y, lag, 1)
	}
	return y, StatusOK, nil
}

// Restore undoes Apply on the transformed series y (which must have the
// length Apply returned), giving back the original series.
func (r *Recipe) Restore(y []float64) ([]float64, Status, error) {
	return r.undo(y, r.Head, true)
}

// RestoreForecast turns values f on the transformed scale that continue the
// series after its last observation (forecasts) into original units,
// anchored on the series' last observations at every differencing level.
// Status non_positive when a value falls outside the Box-Cox range (it
// becomes NaN).
func (r *Recipe) RestoreForecast(f []float64) ([]float64, Status, error) {
	return r.undo(f, r.Tail, false)
}

func (r *Recipe) undo(y []float64, anchors [][]float64, prepend bool) ([]float64, Status, error) {
	if err := r.check(); err != nil {
		return nil, "", err
	}
	lags := r.lags()
	if len(anchors) != len(lags) {
		return nil, "", errorf("recipe: %d anchor sets for %d differencing passes: apply the recipe first", len(anchors), len(lags))
	}
	out := append([]float64(nil), y...)
	for i := len(lags) - 1; i >= 0; i-- {
		restored, err := Undifference(out, anchors[i], lags[i])
		if err != nil {
			return nil, "", err
		}
		if prepend {
			out = append(append([]float64(nil), anchors[i]...), restored...)
		} else {
			out = restored
		}
	}
	if r.BoxCox {
		var s Status
		out, s = InverseBoxCox(out, r.Lambda)
		if s != StatusOK {
			return out, s, nil
		}
	}
	return out, StatusOK, nil
}
