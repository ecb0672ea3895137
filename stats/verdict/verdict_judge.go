package verdict

import (
	"math"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
	"github.com/plumb-sql/plumb/stats/unitroot"
)

// judgeOptions configure one judgement.
type judgeOptions struct {
	period        int // 0: no seasonal period known
	alpha         float64
	segments      int
	secondPeriods bool // look for a second seasonal period
	// step, when set, is the seasonal step to take instead of deciding
	// one: the series is seasonal with season's result and kind.
	step *seasonalStep
}

// seasonalStep is a decided seasonal step: fixed means at period, or (means
// nil) one seasonal difference at period.
type seasonalStep struct {
	period int
	means  []float64
	season SeasonalityResult
}

// judgement is what judge decides about one series on one scale.
type judgement struct {
	status        stats.Status
	season        SeasonalityResult
	period        int
	seasonal      bool
	kind          SeasonalKind
	secondPeriod  int
	secondHandled bool
	meanCause     MeanCause
	adf, kpss     unitroot.UnitRootResult
	stability     StabilityResult
	brk           unitroot.MeanBreakResult
	spreadP       float64
	spreadCause   SpreadCause
	// recipe holds every step but the Box-Cox transform.
	recipe                 Recipe
	meanShare, spreadShare float64
	// trend is the STL trend at the period, while judge runs (a scratch
	// slice; nil after).
	trend []float64
	// m is the series after the whole recipe on this scale (the seasonal
	// step, then the mean dealt with): what the recipe outputs. The tests
	// the cure check needs are kept where judge computed them on m already
	// (Status "" when not).
	m          []float64
	mADF       unitroot.UnitRootResult
	mKPSS      unitroot.UnitRootResult
	mStability StabilityResult
	mSeason    SeasonalityResult
	// zSeason is the seasonality of the series after fixed seasonal means
	// were removed (Status "" when that check did not run).
	zSeason SeasonalityResult
}

// judge decides, for a series y (outliers already replaced):
//
//  1. Seasonality at the period: seasonal when the STL seasonal strength
//     is at least SeasonalStrengthThreshold, or at least
//     ModerateSeasonalStrength with a seasonal unit root the OCSB test does
//     not reject. Its kind: fixed when OCSB rejects the seasonal unit root
//     (the pattern is deterministic: subtract the seasonal means,
//     SeasonalEffects), drifting otherwise (one seasonal difference).
//  2. On the series after that seasonal step, z, the cause of a moving
//     mean (meanDecision).
//  3. The spread test on z after its mean is dealt with (differenced,
//     detrended or shift removed), and the cause of a change: the spread
//     follows the level (spreadFollowsLevel) or time.
//  4. A second seasonal period (secondPeriod): handled by working at the
//     longer period when it is a multiple of the first, named otherwise.
func judge(y []float64, o judgeOptions) (judgement, error) {
	if o.step != nil {
		return judgeStep(y, o)
	}
	j := judgement{period: o.period}
	season := unknownSeason(o.period)
	if o.period >= 2 {
		var err error
		if season, err = Seasonality(y, SeasonalityOptions{Period: o.period, keepTrend: true}); err != nil {
			return j, err
		}
		j.trend, season.trend = season.trend, nil
		if trend := j.trend; trend != nil {
			defer numeric.PutScratch(trend)
		}
	}
	if season.Status != stats.StatusOK && season.Status != stats.StatusSeasonUnknown {
		j.status = season.Status
		return j, nil
	}
	j.season = season
	z := y
	stabilityPeriod := 0
	if season.Status == stats.StatusOK {
		p := season.Period
		stabilityPeriod = p
		if seasonalBySeason(season) {
			j.seasonal = true
			j.kind = SeasonalDrifting
			j.recipe.Period = p
			if season.OCSB.Status == stats.StatusOK && !season.OCSB.SeasonalUnitRoot {
				if effects := SeasonalEffects(y, p); effects != nil {
					z = make([]float64, len(y))
					for t, v := range y {
						z[t] = v - effects[t%p]
					}
					// Fixed means must remove the pattern; when the rest is
					// still seasonal the pattern drifts after all (OCSB
					// over-rejects when noise hides a seasonal random walk).
					rest, err := Seasonality(z, SeasonalityOptions{Period: p})
					if err != nil {
						return j, err
					}
					if rest.Status == stats.StatusOK && seasonalBySeason(rest) {
						z = y
					} else {
						j.kind = SeasonalFixed
						j.recipe.SeasonalMeans = effects
						j.zSeason = rest
					}
				}
			}
			if j.kind == SeasonalDrifting {
				j.recipe.SeasonalDifferences = 1
				z, _ = stats.Difference(y, p, 1)
			}
		}
	}
	return j.rest(y, z, o, stabilityPeriod)
}

