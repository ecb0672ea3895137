package forecast

import (
	"math"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
	"github.com/plumb-sql/plumb/stats/unitroot"
)

// ARMASearch bounds ChooseARMA's search. The zero value means the defaults.
type ARMASearch struct {
	// MaxAR and MaxMA bound p and q (0 means DefaultMaxARMAOrder);
	// MaxSeasonalAR and MaxSeasonalMA bound P and Q (0 means
	// DefaultMaxSeasonalARMAOrder; seasonal terms only when Period ≥ 2).
	MaxAR, MaxMA, MaxSeasonalAR, MaxSeasonalMA int
	// Period is the seasonal period s of w (0 or 1: none).
	Period int
	// Differences is d + D, the differences behind w. It decides the mean:
	// with none, w's mean is estimated in every model; with one, models with
	// and without it (a drift in z) compete; with two or more there is none.
	Differences int
	// AR chooses the least-squares autoregression kept as a candidate
	// (FitAR; its Period defaults to Period).
	AR AROptions
	// MaxFits bounds the number of exact-likelihood fits (0 means
	// DefaultMaxARMAFits).
	MaxFits int
}

// Defaults of the search: p, q ≤ 3, P, Q ≤ 1, at most 30 fits and 1e7
// filter steps (about 5,000 evaluations of an ARMA(1,1) on 1,000 values,
// 2,500 of an airline model on 300);
// the screen's order (see ChooseARMA).
const (
	ShortAROrder                = 2
	DefaultARMAWork             = 10_000_000
	DefaultMaxARMAOrder         = 3
	DefaultMaxSeasonalARMAOrder = 1
	DefaultMaxARMAFits          = 30
)

// ARMAChoice is ChooseARMA's result.
type ARMAChoice struct {
	// Model is the chosen model (LeastSquares set when it is the
	// autoregression fitted by least squares).
	Model ARMAModel
	// LeastSquares is that autoregression as FitAR fitted it (its own
	// status even when it was not chosen).
	LeastSquares ARModel
	// Fits is the number of exact-likelihood fits the search made.
	Fits int
}

