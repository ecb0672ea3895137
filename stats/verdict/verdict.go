package verdict

import (
	"math"
	"strings"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/defaults"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
	"github.com/plumb-sql/plumb/stats/unitroot"
)

// StationarityOptions configure Stationarity.
type StationarityOptions struct {
	// Period is the seasonal period; 0 means detect it (see Seasonality)
	// and 1 declares the series non-seasonal: no period is detected,
	// seasonality is not judged and the status stays ok.
	Period     int
	Candidates []int
	// Alpha is the level for the whole verdict; 0 means defaults.Alpha.
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

// MeanCause says why the mean of a series moves.
type MeanCause string

const (
	// MeanUnitRoot: the level wanders (a unit root); differencing cures it.
	MeanUnitRoot MeanCause = "unit_root"
	// MeanTrend: the mean follows a straight line around which the series
	// is stationary (trend-stationary); removing the line cures it, and
	// differencing would over-difference.
	MeanTrend MeanCause = "trend"
	// MeanLevelShift: the mean jumps once in an otherwise stationary
	// series; removing the jump cures it.
	MeanLevelShift MeanCause = "level_shift"
)

// SpreadCause says why the spread of a series changes.
type SpreadCause string

const (
	// SpreadLevel: the spread follows the level; a power (Box-Cox)
	// transform stabilises it.
	SpreadLevel SpreadCause = "level"
	// SpreadTime: the spread changes over time while the level does not
	// explain it; no power transform fixes that.
	SpreadTime SpreadCause = "time"
)

// SeasonalKind says what kind of seasonal pattern a series has.
type SeasonalKind string

const (
	// SeasonalFixed: a deterministic pattern that repeats unchanged;
	// subtracting its seasonal means removes it.
	SeasonalFixed SeasonalKind = "fixed"
	// SeasonalDrifting: a pattern that drifts (a seasonal unit root);
	// seasonal differencing removes it.
	SeasonalDrifting SeasonalKind = "drifting"
)

// StationarityResult is the verdict on one series.
type StationarityResult struct {
	// Whether the level and the spread are steady and a seasonal pattern
	// is present; Stationary when neither is unsteady and there is none.
	MeanStable, SpreadStable, Seasonal, Stationary bool
	Violations                                     []Violation
	// MeanCause is why the mean moves ("" when it is stable).
	MeanCause MeanCause
	// ShiftIndex is the 0-based index of the first observation after a
	// level shift (-1 when MeanCause is not level_shift); ShiftSize is the
	// jump on the scale the recipe works on (after Box-Cox).
	ShiftIndex int
	ShiftSize  float64
	// TrendIntercept and TrendSlope are the line a + b·t (t from 0) that a
	// trend-stationary series follows, on the recipe's scale (NaN
	// otherwise); the slope is per observation.
	TrendIntercept, TrendSlope float64
	// SpreadCause is why the spread changes ("" when it is stable).
	SpreadCause SpreadCause
	// SeasonalKind is fixed or drifting for a seasonal series ("" when not
	// seasonal).
	SeasonalKind SeasonalKind
	// SecondPeriod is a second seasonal period found beyond Period (0 when
	// none); SecondPeriodHandled says whether the recipe removes it too
	// (it does when SecondPeriod is a multiple of Period: the recipe then
	// works at SecondPeriod, which removes both patterns).
	SecondPeriod        int
	SecondPeriodHandled bool
	// Demand is the share of zeros and the demand class.
	Demand DemandProfile
	// Outliers are the 0-based positions of isolated outliers; the tests
	// judge the series with each replaced by its robust fit, so that an
	// outlier neither makes a series non-stationary nor picks its
	// transform.
	Outliers []int
	// The recommended recipe: D seasonal differences at the recipe's
	// period (or fixed seasonal means), a trend or level shift removed, d
	// plain differences, after a Box-Cox transform with BoxCoxLambda when
	// it is not NaN. Recipe() returns it whole.
	SeasonalDifferences, Differences int
	BoxCoxLambda                     float64
	// Period is the seasonal period judged (given or detected).
	Period int
	// Cured reports whether the series after the recipe passes the same
	// tests; LeftViolations are those it still fails.
	Cured          bool
	LeftViolations []Violation
	// OverDifferenced is set when the differenced series looks
	// over-differenced (lag-1 autocorrelation, or lag-s after seasonal
	// differencing, below -0.4).
	OverDifferenced bool
	// Reason explains the verdict in one to three plain sentences.
	Reason string
	// Score ranks series by how far they are from stationary (see
	// VerdictScore); it runs from 0 to 3.
	Score float64
	// MeanShare, SpreadShare and SeasonalShare are the score's three parts.
	MeanShare, SpreadShare, SeasonalShare float64
	// The tests behind the verdict. ADF and KPSS are the first step of the
	// differencing sequence: on the series after its seasonal step (seasonal
	// means removed, or seasonal differences), the tests that chose d.
	// Stability holds the segment tests on the same series (its ARCH,
	// trend and Mann-Kendall fields are NaN; call Stability for those).
	ADF, KPSS   unitroot.UnitRootResult
	Stability   StabilityResult
	Seasonality SeasonalityResult
	// Break is the test for one break in the mean of the series after its
	// seasonal step (status too_short or season_unknown when not run).
	Break unitroot.MeanBreakResult
	// SpreadPValue is the spread test on the series as it came (before any
	// Box-Cox transform) after its mean has been dealt with (differenced,
	// detrended or shift removed).
	SpreadPValue float64
	// Differenced is the series after the whole recipe, applied to the
	// series with its outliers replaced (as judge computed it: equal to
	// Recipe().Apply(Judged()) up to rounding).
	Differenced []float64
	Status      stats.Status

	recipe Recipe
	// extremes counts values the outlier rule flags when they are too
	// many (more than max(5, n/50)) to set aside as isolated outliers.
	extremes int
	// clean is the series the verdict judged: the input with its isolated
	// outliers replaced (the input itself when there are none).
	clean []float64
	// fixedFailed: OCSB called the pattern fixed, but subtracting fixed
	// means did not cure the series and a seasonal difference did.
	fixedFailed bool
}

// Judged returns the series the verdict judged: the input with its
// isolated outliers replaced by their robust fit (the input itself when it
// has none; nil when the verdict could not judge it). A model is best
// fitted to it, while the recipe is applied to the series as it came.
func (r StationarityResult) Judged() []float64 { return r.clean }

// Recipe returns the recommended transform (without anchors: Apply it).
func (r StationarityResult) Recipe() Recipe {
	rec := r.recipe
	rec.Head, rec.Tail, rec.Length = nil, nil, 0
	return rec
}

// ViolationList returns the violations joined by commas ("" when stationary).
func (r StationarityResult) ViolationList() string {
	return joinViolations(r.Violations)
}

func joinViolations(v []Violation) string {
	parts := make([]string, len(v))
	for i, x := range v {
		parts[i] = string(x)
	}
	return strings.Join(parts, ",")
}

// Stationarity decides whether x's level and spread are steady and whether
// it carries a seasonal pattern, says what makes each unsteady part move,
// and recommends a recipe that cures what it diagnoses:
//
//  1. Demand profile (Demand): the share of zeros and, for series that are
//     never negative, the demand class. Intermittent or lumpy demand gets
//     no outlier screening and no power transform.
//  2. Period: given, or detected from the autocorrelation of the first
//     differences (Seasonality).
//  3. Outliers (Outliers): isolated outliers are replaced by their robust
//     fit before any test, and listed.
//  4. The series is judged (judge): seasonality and its kind, the cause of
//     a moving mean, the spread after the mean is dealt with and the cause
//     of its change, a second seasonal period.
//  5. When the spread follows the level and the data are positive, a
//     Box-Cox λ is chosen by Guerrero's (1993) criterion on the series'
//     changes (LambdaOfChanges) and the transformed series is judged
//     again: the recipe is decided on that scale.
//  6. The recipe is applied and its output judged by the same tests
//     (Cured, LeftViolations), and checked for over-differencing.
//  7. Reason and Score.
//
// See judge for the decisions and VerdictScore for the score. The level α
// applies to each decision; the segment tests of means and spreads and the
// break and trend tests that can flag a stationary series run at α/4 each,
// so that a stationary series is flagged on anything with a probability of
// a few times α/4 (measured in TestVerdictPatterns).
func Stationarity(x []float64, opts StationarityOptions) (StationarityResult, error) {
	alpha := opts.Alpha
	if alpha == 0 {
		alpha = defaults.Alpha
	}
	if !(alpha > 0 && alpha < 1) {
		return StationarityResult{}, numeric.Errorf("stationarity: alpha must be between 0 and 1, got %v", opts.Alpha)
	}
	if opts.Period < 0 {
		return StationarityResult{}, numeric.Errorf("seasonality: the period must be 0 (detect), 1 (none) or at least 2, got %d", opts.Period)
	}
	r := emptyVerdict()
	unjudged := func(s stats.Status) (StationarityResult, error) {
		r.Status, r.Reason = s, StatusReason(s)
		return r, nil
	}
	if s := stats.CheckFinite(x); s != stats.StatusOK {
		return unjudged(s)
	}
	if numeric.TooLarge(x) {
		v, err := unjudged(stats.StatusNonFinite)
		v.Reason = tooLargeReason
		return v, err
	}
	if len(x) >= 2 && numeric.IsConstant(x) {
		return unjudged(stats.StatusConstant)
	}
	if len(x) < 16 {
		return unjudged(stats.StatusTooShort)
	}
	r.Demand = Demand(x)
	period, detected := opts.Period, false
	if period == 1 { // declared non-seasonal
		period = 0
	} else if period == 0 {
		candidates := opts.Candidates
		if candidates == nil {
			candidates = DefaultPeriods
		}
		period = findPeriod(x, candidates)
		detected = period > 0
	}
	clean := x
	if !r.Demand.Intermittent() {
		out := Outliers(x, OutlierOptions{Period: period})
		if n := len(out.Positions); n > max(5, len(x)/50) {
			// Too many to be isolated outliers: heavy tails or skew, which
			// the tests should see.
			r.extremes = n
		} else {
			clean, r.Outliers = out.Cleaned, out.Positions
		}
	}
	j, err := judge(clean, judgeOptions{period: period, alpha: alpha, segments: opts.Segments, secondPeriods: true})
	if err != nil {
		return r, err
	}
	if j.status != stats.StatusOK {
		v, err := unjudged(j.status)
		if j.status == stats.StatusConstant {
			// x varies (checked above): what is constant is the series
			// after its seasonal step or with its outliers set aside.
			v.Reason = "Nothing varies once its repeating pattern or its outliers are set aside: the series is deterministic, so there is nothing to test."
		}
		return v, err
	}
	first := j
	lambda := math.NaN()
	scale := clean // the series on the scale the recipe's later steps work on
	if first.spreadCause == SpreadLevel && !r.Demand.Intermittent() && numeric.Minimum(clean) > 0 {
		lambdaPeriod := 0
		if j.seasonal {
			lambdaPeriod = j.recipe.Period
		}
		if l, s := stats.LambdaOfChanges(clean, lambdaPeriod); s == stats.StatusOK {
			if y, s := stats.BoxCox(clean, l); s == stats.StatusOK {
				j2, err := judge(y, judgeOptions{period: period, alpha: alpha, segments: opts.Segments, secondPeriods: true})
				if err != nil {
					return r, err
				}
				if j2.status == stats.StatusOK {
					j, lambda, scale = j2, l, y
				}
			}
		}
	}
	base := r
	finish := func(j judgement) (StationarityResult, error) {
		v := base
		v.fill(j, first, detected)
		v.BoxCoxLambda = lambda
		if !math.IsNaN(lambda) {
			v.recipe.BoxCox, v.recipe.Lambda = true, lambda
		}
		return v, v.checkCure(j, alpha)
	}
	base.clean = clean
	if r, err = finish(j); err != nil {
		return r, err
	}
	// A fixed pattern whose means leave the output failing while a seasonal
	// difference cures it was drifting after all.
	if !r.Cured && j.kind == SeasonalFixed {
		alt, err := judge(scale, judgeOptions{alpha: alpha, segments: opts.Segments,
			step: &seasonalStep{period: j.recipe.Period, season: j.season}})
		if err != nil {
			return r, err
		}
		if alt.status == stats.StatusOK {
			alt.period, alt.secondPeriod, alt.secondHandled = j.period, j.secondPeriod, j.secondHandled
			v, err := finish(alt)
			if err != nil {
				return r, err
			}
			if v.Cured {
				r = v
				r.fixedFailed = true
			}
		}
	}
	r.Score = r.MeanShare + r.SpreadShare + r.SeasonalShare
	if math.IsNaN(r.Score) || math.IsInf(r.Score, 0) {
		// A share could not be computed: a number overflowed or lost all
		// meaning on the way, which no verdict may rest on.
		v, err := unjudged(stats.StatusNonFinite)
		v.Reason = notComputedReason
		return v, err
	}
	r.Reason = reason(&r)
	r.Status = stats.StatusOK
	switch {
	case r.Seasonality.Status == stats.StatusSeasonUnknown && opts.Period == 1:
		r.Reason += " The series was declared non-seasonal (period 1), so seasonality was not judged."
	case r.Seasonality.Status == stats.StatusSeasonUnknown:
		r.Status = stats.StatusSeasonUnknown
		r.Reason += " No seasonal period was given or found, so seasonality was not judged."
	}
	return r, nil
}

// UnjudgedVerdict is the verdict of a series left unjudged with status s
// (for a caller that decides so before Stationarity, such as a fill that
// Regularize refuses): every number NaN, the status's reason.
func UnjudgedVerdict(s stats.Status) StationarityResult {
	r := emptyVerdict()
	r.Status, r.Reason = s, StatusReason(s)
	return r
}

// emptyVerdict is a result with every number NaN.
func emptyVerdict() StationarityResult {
	n := math.NaN()
	return StationarityResult{BoxCoxLambda: n, SpreadPValue: n, ShiftIndex: -1, ShiftSize: n,
		TrendIntercept: n, TrendSlope: n, Score: n, MeanShare: n, SpreadShare: n, SeasonalShare: n,
		Demand: DemandProfile{ZeroShare: n, AverageInterval: n, SizeVariation: n},
		Break:  unitroot.FailedMeanBreak(stats.StatusTooShort)}
}

// fill copies a judgement into the result: j decided the recipe (on the
// Box-Cox scale when a λ was chosen), first is the judgement of the series
// as it came, which says whether its spread is stable and why not.
func (r *StationarityResult) fill(j, first judgement, detected bool) {
	r.Seasonality = j.season
	r.Seasonality.Detected = detected
	r.Period = j.period
	r.Seasonal, r.SeasonalKind = j.seasonal, j.kind
	r.SecondPeriod, r.SecondPeriodHandled = j.secondPeriod, j.secondHandled
	r.SeasonalDifferences, r.Differences = j.recipe.SeasonalDifferences, j.recipe.Differences
	r.MeanCause = j.meanCause
	if j.recipe.Shift {
		r.ShiftIndex, r.ShiftSize = j.recipe.ShiftIndex, j.recipe.ShiftSize
	}
	if j.recipe.Trend {
		r.TrendIntercept, r.TrendSlope = j.recipe.TrendIntercept, j.recipe.TrendSlope
	}
	r.ADF, r.KPSS, r.Stability, r.Break = j.adf, j.kpss, j.stability, j.brk
	r.SpreadPValue, r.SpreadCause = first.spreadP, first.spreadCause
	r.MeanStable = j.meanCause == ""
	r.SpreadStable = first.spreadCause == ""
	r.recipe = j.recipe
	r.MeanShare, r.SpreadShare, r.SeasonalShare = j.meanShare, j.spreadShare, 0
	if r.Seasonal {
		r.SeasonalShare = j.season.SeasonalStrength
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
}

// checkCure judges the recipe's output (j.m: the cleaned series after the
// whole recipe, on the scale judge worked on) with the verdict's own tests,
// and checks it for over-differencing.
func (r *StationarityResult) checkCure(j judgement, alpha float64) error {
	rec := r.recipe
	y := j.m
	r.Differenced = y
	left, err := leftViolations(j, alpha)
	if err != nil {
		return err
	}
	r.LeftViolations = left
	r.Cured = len(r.LeftViolations) == 0
	if rec.Differences > 0 {
		if a := stats.AutocorrelationAt(y, []int{1}); a != nil && a[0] < -0.4 {
			r.OverDifferenced = true
		}
	}
	if rec.SeasonalDifferences > 0 && rec.Period < len(y) {
		if a := stats.AutocorrelationAt(y, []int{rec.Period}); a != nil && a[0] < -0.4 {
			r.OverDifferenced = true
		}
	}
	return nil
}

// leftViolations judges j.m, the output of the recipe, by the tests the
// verdict uses, reusing those judge already ran on it: a unit root (ADF and
// KPSS as in the differencing sequence; KPSS always when the recipe removed
// a fitted line or shift) or unequal segment means; unequal segment
// spreads; a seasonal pattern at the period (or periods) judged.
func leftViolations(j judgement, alpha float64) ([]Violation, error) {
	y := j.m
	var out []Violation
	each := alpha / 4
	if len(y) < 16 || numeric.IsConstant(y) {
		return nil, nil
	}
	adf := j.mADF
	if adf.Status == "" {
		var err error
		if adf, err = unitroot.ADF(y, unitroot.ADFOptions{}); err != nil {
			return nil, err
		}
	}
	meanBad := false
	// A line or a shift fitted to the series and removed leaves an output
	// that ADF's critical values (for a series with only a constant) judge
	// too leniently: a random walk less its best-fitting step or line looks
	// mean-reverting. For those recipes KPSS always judges the output too.
	fitted := j.recipe.Trend || j.recipe.Shift
	if adf.Status == stats.StatusOK {
		// KPSS decides only between α/4 and α (needsDifference), or always
		// after a fitted line or shift.
		switch {
		case !(adf.PValue < alpha):
			meanBad = true
		case adf.PValue >= each || fitted:
			kpss := j.mKPSS
			if kpss.Status == "" {
				var err error
				if kpss, err = unitroot.KPSS(y, unitroot.KPSSOptions{}); err != nil {
					return nil, err
				}
			}
			meanBad = kpss.Status == stats.StatusOK && kpss.PValue < alpha
		}
	}
	if st := j.mStability; st.Status == stats.StatusOK {
		if st.MeanPValue < each {
			meanBad = true
		}
		if st.SpreadPValue < each {
			out = append(out, ViolationSpread)
		}
	}
	if meanBad {
		out = append([]Violation{ViolationMean}, out...)
	}
	for _, p := range []int{j.period, j.secondPeriod} {
		if p < 2 || len(y) < 2*p {
			continue
		}
		season := j.mSeason
		if p != j.period || season.Status == "" || season.Period != p {
			var err error
			if season, err = Seasonality(y, SeasonalityOptions{Period: p}); err != nil {
				return nil, err
			}
		}
		if season.Status == stats.StatusOK && seasonalBySeason(season) {
			out = append(out, ViolationSeasonal)
			break
		}
	}
	return out, nil
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