// judgeStep judges y with a seasonal step already decided (o.step).
func judgeStep(y []float64, o judgeOptions) (judgement, error) {
	st := o.step
	p := st.period
	j := judgement{period: p, season: st.season, seasonal: true, kind: SeasonalDrifting}
	j.recipe.Period = p
	var z []float64
	if st.means != nil {
		j.kind = SeasonalFixed
		j.recipe.SeasonalMeans = st.means
		z = make([]float64, len(y))
		for t, v := range y {
			z[t] = v - st.means[t%p]
		}
	} else {
		j.recipe.SeasonalDifferences = 1
		z, _ = stats.Difference(y, p, 1)
	}
	return j.rest(y, z, o, p)
}

// rest finishes a judgement once the seasonal step has given z: the mean,
// the spread, the shares and a second period.
func (j *judgement) rest(y, z []float64, o judgeOptions, stabilityPeriod int) (judgement, error) {
	m, err := j.meanDecision(z, o, stabilityPeriod)
	if err != nil || j.status != stats.StatusOK {
		return *j, err
	}
	j.m = m
	// The segment tests on the output (in whole periods when there is a
	// period): its spread test is the verdict's, its mean test the cure
	// check's.
	if j.meanCause == "" {
		// Nothing was done to the mean: the output is z itself, and without
		// a seasonal step z is the series itself.
		j.mADF, j.mKPSS, j.mSeason, j.mStability = j.adf, j.kpss, j.zSeason, j.stability
		if !j.seasonal {
			j.mSeason = j.season
		}
	} else if j.mStability, err = stability(m, StabilityOptions{Segments: o.segments, Period: stabilityPeriod}, false); err != nil {
		return *j, err
	}
	j.spreadP = j.mStability.SpreadPValue
	switch {
	case j.spreadP < o.alpha/4:
		j.spreadCause = SpreadTime
		if spreadFollowsLevel(m, y, len(y)-len(m), o.segments) {
			j.spreadCause = SpreadLevel
		}
	case j.seasonal && j.trend != nil && seasonalSwingFollowsLevel(y, j.trend, j.period, o.segments):
		j.spreadCause = SpreadLevel
	}
	j.meanShare = segmentShare(z, segmentBounds(len(z), o.segments, stabilityPeriod), false)
	j.spreadShare = segmentShare(m, segmentBounds(len(m), o.segments, stabilityPeriod), true)
	if o.secondPeriods && j.season.Status == stats.StatusOK {
		if err := j.secondPeriodCheck(y, m, o); err != nil {
			return *j, err
		}
	}
	out := *j
	out.trend = nil // released by judge
	return out, nil
}

// unknownSeason is the seasonality result when no period is known.
func unknownSeason(period int) SeasonalityResult {
	n := math.NaN()
	return SeasonalityResult{Period: period, PeakAutocorrelation: n, SeasonalStrength: n, TrendStrength: n,
		OCSB: unitroot.OCSBResult{Status: stats.StatusSeasonUnknown, Statistic: n, Critical5: n}, Status: stats.StatusSeasonUnknown}
}

// seasonalBySeason is the verdict's rule for calling a series seasonal.
func seasonalBySeason(s SeasonalityResult) bool {
	return s.Seasonal || (s.OCSB.Status == stats.StatusOK && s.OCSB.SeasonalUnitRoot)
}