// ChooseARMA chooses and fits a model of the stationary series w by AICc
// (Hurvich & Tsai 1989), from the exact likelihood of every candidate on
// the same n values.
//
// The search is plumb's own stepwise design, small models first:
//
//  1. Start from (p, q) = (0, 0), (1, 0), (0, 1), (1, 1) with no seasonal
//     terms and, when s ≥ 2, (1, 0)(1, 0)_s and (0, 1)(0, 1)_s.
//  2. From the best model so far, fit every neighbour not yet fitted: p ± 1,
//     q ± 1, p and q together ± 1, P ± 1, Q ± 1, P and Q together ± 1, and,
//     after one difference, the same orders with the mean (drift) added or
//     removed. Move to the best neighbour if it lowers AICc; stop when none
//     does, when the best model has a first-order moving average within 0.03
//     of a unit root (nearUnitMA), after MaxFits fits or when the likelihood
//     evaluations have cost
//     DefaultARMAWork filter steps in all (an evaluation costs about n·r, r
//     the state's dimension; a fit stopped by the budget still competes
//     with what it reached).
//  3. Orders stay within the bounds, and a model is a candidate only when w
//     holds at least the lags it reaches plus its coefficients plus three
//     values (MinARMALength).
//  4. The autoregression chosen by FitAR (least squares, order by AIC up to
//     DefaultMaxAROrder, with a constant) is scored by the same exact
//     likelihood at its own coefficients (ARMAAt) and kept if its AICc is
//     lower still; a non-stationary least-squares fit is not a candidate.
//
// A screen comes first: when the least-squares autoregression needs at
// most ShortAROrder lags (by AIC, or by BIC (Schwarz 1978), which keeps
// fewer spurious lags on long series), moving-average terms have little to
// add, and the search is only that autoregression fitted by exact
// likelihood (each mean choice, started from the least-squares
// coefficients; the BIC one when only BIC screened it) and, when it has a
// lag at all, the (0, 1) and (1, 1) models (a short autoregression may
// stand for an MA(1)), against the AIC least-squares fit. Steps 1-2 run when it needs
// more, which is where an ARMA model is more parsimonious (an MA(1) with
// θ = -0.5 needs about five autoregressive lags; a seasonal pattern, about
// a period's worth).
//
// Each fit starts from its neighbour's estimates where they carry over
// (the neighbour's coefficients, a new one at zero), otherwise from white
// noise. The search's fits stop at a looser tolerance than FitARMA's (the
// log-likelihood within about 1e-6 of its maximum; FitARMA refits a chosen
// order exactly). When no model can be fitted, Model's status says why.
func ChooseARMA(w []float64, opts ARMASearch) (ARMAChoice, error) {
	if opts.MaxAR < 0 || opts.MaxMA < 0 || opts.MaxSeasonalAR < 0 || opts.MaxSeasonalMA < 0 || opts.MaxFits < 0 || opts.Differences < 0 {
		return ARMAChoice{}, numeric.Errorf("arma: search bounds must not be negative, got %+v", opts)
	}
	bound := func(v, def int) int {
		if v == 0 {
			return def
		}
		return v
	}
	maxP, maxQ := bound(opts.MaxAR, DefaultMaxARMAOrder), bound(opts.MaxMA, DefaultMaxARMAOrder)
	maxSP, maxSQ := bound(opts.MaxSeasonalAR, DefaultMaxSeasonalARMAOrder), bound(opts.MaxSeasonalMA, DefaultMaxSeasonalARMAOrder)
	s := opts.Period
	if s < 2 {
		s, maxSP, maxSQ = 0, 0, 0
	}
	maxFits := bound(opts.MaxFits, DefaultMaxARMAFits)
	arOpts := opts.AR
	if arOpts.Period == 0 {
		arOpts.Period = opts.Period
	}
	var out ARMAChoice
	ls, err := FitAR(w, arOpts)
	if err != nil {
		return ARMAChoice{}, err
	}
	out.LeastSquares = ls

	meanChoices := []bool{true}
	switch {
	case opts.Differences == 1:
		meanChoices = []bool{false, true}
	case opts.Differences >= 2:
		meanChoices = []bool{false}
	}
	admissible := func(o ARMAOrder) bool {
		return o.AR >= 0 && o.MA >= 0 && o.SeasonalAR >= 0 && o.SeasonalMA >= 0 &&
			o.AR <= maxP && o.MA <= maxQ && o.SeasonalAR <= maxSP && o.SeasonalMA <= maxSQ &&
			len(w) >= MinARMALength(o)
	}
	fitted := map[ARMAOrder]ARMAModel{}
	work := 0 // filter steps so far, evaluations times n·r
	var best *ARMAModel
	var firstFailure stats.Status
	try := func(o ARMAOrder, from *ARMAModel) {
		if _, done := fitted[o]; done || !admissible(o) || out.Fits >= maxFits {
			return
		}
		// An evaluation costs about n·r steps, r = max(p + sP, q + sQ + 1).
		cost := len(w) * max(o.AR+s*o.SeasonalAR, o.MA+s*o.SeasonalMA+1)
		left := (DefaultARMAWork - work) / cost
		if left < 1 {
			return
		}
		precision := looseFit
		precision.evals = min(precision.evals, left)
		evals := 0
		precision.used = &evals
		m, err2 := fitARMA(w, o, warmStart(from, o), precision)
		work += evals * cost
		if err2 != nil {
			err = err2
			return
		}
		out.Fits++
		fitted[o] = m
		if m.Status != stats.StatusOK {
			if firstFailure == "" {
				firstFailure = m.Status
			}
			return
		}
		if best == nil || m.AICc < best.AICc {
			mm := m
			best = &mm
		}
	}
	short := ls.Status == stats.StatusOK && ls.Order <= ShortAROrder
	shortModel := ls
	if ls.Status == stats.StatusOK && !short {
		// AIC often keeps a few spurious lags on a long series; the screen
		// asks BIC, which does not.
		bicOpts := arOpts
		bicOpts.Rule = unitroot.LagBIC
		if byBIC, err := FitAR(w, bicOpts); err == nil && byBIC.Status == stats.StatusOK && byBIC.Order <= ShortAROrder {
			short, shortModel = true, byBIC
		}
	}
	if short {
		// A short autoregression describes w: fit it by exact likelihood
		// from the least-squares coefficients, with each mean choice.
		from := ARMAModel{Order: ARMAOrder{AR: shortModel.Order}, AR: shortModel.Coefficients, Status: stats.StatusOK}
		for _, mean := range meanChoices {
			try(ARMAOrder{AR: shortModel.Order, Period: s, WithMean: mean}, &from)
			if shortModel.Order > 0 { // a short autoregression may stand for a moving average
				try(ARMAOrder{MA: 1, Period: s, WithMean: mean}, nil)
				try(ARMAOrder{AR: 1, MA: 1, Period: s, WithMean: mean}, nil)
			}
		}
	} else {
		starts := []ARMAOrder{{}, {AR: 1}, {MA: 1}, {AR: 1, MA: 1}}
		if s > 0 {
			starts = append(starts, ARMAOrder{AR: 1, SeasonalAR: 1}, ARMAOrder{MA: 1, SeasonalMA: 1})
		}
		for _, o := range starts {
			o.Period, o.WithMean = s, meanChoices[0]
			try(o, nil)
		}
	}
	if err != nil {
		return ARMAChoice{}, err
	}
	for best != nil && out.Fits < maxFits && !short && !nearUnitMA(*best) {
		current := *best
		o := current.Order
		var next []ARMAOrder
		for _, step := range [][4]int{
			{1, 0, 0, 0}, {-1, 0, 0, 0}, {0, 1, 0, 0}, {0, -1, 0, 0}, {1, 1, 0, 0}, {-1, -1, 0, 0},
			{0, 0, 1, 0}, {0, 0, -1, 0}, {0, 0, 0, 1}, {0, 0, 0, -1}, {0, 0, 1, 1}, {0, 0, -1, -1},
		} {
			next = append(next, ARMAOrder{AR: o.AR + step[0], MA: o.MA + step[1], SeasonalAR: o.SeasonalAR + step[2],
				SeasonalMA: o.SeasonalMA + step[3], Period: s, WithMean: o.WithMean})
		}
		if len(meanChoices) == 2 {
			toggled := o
			toggled.WithMean = !o.WithMean
			next = append(next, toggled)
		}
		for _, n := range next {
			try(n, &current)
		}
		if err != nil {
			return ARMAChoice{}, err
		}
		if best.AICc >= current.AICc {
			break
		}
	}
	if best != nil {
		// The winner's residuals (the loose fits leave them out).
		m, st := armaModelAt(w, best.Order, best.AR, best.MA, best.SeasonalAR, best.SeasonalMA, best.Mean, true)
		if st != stats.StatusOK {
			return ARMAChoice{}, numeric.Errorf("arma: the chosen model %+v could not be evaluated again", best.Order)
		}
		best = &m
	}
	if ls.Status == stats.StatusOK && ls.Order > 0 {
		o := ARMAOrder{AR: ls.Order, WithMean: true}
		mean := ls.Constant / polynomialAtOne(ls.Coefficients)
		if m, err := ARMAAt(w, o, ls.Coefficients, nil, nil, nil, mean); err == nil && m.Status == stats.StatusOK {
			if best == nil || m.AICc < best.AICc {
				m.LeastSquares = true
				best = &m
			}
		}
	}
	if best == nil {
		st := firstFailure
		if ls.Status != stats.StatusOK {
			st = ls.Status
		}
		if st == "" {
			st = stats.StatusTooShort
		}
		out.Model = failedARMA(st, ARMAOrder{})
		return out, nil
	}
	out.Model = *best
	return out, nil
}

