package unitroot

import (
	"math"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
	"gonum.org/v1/gonum/stat/distuv"
)

// DFGLSOptions configure the DF-GLS test. The zero value fits a constant and
// chooses the lag by AIC up to Schwert's maximum, as ADFOptions does.
type DFGLSOptions struct {
	// Deterministic is level (the default) or level_and_slope; none is an error.
	Deterministic Deterministic
	LagRule       LagRule
	MaxLag        *int
}

// ersTrend is Elliott, Rothenberg & Stock (1996), Table 1, the DF-GLS τ
// critical values with a linear trend at 1, 5 and 10% for T = 50, 100, 200
// and ∞, as r-cran-urca 1.3-3's ur.ers reports them (from memory, confirmed
// against urca in testdata/reference/unit_root_r.csv).
var ersTrend = []struct {
	T    float64
	crit [3]float64
}{
	{50, [3]float64{-3.77, -3.19, -2.89}},
	{100, [3]float64{-3.58, -3.03, -2.74}},
	{200, [3]float64{-3.46, -2.93, -2.64}},
	{math.Inf(1), [3]float64{-3.48, -2.89, -2.57}},
}

// DFGLS performs the DF-GLS test of Elliott, Rothenberg & Stock (1996) of
// the null hypothesis that x has a unit root. The series is first detrended
// by GLS against the local alternative ā = 1 + c̄/T (c̄ = -7 with a constant,
// -13.5 with a trend): β̂ regresses (y_1, y_2 - ā·y_1, ..., y_T - ā·y_{T-1})
// on the same quasi-differences of the deterministic terms z_t, and
// ỹ = y - z·β̂. The statistic is the ADF t-statistic of ỹ with no
// deterministic terms and lags chosen as in ADF.
//
// With a constant the statistic has the Dickey-Fuller distribution without
// deterministic terms (ERS 1996), so p-value and critical values are
// MacKinnon's for "none". With a trend the critical values come from ERS
// Table 1 (the row for 50 below T = 50, 100 below 100, 200 up to 200, ∞
// beyond, as r-cran-urca 1.3-3 picks it), and the p-value from plumb's own
// simulation of the statistic's null distribution (dfglsTrendPValue), so
// that it is a number a false-discovery rule can use rather than an
// interpolation between three table points.
func DFGLS(x []float64, opts DFGLSOptions) (UnitRootResult, error) {
	d, err := opts.Deterministic.normalize()
	if err != nil {
		return UnitRootResult{}, err
	}
	if d == DeterministicNone {
		return UnitRootResult{}, numeric.Errorf("dfgls: deterministic terms must be level or level_and_slope, got none")
	}
	fail := func(s stats.Status) (UnitRootResult, error) { return failed("dfgls", d, NullUnitRoot, s), nil }
	if s := stats.CheckFinite(x); s != stats.StatusOK {
		return fail(s)
	}
	T := len(x)
	if T < 8 {
		return fail(stats.StatusTooShort)
	}
	if numeric.IsConstant(x) {
		return fail(stats.StatusConstant)
	}
	detrended := glsDetrend(numeric.Scaled(x), d)
	maxLag := opts.MaxLag
	if maxLag == nil {
		m := min(SchwertMaxLag(T), T/2-1)
		maxLag = &m
	}
	r, err := ADF(detrended, ADFOptions{Deterministic: DeterministicNone, LagRule: opts.LagRule, MaxLag: maxLag})
	if err != nil {
		return UnitRootResult{}, err
	}
	r.Method, r.Deterministic = "dfgls", d
	if r.Status != stats.StatusOK {
		return r, nil
	}
	if d == DeterministicLevelAndSlope {
		// The row as urca picks it: below 50, below 100, up to 200, beyond.
		row := 3
		switch {
		case T < 50:
			row = 0
		case T < 100:
			row = 1
		case T <= 200:
			row = 2
		}
		crit := ersTrend[row].crit
		r.CriticalValues = crit
		r.PValue, r.PValueBound = dfglsTrendPValue(r.Statistic, T)
	}
	return r, nil
}