// meanDecision decides why the mean of z moves, if it does, fills the
// recipe's trend, shift or differences, and returns z with its mean dealt
// with. The rules, at level α:
//
//   - Unit-root evidence: the differencing sequence's first step
//     (needsDifference: ADF with a constant, cross-checked by KPSS).
//   - With it, and no seasonal differencing, two alternatives that also
//     explain a persistent-looking series are tried, each overriding the
//     unit-root evidence at α/2 (Bonferroni over the two): a
//     trend-stationary series (rejectsAroundLine: ADF with a trend at α/2;
//     the trend's slope significant at α by its Newey-West t; and
//     stationaryAroundLine: KPSS with a trend), and a level shift in a
//     stationary series (the break test, MeanBreak, significant at α;
//     rejectsAroundShift: Zivot-Andrews at α/2; and stationaryAroundShift:
//     KPSS with the shift removed). If both hold,
//     the one with the lower BIC (the line: 2 parameters; the shift: 3,
//     its date counted) wins. Otherwise the cause is a unit root, and d
//     follows the differencing sequence (up to 2).
//   - Without unit-root evidence, the mean still moves when the
//     segment-means test or KPSS rejects, at α/8 each (meanMoves: the two
//     tests that decide whether it moves; the trend and break tests only
//     attribute the cause, so that a stationary series is not tested four
//     times). The cause is then whichever of a trend (the slope's
//     Newey-West t) and a shift (the break test) is significant at α and
//     whose unit-root test rejects at α (rejectsAroundLine,
//     rejectsAroundShift), by BIC if both; if neither, a unit root (one
//     difference).
func (j *judgement) meanDecision(z []float64, o judgeOptions, stabilityPeriod int) ([]float64, error) {
	alpha, each := o.alpha, o.alpha/4
	var err error
	if j.adf, err = unitroot.ADF(z, unitroot.ADFOptions{}); err != nil {
		return nil, err
	}
	if j.kpss, err = unitroot.KPSS(z, unitroot.KPSSOptions{}); err != nil {
		return nil, err
	}
	if j.stability, err = stability(z, StabilityOptions{Segments: o.segments, Period: stabilityPeriod}, false); err != nil {
		return nil, err
	}
	if j.stability.Status != stats.StatusOK {
		j.status = j.stability.Status
		return nil, nil
	}
	j.status = stats.StatusOK
	j.brk = unitroot.FailedMeanBreak(stats.StatusSeasonUnknown) // not run with a seasonal difference
	deterministic := j.recipe.SeasonalDifferences == 0
	line := &lineFit{a: math.NaN(), b: math.NaN(), p: math.NaN()}
	if deterministic {
		j.brk = unitroot.MeanBreak(z)
		line = fitLine(z)
	}
	testsOK := j.adf.Status == stats.StatusOK && j.kpss.Status == stats.StatusOK
	unitRoot := testsOK && needsDifference(j.kpss.PValue, j.adf.PValue, alpha)
	shiftP := math.NaN()
	if j.brk.Status == stats.StatusOK {
		shiftP = j.brk.PValue
	}
	var trendOK, shiftOK bool
	switch {
	case unitRoot && deterministic:
		// Cheapest first: ADF with a trend rejects a unit root only for a
		// few series with one, so most never need the slope's Newey-West t.
		if rejectsAroundLine(z, alpha/2) {
			trendOK = line.pValue() < alpha && stationaryAroundLine(z, alpha)
		}
		if shiftP < alpha {
			if shiftOK, err = j.rejectsAroundShift(z, alpha/2); err != nil {
				return nil, err
			}
			shiftOK = shiftOK && j.stationaryAroundShift(z, alpha)
		}
	case !unitRoot && deterministic && meanMoves(j, each/2):
		// ADF without a line or a shift has rejected a unit root; the
		// unit-root test that allows for the line (ADF with a trend) or for
		// the shift (Zivot-Andrews) must reject it too, at α: here they
		// confirm, they do not override. KPSS, which over-rejects
		// persistent stationary series, is not asked.
		trendOK = line.pValue() < alpha && rejectsAroundLine(z, alpha)
		if shiftP < alpha {
			if shiftOK, err = j.rejectsAroundShift(z, alpha); err != nil {
				return nil, err
			}
		}
		unitRoot = !trendOK && !shiftOK
	case !unitRoot:
		unitRoot = meanMoves(j, each/2)
	}
	if trendOK && shiftOK {
		n := float64(len(z))
		bicLine := n*math.Log(line.ssr/n) + 2*math.Log(n)
		bicShift := n*math.Log(j.brk.SSR/n) + 3*math.Log(n)
		trendOK = bicLine <= bicShift
		shiftOK = !trendOK
	}
	switch {
	case trendOK:
		j.meanCause = MeanTrend
		j.recipe.Trend, j.recipe.TrendIntercept, j.recipe.TrendSlope = true, line.a, line.b
		m := make([]float64, len(z))
		for t, v := range z {
			m[t] = v - line.a - line.b*float64(t)
		}
		return m, nil
	case shiftOK:
		j.meanCause = MeanLevelShift
		j.recipe.Shift, j.recipe.ShiftIndex, j.recipe.ShiftSize = true, j.brk.Index, j.brk.Size
		return withoutShift(z, j.brk.Index, j.brk.Size), nil
	case unitRoot:
		j.meanCause = MeanUnitRoot
		return j.differences(z, alpha)
	}
	return z, nil
}