// nearUnitMA reports whether the model's first-order moving average, plain
// or seasonal, is within 0.03 of a unit root (|θ_1| or |Θ_1| > 0.97 with
// q = 1 or Q = 1): the sign that w was differenced once too often. The
// stepwise search stops there; its neighbours crawl to the same boundary
// at a high cost and cannot undo the difference.
func nearUnitMA(m ARMAModel) bool {
	return (len(m.MA) == 1 && math.Abs(m.MA[0]) > 0.97) || (len(m.SeasonalMA) == 1 && math.Abs(m.SeasonalMA[0]) > 0.97)
}

// warmStart returns the fitted neighbour's coefficients reshaped to order
// o (carried over, new ones zero, dropped ones cut; the mean is
// concentrated out, so it needs no start), or nil when
// there is no neighbour or the reshaped polynomials leave the stationary or
// invertible region (FitARMA then starts from white noise).
func warmStart(from *ARMAModel, o ARMAOrder) *ARMAModel {
	if from == nil || from.Status != stats.StatusOK {
		return nil
	}
	resize := func(c []float64, n int) []float64 {
		out := make([]float64, n)
		copy(out, c)
		return out
	}
	m := ARMAModel{Order: o, Status: stats.StatusOK,
		AR: resize(from.AR, o.AR), MA: resize(from.MA, o.MA),
		SeasonalAR: resize(from.SeasonalAR, o.SeasonalAR), SeasonalMA: resize(from.SeasonalMA, o.SeasonalMA)}
	return &m
}
