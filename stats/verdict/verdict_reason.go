package verdict

import (
	"fmt"
	"math"
	"strings"

	"github.com/plumb-sql/plumb/stats"
)

// reason explains a verdict in plain sentences built from its causes, in
// the order a user acts on them: what is wrong with the mean, the seasonal
// pattern and the spread, then what the tests set aside and what the
// recipe leaves.
func reason(r *StationarityResult) string {
	var s []string
	add := func(format string, args ...any) { s = append(s, fmt.Sprintf(format, args...)) }
	switch r.MeanCause {
	case MeanUnitRoot:
		times := "once"
		if r.Differences == 2 {
			times = "twice"
		}
		add("The level wanders like a random walk (a unit root): difference it %s.", times)
	case MeanTrend:
		add("The mean follows a straight line (slope %s per observation%s), around which the series is stationary: remove the trend rather than difference.",
			number(r.TrendSlope), scaleNote(r))
	case MeanLevelShift:
		add("The mean jumps once, at observation %d, by %s%s (%s standard deviations of the noise): remove the shift rather than difference.",
			r.ShiftIndex+1, number(r.ShiftSize), scaleNote(r), number(r.Break.SizeSD))
	}
	switch r.SeasonalKind {
	case SeasonalFixed:
		add("A fixed pattern repeats every %d observations: subtract its seasonal means.", r.Period)
	case SeasonalDrifting:
		if r.fixedFailed {
			add("The pattern that repeats every %d observations changes too much for fixed seasonal means to remove it: take a seasonal difference.", r.Period)
		} else {
			add("The pattern that repeats every %d observations drifts (a seasonal unit root): take a seasonal difference.", r.Period)
		}
	}
	if r.SecondPeriod > 0 {
		if r.SecondPeriodHandled {
			add("A second cycle of %d observations is there too; the recipe works at that period, which removes both.", r.SecondPeriod)
		} else {
			add("A second cycle of %d observations remains after the recipe, which does not remove it: model it separately.", r.SecondPeriod)
		}
	}
	switch r.SpreadCause {
	case SpreadLevel:
		if !math.IsNaN(r.BoxCoxLambda) {
			add("The spread grows with the level: a Box-Cox transform with λ = %.2f%s stabilises it.", r.BoxCoxLambda, lambdaNote(r.BoxCoxLambda))
		} else {
			add("The spread grows with the level, but the series has zero or negative values, so no power transform applies.")
		}
	case SpreadTime:
		add("The spread changes over time while the level does not explain it: no power transform fixes that; model the changing variance, or use a stretch where it is stable.")
	}
	if r.Demand.Intermittent() {
		add("%.0f%% of the values are zero (%s demand): ARMA-type models describe such series poorly; use a method made for intermittent demand, and no power transform.",
			100*r.Demand.ZeroShare, r.Demand.Class)
	}
	if n := len(r.Outliers); n > 0 {
		plural := "s were"
		if n == 1 {
			plural = " was"
		}
		add("%d isolated outlier%s set aside for the tests.", n, plural)
	}
	if r.extremes > 0 {
		add("%d values lie far from their neighbours, too many to be isolated outliers: the distribution is heavy-tailed or skewed, and they were kept.", r.extremes)
	}
	if r.OverDifferenced {
		add("The transformed series has a strongly negative autocorrelation at its differencing lag: it may be over-differenced.")
	}
	if len(s) == 0 {
		add("Mean, spread and seasonal pattern are stable: the series can be modelled as it is.")
	}
	if left := leftToSay(r); len(left) > 0 {
		add("After the recipe the series still fails on %s.", strings.Join(left, " and "))
	}
	return strings.Join(s, " ")
}

// leftToSay lists what the recipe leaves that the sentences above have not
// already explained (a spread that changes over time, a second period not
// handled).
func leftToSay(r *StationarityResult) []string {
	var out []string
	for _, v := range r.LeftViolations {
		switch {
		case v == ViolationSpread && r.SpreadCause == SpreadTime:
		case v == ViolationSeasonal && r.SecondPeriod > 0 && !r.SecondPeriodHandled:
		default:
			out = append(out, string(v))
		}
	}
	return out
}

// scaleNote says on which scale a size is given when a Box-Cox transform
// comes first.
func scaleNote(r *StationarityResult) string {
	if math.IsNaN(r.BoxCoxLambda) {
		return ""
	}
	return " on the Box-Cox scale"
}

// lambdaNote names the familiar transform near λ.
func lambdaNote(l float64) string {
	switch {
	case math.Abs(l) < 0.1:
		return " (about a logarithm)"
	case math.Abs(l-0.5) < 0.1:
		return " (about a square root)"
	}
	return ""
}

// number formats a value with three significant digits.
func number(v float64) string {
	return fmt.Sprintf("%.3g", v)
}

// tooLargeReason and notComputedReason say why a series of finite values
// is non_finite.
const (
	tooLargeReason    = "Values too large to compute with: the sum of their squares overflows double precision (values beyond about 1e150): rescale the series."
	notComputedReason = "A number the verdict needs could not be computed (it overflowed or is not a number), so the series is not judged."
)

// StatusReason explains a status that leaves a series unjudged.
func StatusReason(s stats.Status) string {
	switch s {
	case stats.StatusTooShort:
		return "Too short to judge: the tests need at least 16 observations (more for a seasonal period)."
	case stats.StatusConstant:
		return "Constant: every value is the same, so there is nothing to test."
	case stats.StatusNonFinite:
		return "Holds missing or infinite values: fill them (diagnose's fill option) or leave them out."
	case stats.StatusSingular:
		return "The test regressions fit exactly (extreme magnitudes or a degenerate pattern): not judged."
	case stats.StatusNonPositive:
		return "A transform that needs positive values met a zero or negative one."
	case stats.StatusTooSparse:
		return "Too sparse to fill: its time points span more than ten steps of its usual step per observation, so filling would invent most of the series; not judged."
	}
	return ""
}
