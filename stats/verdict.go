package stats

import (
	"math"
	"strings"
)

// StationarityOptions configure Stationarity.
type StationarityOptions struct {
	// Period is the seasonal period; 0 means detect it (see Seasonality).
	Period     int
	Candidates []int
	// Alpha is the level for the whole verdict; 0 means 0.05.
	Alpha float64
	// Segments for the stability checks; 0 means automatic.
	Segments int
}

// Violation names a broken condition of stationarity.
type Violation string

const (
	ViolationMean     Violation = "mean"
	ViolationSpread   Violation = "spread"
	ViolationSeasonal Violation = "seasonal"
)

// StationarityResult is the verdict on one series.
type StationarityResult struct {
	// The three conditions and their conjunction.
	MeanStable, SpreadStable, Seasonal, Stationary bool
	Violations                                     []Violation
	// The recommended recipe: D seasonal differences at Period, then d
	// plain differences, after a Box-Cox transform with BoxCoxLambda when
	// it is not NaN.
	SeasonalDifferences, Differences int
	BoxCoxLambda                     float64
	Period                           int
	// Score ranks series by how far they are from stationary (see
	// Stationarity); 0 for a series with no evidence against.
	Score float64
	// The tests behind the verdict. ADF and KPSS are the first step of the
	// differencing sequence: on the original series, or, for a seasonal
	// series, on its seasonal differences (the tests that chose d; on the
	// levels a seasonal pattern would mislead both). Stability holds the
	// segment tests on the original series only (its ARCH, trend and
	// Mann-Kendall fields are NaN; call Stability for those).
	ADF, KPSS   UnitRootResult
	Stability   StabilityResult
	Seasonality SeasonalityResult
	// SpreadPValue is the spread test after the recommended differencing.
	SpreadPValue float64
	// Differenced is the series after the recommended seasonal and plain
	// differences, without the Box-Cox transform (so Recipe().Apply gives
	// the same values when BoxCoxLambda is NaN). It may be the input itself.
	Differenced []float64
	Status      Status
}

// Recipe returns the recommended transform as a Recipe.
func (r StationarityResult) Recipe() Recipe {
	rec := Recipe{Period: r.Period, SeasonalDifferences: r.SeasonalDifferences, Differences: r.Differences}
	if !math.IsNaN(r.BoxCoxLambda) {
		rec.BoxCox, rec.Lambda = true, r.BoxCoxLambda
	}
	return rec
}

// ViolationList returns the violations joined by commas ("" when stationary).
func (r StationarityResult) ViolationList() string {
	parts := make([]string, len(r.Violations))
	for i, v := range r.Violations {
		parts[i] = string(v)
	}
	return strings.Join(parts, ",")
}

