package unitroot

import (
	"fmt"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// Deterministic names the deterministic terms in a test regression.
type Deterministic string

const (
	// DeterministicNone fits no intercept: the series is assumed to have mean zero.
	DeterministicNone Deterministic = "none"
	// DeterministicLevel fits an intercept, a level the series reverts to
	// (the default).
	DeterministicLevel Deterministic = "level"
	// DeterministicLevelAndSlope fits an intercept and a linear time trend:
	// a straight line, with its level and its slope, the series reverts to.
	DeterministicLevelAndSlope Deterministic = "level_and_slope"
)

// normalize returns the default for the zero value and checks the rest.
func (d Deterministic) normalize() (Deterministic, error) {
	switch d {
	case "":
		return DeterministicLevel, nil
	case DeterministicNone, DeterministicLevel, DeterministicLevelAndSlope:
		return d, nil
	}
	return "", fmt.Errorf("stats: unknown deterministic terms %q: use none, level or level_and_slope", string(d))
}

// terms is the number of deterministic columns.
func (d Deterministic) terms() int {
	switch d {
	case DeterministicNone:
		return 0
	case DeterministicLevelAndSlope:
		return 2
	}
	return 1
}

// columns returns the deterministic regressors for n observations: a
// column of ones, then (with a trend) the time index scaled to (0, 1],
// which gives the same fit as 1..n with better conditioning.
func (d Deterministic) columns(n int) [][]float64 {
	k := d.terms()
	out := make([][]float64, k)
	backing := make([]float64, k*n)
	for j := range out {
		out[j] = backing[j*n : (j+1)*n : (j+1)*n]
		for i := range out[j] {
			if j == 0 {
				out[j][i] = 1
			} else {
				out[j][i] = float64(i+1) / float64(n)
			}
		}
	}
	return out
}

// LagRule says how a test chooses its number of lagged differences.
type LagRule string

const (
	// LagAIC chooses the lag that minimises Akaike's information criterion
	// (the default).
	LagAIC LagRule = "aic"
	// LagBIC minimises Schwarz's Bayesian information criterion.
	LagBIC LagRule = "bic"
	// LagDropInsignificant is the general-to-specific rule of Ng & Perron
	// (1995): start at the maximum lag and drop the last lag while its |t|
	// is below 1.6448536 (the 10% two-sided normal critical value).
	LagDropInsignificant LagRule = "drop_insignificant"
	// LagGiven uses exactly the lag given as the maximum.
	LagGiven LagRule = "given"
)

// Normalize returns the rule r names, LagAIC for the zero value, or an
// error for a name that is not a lag rule.
func (r LagRule) Normalize() (LagRule, error) {
	switch r {
	case "":
		return LagAIC, nil
	case LagAIC, LagBIC, LagDropInsignificant, LagGiven:
		return r, nil
	}
	return "", fmt.Errorf("stats: unknown lag rule %q: use aic, bic, drop_insignificant or given", string(r))
}

// SchwertMaxLag is Schwert's (1989) rule for the largest lag worth trying in
// a unit-root regression on n observations: floor(12·(n/100)^(1/4)).
func SchwertMaxLag(n int) int {
	return int(12 * pow4(float64(n)/100))
}

// SchwertShortLag is the short version of Schwert's rule, floor(4·(n/100)^(1/4)),
// the usual truncation lag of the Phillips-Perron long-run variance.
func SchwertShortLag(n int) int {
	return int(4 * pow4(float64(n)/100))
}

func pow4(x float64) float64 {
	if x <= 0 {
		return 0
	}
	return numeric.Sqrt(numeric.Sqrt(x))
}

// PValueBound says how exact a p-value is.
type PValueBound string

const (
	// PValueEstimate is a p-value from an approximate distribution function.
	PValueEstimate PValueBound = "estimate"
	// PValueAtMost means the statistic lies beyond the table's most extreme
	// point: the true p-value is at most the one reported.
	PValueAtMost PValueBound = "at_most"
	// PValueAtLeast means the statistic lies short of the table's least
	// extreme point: the true p-value is at least the one reported.
	PValueAtLeast PValueBound = "at_least"
)

// Hypothesis names a test's null hypothesis.
type Hypothesis string

const (
	NullUnitRoot   Hypothesis = "unit root"
	NullStationary Hypothesis = "stationary"
)

// UnitRootResult is the outcome of a unit-root or stationarity test.
type UnitRootResult struct {
	Method        string        // "adf", "kpss", "pp" or "dfgls"
	Deterministic Deterministic // the deterministic terms fitted
	Statistic     float64
	PValue        float64
	PValueBound   PValueBound
	// CriticalValues at 1%, 5% and 10%.
	CriticalValues [3]float64
	// Lags is the number of lagged differences (ADF, DF-GLS) or the
	// long-run variance bandwidth (KPSS, PP).
	Lags int
	// Observations is the number of observations in the final regression.
	Observations   int
	NullHypothesis Hypothesis
	Status         stats.Status
}

// failed returns a result that carries only its identity and a status.
func failed(method string, d Deterministic, null Hypothesis, s stats.Status) UnitRootResult {
	nan := numeric.NaN()
	return UnitRootResult{
		Method: method, Deterministic: d, NullHypothesis: null, Status: s,
		Statistic: nan, PValue: nan, CriticalValues: [3]float64{nan, nan, nan},
	}
}