// The two deterministic alternatives to a unit root, a trend and a level
// shift, are each accepted only when the unit-root test that allows for
// them rejects: ADF with a trend for the line, and for the shift the
// Zivot-Andrews test against one break in the intercept, whose critical
// values allow for the break date being chosen from the data. A random walk
// has step-like stretches, and the break test, whose null is a stationary
// series, finds one in almost every walk; ADF on the walk less its
// best-fitting step, with critical values for a series with a constant
// only, would often reject. Where they override unit-root evidence they
// test at α/2 each (Bonferroni over the two, so that a random walk is taken
// for either with probability at most about α); where ADF has already
// rejected a unit root, at α.

// rejectsAroundLine reports whether ADF with a trend rejects a unit root in
// z at level.
func rejectsAroundLine(z []float64, level float64) bool {
	adf, err := unitroot.ADF(z, unitroot.ADFOptions{Deterministic: unitroot.DeterministicLevelAndSlope})
	return err == nil && adf.Status == stats.StatusOK && adf.PValue < level
}

// rejectsAroundShift reports whether the Zivot-Andrews test rejects a unit
// root in z against one break in the intercept at level, with the lag ADF
// chose (fixed: one scan over the break dates instead of a lag search).
func (j *judgement) rejectsAroundShift(z []float64, level float64) (bool, error) {
	lags := j.adf.Lags
	za, err := unitroot.ZivotAndrews(z, unitroot.ZivotAndrewsOptions{Break: unitroot.BreakLevel, LagRule: unitroot.LagGiven, MaxLag: &lags})
	if err != nil {
		return false, err
	}
	return za.Status == stats.StatusOK && za.PValue < level, nil
}

// stationaryAroundLine reports whether KPSS with a trend does not reject,
// at α, that z is stationary around a straight line; asked, as a second
// opinion, when ADF found unit-root evidence.
func stationaryAroundLine(z []float64, alpha float64) bool {
	kpss, err := unitroot.KPSS(z, unitroot.KPSSOptions{Deterministic: unitroot.DeterministicLevelAndSlope})
	return err == nil && kpss.Status == stats.StatusOK && !(kpss.PValue < alpha)
}

// stationaryAroundShift reports whether KPSS does not reject, at α, that z
// with the shift the break test found (j.brk) removed is stationary; asked,
// as a second opinion, when ADF found unit-root evidence.
func (j *judgement) stationaryAroundShift(z []float64, alpha float64) bool {
	kpss, err := unitroot.KPSS(withoutShift(z, j.brk.Index, j.brk.Size), unitroot.KPSSOptions{})
	return err == nil && kpss.Status == stats.StatusOK && !(kpss.PValue < alpha)
}