// Stationarity judges the three conditions of stationarity for x and
// recommends a transform:
//
//  1. Seasonality: the period (given or detected) and the STL seasonal
//     strength. The series is seasonal, and gets D = 1 seasonal difference,
//     when the strength is at least SeasonalStrengthThreshold, or when it is
//     at least ModerateSeasonalStrength and the OCSB test (Osborn et al.
//  1988. does not reject a seasonal unit root at 5%: a stochastic
//     seasonal pattern that only seasonal differencing removes.
//  2. Differences d (0 to 2) on the seasonally differenced series, by a
//     sequence of KPSS tests (level, automatic bandwidth) cross-checked with
//     ADF (constant, AIC); see needsDifference.
//  3. Mean stable: d = 0 and the segment-means test (Stability) does not
//     reject.
//  4. Spread stable: the segment-spread test does not reject on the series
//     after the recommended differencing (so that a wandering mean does not
//     pass for a changing spread).
//  5. Box-Cox λ (Guerrero 1993), recommended when the data are positive,
//     the spread is unstable on the original series, and the segment
//     standard deviations rise with the segment means (correlation > 0.5):
//     the spread grows with the level. NaN otherwise.
//
// The segment tests of means and spreads run at α/4 each (Bonferroni over
// the tests of one series); with ADF's firm rejection at α/4 needed to keep
// a series undifferenced, a stationary series is flagged on anything with a
// probability of about α (measured on the demo: see the test in
// cmd/internal/demodata).
//
// The score adds the evidence against each condition:
//
//	score = min(10, -log10 p_mean) + min(10, -log10 p_spread) + 10·F_s·[seasonal],
//
// with p_mean the smaller of the segment-means p-value and the KPSS p-value
// of the differencing sequence's first step (after the seasonal
// differences, so that a seasonal pattern counts once, through F_s), p_spread the spread test after the recommended
// differencing (SpreadPValue), and F_s the seasonal strength. It runs from 0
// to 30.
func Stationarity(x []float64, opts StationarityOptions) (StationarityResult, error) {
	alpha := opts.Alpha
	if alpha == 0 {
		alpha = 0.05
	}
	if !(alpha > 0 && alpha < 1) {
		return StationarityResult{}, errorf("stationarity: alpha must be between 0 and 1, got %v", opts.Alpha)
	}
	r := StationarityResult{BoxCoxLambda: math.NaN(), SpreadPValue: math.NaN()}
	season, err := Seasonality(x, SeasonalityOptions{Period: opts.Period, Candidates: opts.Candidates, skipOCSBWhenSeasonal: true})
	if err != nil {
		return r, err
	}
	r.Seasonality = season
	if season.Status != StatusOK && season.Status != StatusSeasonUnknown {
		r.Status = season.Status
		return r, nil
	}
	if len(x) < 16 {
		r.Status = StatusTooShort
		return r, nil
	}
	each := alpha / 4
	r.Period = season.Period
	y := x
	stochastic := season.OCSB.Status == StatusOK && season.OCSB.SeasonalUnitRoot
	if season.Seasonal || stochastic {
		r.Seasonal = true
		r.SeasonalDifferences = 1
		y, _ = Difference(x, season.Period, 1)
	}
	stabilityPeriod := 0
	if season.Status == StatusOK {
		stabilityPeriod = season.Period
	}
	for r.Differences < 2 {
		adf, err := ADF(y, ADFOptions{})
		if err != nil {
			return r, err
		}
		// KPSS is reported for the first step; after that it is computed
		// only when it decides (ADF's p-value between α/4 and α).
		kpss := UnitRootResult{Status: StatusOK, PValue: math.NaN()}
		if r.Differences == 0 || (adf.PValue >= alpha/4 && adf.PValue < alpha) {
			if kpss, err = KPSS(y, KPSSOptions{}); err != nil {
				return r, err
			}
		}
		if r.Differences == 0 {
			r.ADF, r.KPSS = adf, kpss
		}
		if adf.Status != StatusOK || kpss.Status != StatusOK {
			break
		}
		if !needsDifference(kpss.PValue, adf.PValue, alpha) {
			break
		}
		y, _ = Difference(y, 1, 1)
		r.Differences++
	}
	r.Stability, err = stability(x, StabilityOptions{Segments: opts.Segments, Period: stabilityPeriod}, false)
	if err != nil {
		return r, err
	}
	if r.Stability.Status != StatusOK {
		r.Status = r.Stability.Status
		return r, nil
	}
	r.MeanStable = r.Differences == 0 && !(r.Stability.MeanPValue < each)
	r.SpreadPValue = r.Stability.SpreadPValue
	if r.Differences > 0 || r.SeasonalDifferences > 0 {
		r.SpreadPValue = spreadPValue(y, opts.Segments)
	}
	r.SpreadStable = !(r.SpreadPValue < each)
	r.Differenced = y
	if !(r.Stability.SpreadPValue >= each) && r.Stability.MeanSpreadCorrelation > 0.5 {
		if lambda, s := GuerreroLambda(x, stabilityPeriod); s == StatusOK {
			r.BoxCoxLambda = lambda
		}
	}
	if !r.MeanStable {
		r.Violations = append(r.Violations, ViolationMean)
	}
	if !r.SpreadStable {
		r.Violations = append(r.Violations, ViolationSpread)
	}
	if r.Seasonal {
		r.Violations = append(r.Violations, ViolationSeasonal)
	}
	r.Stationary = len(r.Violations) == 0
	pMean := r.Stability.MeanPValue
	if r.KPSS.Status == StatusOK {
		pMean = math.Min(pMean, r.KPSS.PValue)
	}
	r.Score = evidence(pMean) + evidence(r.SpreadPValue)
	if r.Seasonal {
		r.Score += 10 * season.SeasonalStrength
	}
	if r.Seasonality.Status == StatusSeasonUnknown {
		r.Status = StatusSeasonUnknown
	} else {
		r.Status = StatusOK
	}
	return r, nil
}

// evidence is -log10 p capped at 10; NaN counts as no evidence.
func evidence(p float64) float64 {
	if math.IsNaN(p) {
		return 0
	}
	return math.Min(10, -math.Log10(math.Max(p, 1e-300)))
}

// needsDifference decides one step of the differencing sequence from the
// KPSS p-value (null: stationary) and the ADF p-value (null: unit root) at
// level alpha:
//
//   - ADF fails to reject a unit root at alpha: difference.
//   - ADF rejects it firmly, at alpha/4: do not, even if KPSS rejects
//     stationarity; KPSS is known to over-reject persistent stationary
//     series and series with a break, while a firm ADF rejection is direct
//     evidence against a unit root (the segment-means test still reports a
//     moving mean).
//   - In between, the KPSS test at alpha decides.
func needsDifference(kpssP, adfP, alpha float64) bool {
	switch {
	case !(adfP < alpha):
		return true
	case adfP < alpha/4:
		return false
	default:
		return kpssP < alpha
	}
}
