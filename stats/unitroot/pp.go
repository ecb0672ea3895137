package unitroot

import (
	"math"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// PPOptions configure the Phillips-Perron test. The zero value fits a
// constant and uses the bandwidth SchwertShortLag(len(x)).
type PPOptions struct {
	Deterministic Deterministic
	// Bandwidth of the Bartlett long-run variance; nil means
	// floor(4·(T/100)^(1/4)).
	Bandwidth *int
}

// PPResult adds the normalised-bias statistic Z(α) to the Z(τ) result.
type PPResult struct {
	UnitRootResult
	// ZAlpha is Z(α), the normalised-bias form (no p-value is computed for it).
	ZAlpha float64
}

// PhillipsPerron performs the Phillips & Perron (1988) test of the null
// hypothesis that x has a unit root. It fits
//
//	y_t = [α + β·t] + ρ·y_{t-1} + u_t,   t = 2..T (n = T-1 observations),
//
// and corrects the Dickey-Fuller statistics for serial correlation in u
// non-parametrically: with γ_0 = Σû²/n, s² = Σû²/(n-k), λ² the Bartlett
// long-run variance of û (LongRunVariance) and σ̂ the standard error of ρ̂,
//
//	Z(τ) = sqrt(γ_0/λ²)·t_ρ - f·(λ² - γ_0)·n·σ̂ / (2·λ·s),
//	Z(α) = n·(ρ̂ - 1) - f²·n²·σ̂²·(λ² - γ_0) / (2·s²),
//
// where f = 1 with a constant (or none) and f = n/√(n²-1) with a trend, the
// paper's closed form through the moment matrix's determinant.
//
// Z(τ) has the Dickey-Fuller τ distribution, so its p-value and critical
// values are MacKinnon's as for ADF (beyond the ends of MacKinnon's fits the
// p-value is marked as a bound, see mackinnonPValue).
func PhillipsPerron(x []float64, opts PPOptions) (PPResult, error) {
	d, err := opts.Deterministic.normalize()
	if err != nil {
		return PPResult{}, err
	}
	if opts.Bandwidth != nil && *opts.Bandwidth < 0 {
		return PPResult{}, numeric.Errorf("pp: the bandwidth must not be negative, got %d", *opts.Bandwidth)
	}
	fail := func(s stats.Status) (PPResult, error) {
		return PPResult{UnitRootResult: failed("pp", d, NullUnitRoot, s), ZAlpha: math.NaN()}, nil
	}
	if s := stats.CheckFinite(x); s != stats.StatusOK {
		return fail(s)
	}
	T := len(x)
	k := d.terms() + 1
	if T-1 < k+3 {
		return fail(stats.StatusTooShort)
	}
	if numeric.IsConstant(x) {
		return fail(stats.StatusConstant)
	}
	l := SchwertShortLag(T)
	if opts.Bandwidth != nil {
		l = *opts.Bandwidth
		if l >= T-1 {
			return fail(stats.StatusTooShort)
		}
	}
	xs := numeric.Scaled(x)
	n := T - 1
	cols := append(d.columns(n), append([]float64(nil), xs[:n]...))
	y := append([]float64(nil), xs[1:]...)
	var ls numeric.NestedLS
	ls.Factor(cols, y)
	if ls.Rank < k {
		return fail(stats.StatusSingular)
	}
	rho := ls.CoefLast(k)
	se := ls.SELast(k)
	ssr := ls.SSR(k)
	// Residuals: the Householder-transformed response's tail holds them only
	// up to rotation, so recompute them from ρ̂ (the deterministic part by
	// least squares on y_t - ρ̂·y_{t-1}, which gives the same fit).
	u := residuals(xs, d, rho)
	gamma0 := ssr / float64(n)
	s := math.Sqrt(ssr / float64(n-k))
	lambda2 := LongRunVariance(u, l)
	if !(lambda2 > 0) || !(s > 0) {
		return fail(stats.StatusSingular)
	}
	lambda := math.Sqrt(lambda2)
	tRho := (rho - 1) / se
	nf := float64(n)
	// With a trend, Phillips & Perron (1988) write n·σ̂/s through the
	// determinant D of the regressors' moment matrix as n³/(4·√3·√D), which
	// is the exact OLS value times n/√(n²-1); plumb uses the paper's form, as
	// r-cran-tseries does (agreement 1e-11, TestPPAgainstTseries).
	f := 1.0
	if d == DeterministicLevelAndSlope {
		f = nf / math.Sqrt(nf*nf-1)
	}
	zTau := math.Sqrt(gamma0/lambda2)*tRho - f*(lambda2-gamma0)*nf*se/(2*lambda*s)
	zAlpha := nf*(rho-1) - f*f*nf*nf*se*se*(lambda2-gamma0)/(2*s*s)
	p, bound := mackinnonPValue(zTau, d)
	return PPResult{
		UnitRootResult: UnitRootResult{
			Method: "pp", Deterministic: d, NullHypothesis: NullUnitRoot, Status: stats.StatusOK,
			Statistic: zTau, PValue: p, PValueBound: bound,
			CriticalValues: MacKinnonCritical(d, n), Lags: l, Observations: n,
		},
		ZAlpha: zAlpha,
	}, nil
}

// residuals returns y_t - fitted for the Phillips-Perron regression, the
// deterministic coefficients recovered by least squares on y_t - ρ·y_{t-1}.
func residuals(xs []float64, d Deterministic, rho float64) []float64 {
	n := len(xs) - 1
	w := make([]float64, n)
	for i := range w {
		w[i] = xs[i+1] - rho*xs[i]
	}
	if d == DeterministicNone {
		return w
	}
	return detrend(w, d)
}