// differences runs the differencing sequence on z, which has unit-root
// evidence: difference, then test again, up to twice.
func (j *judgement) differences(z []float64, alpha float64) ([]float64, error) {
	w, _ := stats.Difference(z, 1, 1)
	j.recipe.Differences = 1
	adf, err := unitroot.ADF(w, unitroot.ADFOptions{})
	if err != nil {
		return nil, err
	}
	j.mADF = adf
	if adf.Status != stats.StatusOK || adf.PValue < alpha/4 {
		return w, nil
	}
	// KPSS decides only between α/4 and α (needsDifference).
	kpss := unitroot.UnitRootResult{Status: stats.StatusOK, PValue: math.NaN()}
	if adf.PValue < alpha {
		if kpss, err = unitroot.KPSS(w, unitroot.KPSSOptions{}); err != nil {
			return nil, err
		}
		j.mKPSS = kpss
	}
	if kpss.Status == stats.StatusOK && needsDifference(kpss.PValue, adf.PValue, alpha) {
		w, _ = stats.Difference(w, 1, 1)
		j.recipe.Differences = 2
		j.mADF, j.mKPSS = unitroot.UnitRootResult{}, unitroot.UnitRootResult{}
	}
	return w, nil
}

// meanMoves is the test of a moving mean for a series ADF calls free of a
// unit root: the segment means differ, or KPSS, whose null hypothesis is a
// stationary series, rejects it, each at level (α/8, so that the two
// together spend the α/4 the segment test alone had). ADF's firm rejection
// decides against differencing, not for a constant mean: a series can
// revert quickly and still wander (a random walk in logarithms over a
// stretch where it turned back, judged on the log scale).
func meanMoves(j *judgement, level float64) bool {
	return j.stability.MeanPValue < level || (j.kpss.Status == stats.StatusOK && j.kpss.PValue < level)
}

// withoutShift returns z with size subtracted from index on.
func withoutShift(z []float64, index int, size float64) []float64 {
	out := append([]float64(nil), z...)
	for t := index; t < len(out); t++ {
		out[t] -= size
	}
	return out
}

// lineFit is the least-squares line a + b·t (t = 0, 1, ...) through a
// series and its residual sum of squares; pValue gives the two-sided
// p-value of the slope with a prewhitened Newey-West standard error
// (trendSlope), computed when first asked for.
type lineFit struct {
	a, b, ssr, p float64
	z            []float64
}

func fitLine(z []float64) *lineFit {
	n := float64(len(z))
	tbar := (n - 1) / 2
	mean := numeric.Sum(z) / n
	var sxy, sxx float64
	for t, v := range z {
		d := float64(t) - tbar
		sxy += d * (v - mean)
		sxx += d * d
	}
	b := sxy / sxx
	a := mean - b*tbar
	ssr := 0.0
	for t, v := range z {
		e := v - a - b*float64(t)
		ssr += e * e
	}
	return &lineFit{a: a, b: b, ssr: ssr, p: math.NaN(), z: z}
}

func (l *lineFit) pValue() float64 {
	if math.IsNaN(l.p) && l.z != nil {
		_, _, l.p = trendSlope(l.z)
		l.z = nil
	}
	return l.p
}

// spreadFollowsLevel reports whether the segment standard deviations of m
// (the series with its mean dealt with) rise with the segment levels of y,
// the series itself, aligned on their last values (m is lost values
// shorter): Tukey's spread-versus-level idea. With positive levels, the
// logarithm of the standard deviation is regressed on the logarithm of the
// level; the spread follows the level when the fit explains at least half
// of the variation (R² ≥ 0.5) with a slope between 0.3 and 2.5 (a power
// transform with exponent 1 - slope, between -1.5 and 0.7, would stabilise
// it). A slope outside that range means the level barely moves while the
// spread does: a change over time. Without positive levels, a correlation
// of at least 0.8 between level and standard deviation counts.
func spreadFollowsLevel(m, y []float64, lost, segments int) bool {
	return spreadFollowsLevelIn(m, y, lost, segmentBounds(len(m), segments, 0))
}