// dfglsTrendPValue returns P(τ < stat) under the null hypothesis for the
// DF-GLS statistic with a trend on T observations, from the response
// surface dfglsTrendQuantiles (testdata/dfgls/simulate.go): the quantiles
// at T (at 50 for shorter series, the shortest length simulated) and
// Φ⁻¹(p) interpolated linearly in τ between them. Below the smallest
// tabulated probability, 1e-4, Φ⁻¹(p) continues along the least-squares
// line through the quantiles at p ≤ 0.01 (the normal-quantile tail form
// MacKinnon (1994) fits to his simulations), an extrapolation; the p-value
// is floored at 1e-300 with PValueAtMost. Above the largest, 0.9999, it is
// 0.9999 with PValueAtLeast.
func dfglsTrendPValue(stat float64, T int) (float64, PValueBound) {
	if math.IsNaN(stat) {
		return math.NaN(), PValueEstimate
	}
	inv := 1 / float64(max(T, 50))
	n := len(dfglsTrendQuantiles)
	quantile := func(i int) float64 {
		c := dfglsTrendQuantiles[i].c
		return c[0] + inv*(c[1]+inv*c[2])
	}
	z := func(i int) float64 { return distuv.UnitNormal.Quantile(dfglsTrendQuantiles[i].p) }
	if stat >= quantile(n-1) {
		return dfglsTrendQuantiles[n-1].p, PValueAtLeast
	}
	if stat < quantile(0) {
		// Least squares of Φ⁻¹(p) on c over the lower tail.
		var sc, sz, scc, scz, k float64
		for i := 0; i < n && dfglsTrendQuantiles[i].p <= 0.01; i++ {
			c, zi := quantile(i), z(i)
			sc, sz, scc, scz, k = sc+c, sz+zi, scc+c*c, scz+c*zi, k+1
		}
		slope := (k*scz - sc*sz) / (k*scc - sc*sc)
		p := distuv.UnitNormal.CDF(sz/k + slope*(stat-sc/k))
		if !(p >= 1e-300) {
			return 1e-300, PValueAtMost
		}
		return p, PValueEstimate
	}
	i := 1
	for stat >= quantile(i) {
		i++
	}
	lo, hi := quantile(i-1), quantile(i)
	f := (stat - lo) / (hi - lo)
	return distuv.UnitNormal.CDF(z(i-1) + f*(z(i)-z(i-1))), PValueEstimate
}

// glsDetrend returns y - z·β̂ with β̂ from the quasi-differenced regression
// of Elliott, Rothenberg & Stock (1996).
func glsDetrend(y []float64, d Deterministic) []float64 {
	T := len(y)
	cbar := -7.0
	if d == DeterministicLevelAndSlope {
		cbar = -13.5
	}
	a := 1 + cbar/float64(T)
	k := d.terms()
	z := func(t, j int) float64 { // t is 0-based; the trend runs 1..T
		if j == 0 {
			return 1
		}
		return float64(t+1) / float64(T)
	}
	cols := make([][]float64, k)
	for j := range cols {
		cols[j] = make([]float64, T)
		cols[j][0] = z(0, j)
		for t := 1; t < T; t++ {
			cols[j][t] = z(t, j) - a*z(t-1, j)
		}
	}
	ya := make([]float64, T)
	ya[0] = y[0]
	for t := 1; t < T; t++ {
		ya[t] = y[t] - a*y[t-1]
	}
	beta := leastSquares(cols, ya)
	out := make([]float64, T)
	for t := range out {
		out[t] = y[t]
		for j := range beta {
			out[t] -= beta[j] * z(t, j)
		}
	}
	return out
}

// leastSquares returns the coefficients of y on the columns (one or two,
// full rank) by the normal equations solved in closed form.
func leastSquares(cols [][]float64, y []float64) []float64 {
	dot := func(a, b []float64) float64 {
		s := 0.0
		for i := range a {
			s += a[i] * b[i]
		}
		return s
	}
	if len(cols) == 1 {
		return []float64{dot(cols[0], y) / dot(cols[0], cols[0])}
	}
	a, b, c := dot(cols[0], cols[0]), dot(cols[0], cols[1]), dot(cols[1], cols[1])
	p, q := dot(cols[0], y), dot(cols[1], y)
	det := a*c - b*b
	return []float64{(c*p - b*q) / det, (a*q - b*p) / det}
}
