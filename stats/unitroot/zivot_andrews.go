package unitroot

import (
	"fmt"
	"math"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/defaults"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// BreakKind names what the Zivot-Andrews test lets break once.
type BreakKind string

const (
	// BreakLevel lets the level shift once (Zivot & Andrews' model A; the default).
	BreakLevel BreakKind = "level"
	// BreakSlope lets the slope of the trend change once (model B).
	BreakSlope BreakKind = "slope"
	// BreakLevelAndSlope lets the level and the slope change at the same date (model C).
	BreakLevelAndSlope BreakKind = "level_and_slope"
)

// normalize returns the default for the zero value and checks the rest.
func (k BreakKind) normalize() (BreakKind, error) {
	switch k {
	case "":
		return BreakLevel, nil
	case BreakLevel, BreakSlope, BreakLevelAndSlope:
		return k, nil
	}
	return "", fmt.Errorf("stats: unknown break %q: use level, slope or level_and_slope", string(k))
}

// dummies is the number of break columns the kind adds to the regression.
func (k BreakKind) dummies() int {
	if k == BreakLevelAndSlope {
		return 2
	}
	return 1
}

// CheckBreakTrim accepts a trimming fraction in the range plumb's p-value
// table covers, [0.05, 0.30].
func CheckBreakTrim(trim float64) error {
	if !(trim >= minBreakTrim && trim <= maxBreakTrim) {
		return fmt.Errorf("trimming must lie in [%.2f, %.2f], got %v", minBreakTrim, maxBreakTrim, trim)
	}
	return nil
}

// Trimming limits: the p-value table covers these fractions.
const (
	DefaultBreakTrim = defaults.Trimming
	minBreakTrim     = 0.05
	maxBreakTrim     = 0.30
)

// ZivotAndrewsOptions configure the Zivot-Andrews test. The zero value lets
// the level break, trims 15% at each end and chooses the lag by AIC up
// to Schwert's maximum.
type ZivotAndrewsOptions struct {
	// Break is what may break: level (default), slope or level_and_slope.
	Break BreakKind
	// Trim is the fraction of the series at each end where no break is
	// sought: 0 means 0.15; otherwise it must lie in [0.05, 0.30], the
	// range plumb's p-value table covers. With s = floor(Trim·T), the
	// candidate values of BreakIndex are s+1 .. T-s for a break in the
	// intercept or in both, and s .. T-s-1 for a break in the trend (the
	// candidate dates python3-statsmodels 0.13.5 searches; the trend break's
	// index counts from the first observation whose trend term is non-zero,
	// see ZivotAndrewsResult.BreakIndex). Dates at which the break column
	// would be constant or linear over the regression sample (BreakIndex ≤
	// Lags+1) are skipped.
	Trim float64
	// MaxLag is the largest number of lagged differences tried, or the
	// number used under LagGiven. Nil means SchwertMaxLag(len(x)), capped as
	// for ADF with a trend (len(x)/2 - 3, and two residual degrees of
	// freedom in the widest lag search).
	MaxLag *int
	// LagRule chooses the number of lagged differences: aic (default), bic,
	// drop_insignificant or given. The lag is chosen once, by ADF's rule on
	// the regression with a constant and a trend and no break (ADF with
	// DeterministicLevelAndSlope and the same MaxLag, on its common sample), and
	// then used at every break date; this is Baum's (2004) shortcut, which
	// python3-statsmodels 0.13.5 follows, rather than Zivot & Andrews'
	// search at every date. It makes the test one pass over the series
	// after the lag search (see breakScan).
	LagRule LagRule
}

// ZivotAndrewsResult is the outcome of a Zivot-Andrews test.
type ZivotAndrewsResult struct {
	Break BreakKind // what was allowed to break
	Trim  float64   // the trimming fraction used
	// Statistic is the smallest t-statistic of the lagged level over the
	// candidate break dates.
	Statistic   float64
	PValue      float64
	PValueBound PValueBound
	// CriticalValues at 1%, 5% and 10%: Zivot & Andrews (1992), Tables 2, 3
	// and 4 (asymptotic, λ in [0.15, 0.85]) at the default trimming;
	// plumb's own Monte Carlo quantiles for Observations observations
	// (zivot_andrews_table.go) at any other.
	CriticalValues [3]float64
	// BreakIndex is the 0-based index in x of the first observation after
	// the break at the minimising date: the first with the shifted
	// intercept (DU_t = 1 for t ≥ BreakIndex) and, for a trend break, the
	// first whose trend-change term is non-zero (DT_t = t - BreakIndex + 1
	// for t ≥ BreakIndex, so the new slope runs from observation
	// BreakIndex-1 on). x[BreakIndex-1] is the last observation before the
	// break. python3-statsmodels 0.13.5's zivot_andrews reports the same
	// date as BreakIndex-1 for the intercept and both, and as BreakIndex for
	// the trend. -1 when Status is not ok.
	BreakIndex int
	// Lags is the number of lagged differences in every break regression.
	Lags int
	// Observations is the number of observations in each break regression,
	// len(x) - 1 - Lags.
	Observations int
	Status       stats.Status
}

// ZivotAndrews performs the Zivot & Andrews (1992) test of the null
// hypothesis that x has a unit root (without a break) against the
// alternative of a trend-stationary series with one break at an unknown
// date. For every candidate date it fits, by least squares,
//
//	Δy_t = μ + β·t + θ·DU_t + γ·DT_t + α·y_{t-1} + Σ_{j=1..k} c_j·Δy_{t-j} + e_t
//
// on t = k+1 .. T-1 (0-based), with DU_t = 1 for t ≥ b (intercept, both) and
// DT_t = t - b + 1 for t ≥ b (trend, both), zero before; b is the date's
// BreakIndex. The statistic is the smallest t-statistic of α over the dates
// (ZA 1992, eq. 4-6; the regression in first differences is their regression
// in levels with α = their α - 1). The lag k is chosen once (see
// ZivotAndrewsOptions.LagRule).
//
// The p-value is interpolated in plumb's own Monte Carlo table of the
// statistic's null distribution at the regression's number of observations
// (testdata/zivot_andrews/simulate.go, lengths 50 to 3,200); PValueBound
// says when the statistic lies beyond the table's 0.1% or 99.9% point.
//
// Statuses: non_finite for NaN or ±Inf anywhere; constant for a constant
// series; too_short when the lags leave no candidate date or fewer than two
// residual degrees of freedom; singular when a regression fits exactly or
// its fixed columns are dependent.
func ZivotAndrews(x []float64, opts ZivotAndrewsOptions) (ZivotAndrewsResult, error) {
	kind, err := opts.Break.normalize()
	if err != nil {
		return ZivotAndrewsResult{}, err
	}
	rule, err := opts.LagRule.Normalize()
	if err != nil {
		return ZivotAndrewsResult{}, err
	}
	trim := opts.Trim
	if trim == 0 {
		trim = DefaultBreakTrim
	}
	if err := CheckBreakTrim(trim); err != nil {
		return ZivotAndrewsResult{}, err
	}
	if opts.MaxLag != nil && *opts.MaxLag < 0 {
		return ZivotAndrewsResult{}, fmt.Errorf("stats: zivot-andrews: the maximum lag must not be negative, got %d", *opts.MaxLag)
	}
	fail := func(s stats.Status) (ZivotAndrewsResult, error) {
		nan := numeric.NaN()
		return ZivotAndrewsResult{
			Break: kind, Trim: trim, Status: s, BreakIndex: -1,
			Statistic: nan, PValue: nan, CriticalValues: [3]float64{nan, nan, nan},
		}, nil
	}
	if s := stats.CheckFinite(x); s != stats.StatusOK {
		return fail(s)
	}
	T := len(x)
	if T >= 2 && numeric.IsConstant(x) {
		return fail(stats.StatusConstant)
	}
	// The lag search is ADF's with a trend (two deterministic terms).
	limit := T/2 - 3
	maxLag := min(SchwertMaxLag(T), limit, (T-6)/2)
	if opts.MaxLag != nil {
		maxLag = *opts.MaxLag
	}
	if maxLag < 0 || maxLag > limit || T-1-maxLag < 3+maxLag+2 {
		return fail(stats.StatusTooShort)
	}
	a := newADFDesign(x, DeterministicLevelAndSlope)
	defer a.release()
	lags := maxLag
	if rule != LagGiven {
		if lags, err = a.chooseLag(maxLag, rule); err != nil {
			return fail(stats.StatusSingular)
		}
	}
	lo, hi := breakRange(kind, T, trim)
	lo = max(lo, lags+2)
	n := T - 1 - lags
	if lo > hi || n-(3+lags+kind.dummies()) < 2 {
		return fail(stats.StatusTooShort)
	}
	path := numeric.GetScratch(hi - lo + 1)
	defer numeric.PutScratch(path)
	if s := breakScan(a, lags, kind, lo, path); s != stats.StatusOK {
		return fail(s)
	}
	best, at := math.Inf(1), -1
	for i, t := range path {
		if t < best { // NaN (a skipped date) never compares less
			best, at = t, lo+i
		}
	}
	if at < 0 {
		return fail(stats.StatusSingular)
	}
	p, bound := zivotAndrewsP(best, kind, trim, n)
	return ZivotAndrewsResult{
		Break: kind, Trim: trim, Status: stats.StatusOK,
		Statistic: best, PValue: p, PValueBound: bound,
		CriticalValues: zivotAndrewsCritical(kind, trim, n),
		BreakIndex:     at, Lags: lags, Observations: n,
	}, nil
}

// breakRange returns the first and last candidate BreakIndex for a series
// of length T: with s = floor(trim·T), s+1 .. T-s for a break in the
// intercept or both and s .. T-s-1 for a break in the trend.
func breakRange(kind BreakKind, T int, trim float64) (int, int) {
	s := int(trim * float64(T))
	if kind == BreakSlope {
		return s, T - s - 1
	}
	return s + 1, T - s
}