// spreadFollowsLevelIn is spreadFollowsLevel with the segments given.
func spreadFollowsLevelIn(m, y []float64, lost int, bounds []int) bool {
	if bounds == nil {
		return false
	}
	k := len(bounds) - 1
	level := make([]float64, k)
	sd := make([]float64, k)
	positive := true
	for i := 0; i < k; i++ {
		_, sd[i] = numeric.MeanSD(m[bounds[i]:bounds[i+1]])
		level[i], _ = numeric.MeanSD(y[bounds[i]+lost : bounds[i+1]+lost])
		if !(level[i] > 0) || !(sd[i] > 0) {
			positive = false
		}
	}
	if !positive {
		return correlation(level, sd) >= 0.8
	}
	for i := range level {
		level[i], sd[i] = math.Log(level[i]), math.Log(sd[i])
	}
	r2, slope := lineThrough(level, sd)
	return r2 >= 0.5 && slope >= 0.3 && slope <= 2.5
}

// lineThrough returns the R² and the slope of the least-squares line of y
// on x (NaN when either does not vary).
func lineThrough(x, y []float64) (float64, float64) {
	r := correlation(x, y)
	_, sx := numeric.MeanSD(x)
	_, sy := numeric.MeanSD(y)
	return r * r, r * sy / sx
}

// segmentShare is the share of the variation of x between its segments:
// Σ m_j (x̄_j - x̄)² / Σ (x_t - x̄)², the η² of a one-way layout. With
// spread set it is computed on |x_t - M_j|, the absolute deviations from
// each segment's median, so that it measures how much the spread differs
// between segments. NaN when the segments cannot be formed.
func segmentShare(x []float64, bounds []int, spread bool) float64 {
	if bounds == nil {
		return math.NaN()
	}
	v := x
	if spread {
		v = make([]float64, len(x))
		for j := 0; j+1 < len(bounds); j++ {
			seg := x[bounds[j]:bounds[j+1]]
			med := median(seg)
			for i, u := range seg {
				v[bounds[j]+i] = math.Abs(u - med)
			}
		}
	}
	grand := numeric.Sum(v) / float64(len(v))
	var between, total float64
	for j := 0; j+1 < len(bounds); j++ {
		seg := v[bounds[j]:bounds[j+1]]
		m := numeric.Sum(seg) / float64(len(seg))
		between += float64(len(seg)) * (m - grand) * (m - grand)
	}
	for _, u := range v {
		total += (u - grand) * (u - grand)
	}
	if !(total > 0) {
		return 0
	}
	return between / total
}

// secondPeriodCandidates are the longer seasonal periods looked for beyond
// a given one: a week of hours beyond a day, a year of days beyond a week,
// a year of weeks beyond a quarter... (common calendar periods).
var secondPeriodCandidates = map[int][]int{
	4:  {52},
	7:  {365},
	12: {},
	24: {168},
}

// secondPeriodCheck looks for a second seasonal period in m (the series
// after its seasonal step and with its mean dealt with): a candidate whose
// autocorrelation exceeds 2.576/√n, the 1% band of white noise. When the
// candidate is a multiple of the period, the series is judged again with a
// seasonal step at the candidate, which removes both patterns: for a fixed
// pattern, the two-level means of twoLevelEffects; for a drifting one, a
// seasonal difference at the candidate ((1 - B^s2) contains 1 - B^s); for a
// series not seasonal at the first period, whatever judge decides there.
// Otherwise the second period is only named.
func (j *judgement) secondPeriodCheck(y, m []float64, o judgeOptions) error {
	for _, p2 := range secondPeriodCandidates[j.period] {
		if len(y) < 2*p2 || len(m) < p2+16 {
			continue
		}
		a := stats.AutocorrelationAt(m, []int{p2})
		if a == nil || !(a[0] > 2.576/math.Sqrt(float64(len(m)))) {
			continue
		}
		j.secondPeriod = p2
		if p2%j.period != 0 {
			return nil
		}
		next := judgeOptions{period: p2, alpha: o.alpha, segments: o.segments}
		switch j.kind {
		case SeasonalFixed:
			means := twoLevelEffects(y, j.period, p2)
			if means == nil {
				return nil
			}
			next.step = &seasonalStep{period: p2, means: means, season: j.season}
		case SeasonalDrifting:
			next.step = &seasonalStep{period: p2, season: j.season}
		}
		again, err := judge(y, next)
		if err != nil {
			return err
		}
		if again.status != stats.StatusOK || !again.seasonal {
			return nil
		}
		season, period := j.season, j.period
		*j = again
		j.season, j.period = season, period
		j.seasonal = true
		j.secondPeriod, j.secondHandled = p2, true
		return nil
	}
	return nil
}

