package stats

import (
	"github.com/plumb-sql/plumb/stats/internal/numeric"
	"gonum.org/v1/gonum/stat/distuv"
)

// WhiteNoiseResult is the outcome of the Ljung-Box test.
type WhiteNoiseResult struct {
	Statistic    float64 // Q
	PValue       float64
	Lags         int // h, the number of autocorrelations summed
	DF           int // degrees of freedom, h minus fitted parameters
	Observations int
	Status       Status
}

// LjungBox performs the Ljung & Box (1978) portmanteau test of the null
// hypothesis that x is white noise (no autocorrelation up to lag h):
//
//	Q = n·(n+2)·Σ_{k=1..h} ρ_k² / (n-k),
//
// referred to a χ² distribution with h - fitted degrees of freedom, fitted
// being the number of ARMA parameters estimated when x holds residuals (0
// for raw data). h = 0 means min(10, n/5), common practice.
//
// It asks whether any autocorrelation is left, a stricter question than
// the verdict's: an AR(1) with φ = 0.5 has a steady level and spread and
// still fails it. Run it on a model's residuals, or on a transformed
// series, to see whether structure remains for a model to capture.
func LjungBox(x []float64, h, fitted int) (WhiteNoiseResult, error) {
	if h < 0 || fitted < 0 {
		return WhiteNoiseResult{}, numeric.Errorf("ljung-box: lags and fitted parameters must not be negative, got %d and %d", h, fitted)
	}
	if h > 0 && fitted >= h {
		return WhiteNoiseResult{}, numeric.Errorf("ljung-box: fitted parameters (%d) must be fewer than the lags (%d)", fitted, h)
	}
	n := len(x)
	r := WhiteNoiseResult{Observations: n}
	if h == 0 {
		h = min(10, n/5)
	}
	r.Lags, r.DF = h, h-fitted
	fail := func(s Status) (WhiteNoiseResult, error) {
		r.Statistic, r.PValue, r.Status = numeric.NaN(), numeric.NaN(), s
		return r, nil
	}
	if s := checkFinite(x); s != StatusOK {
		return fail(s)
	}
	if h < 1 || n <= h+1 || r.DF < 1 {
		return fail(StatusTooShort)
	}
	if numeric.IsConstant(x) {
		return fail(StatusConstant)
	}
	if numeric.TooLarge(x) {
		// The autocorrelations are scale-free; scaled to a largest
		// magnitude of 1 their sums of squares cannot overflow.
		x = numeric.ScaledInto(make([]float64, n), x)
	}
	rho := Autocorrelation(x, h)
	q := 0.0
	for k, v := range rho {
		q += v * v / float64(n-k-1)
	}
	q *= float64(n) * float64(n+2)
	r.Statistic = q
	r.PValue = distuv.ChiSquared{K: float64(r.DF)}.Survival(q)
	r.Status = StatusOK
	return r, nil
}