// findPeriod detects a seasonal period of x among candidates, as
// Seasonality does (0 when none is found).
func findPeriod(x []float64, candidates []int) int {
	d := numeric.GetScratch(len(x) - 1)
	defer numeric.PutScratch(d)
	for i := range d {
		d[i] = x[i+1] - x[i]
	}
	return detectPeriod(d, len(x), candidates)
}

// twoLevelEffects estimates a fixed pattern of period p2 = q·p (a week of
// hours over a day of hours) parsimoniously: the within-period effects A at
// p (SeasonalEffects), then, on the means of each whole period of y - A,
// the effects B of the q periods in a cycle of p2 (SeasonalEffects at q).
// The pattern at position j of p2 is A[j mod p] + B[j div p]: p + q
// numbers estimated instead of p2, which a few cycles of p2 could not
// estimate without fitting their noise. Nil when either cannot be
// estimated.
func twoLevelEffects(y []float64, p, p2 int) []float64 {
	q := p2 / p
	a := SeasonalEffects(y, p)
	if a == nil || q < 2 {
		return nil
	}
	blocks := make([]float64, len(y)/p)
	for i := range blocks {
		s := 0.0
		for t := i * p; t < (i+1)*p; t++ {
			s += y[t] - a[t%p]
		}
		blocks[i] = s / float64(p)
	}
	b := SeasonalEffects(blocks, q)
	if b == nil {
		return nil
	}
	out := make([]float64, p2)
	for j := range out {
		out[j] = a[j%p] + b[j/p]
	}
	return out
}

// seasonalSwingFollowsLevel reports whether the seasonal swing of y grows
// with its level: a multiplicative seasonal pattern, which a seasonal step
// alone leaves in the spread of what follows it, and which a power
// transform makes additive. The swing is y minus its STL trend (trend); in
// segments of whole periods (at least four), the logarithm of its standard
// deviation is regressed on the logarithm of the segment level of y. The
// swing follows the level when the fit is close (R² ≥ 0.8), its slope lies
// between 0.3 and 2.5 (as in spreadFollowsLevel), and the fitted swing
// grows by at least half across the levels seen. A segment-spread test
// does not serve here: the swing is a smooth pattern, not noise, and a
// long-run variance sized for noise hides its growth. A swing that changes
// without following the level is not counted (a drifting pattern does that,
// and the seasonal difference deals with it).
func seasonalSwingFollowsLevel(y, trend []float64, period, segments int) bool {
	if period < 2 || numeric.Minimum(y) <= 0 {
		return false
	}
	bounds := segmentBounds(len(y), segments, period)
	if bounds == nil || len(bounds) < 5 {
		return false
	}
	k := len(bounds) - 1
	logLevel := make([]float64, k)
	logSwing := make([]float64, k)
	for i := 0; i < k; i++ {
		level, _ := numeric.MeanSD(y[bounds[i]:bounds[i+1]])
		swing := 0.0
		for t := bounds[i]; t < bounds[i+1]; t++ {
			d := y[t] - trend[t]
			swing += d * d
		}
		swing = math.Sqrt(swing / float64(bounds[i+1]-bounds[i]))
		if !(level > 0) || !(swing > 0) {
			return false
		}
		logLevel[i], logSwing[i] = math.Log(level), math.Log(swing)
	}
	r2, slope := lineThrough(logLevel, logSwing)
	if !(r2 >= 0.8) {
		return false
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range logLevel {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	return slope >= 0.3 && slope <= 2.5 && slope*(hi-lo) >= math.Log(1.5)
}
