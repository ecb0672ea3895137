package stats

import "gonum.org/v1/gonum/stat/distuv"

// WhiteNoiseResult is the outcome of the Ljung-Box test.
type WhiteNoiseResult struct {
	Statistic float64 // Q
	PValue    float64
	Lags      int // h, the number of autocorrelations summed
	DF        int // degrees of freedom, h minus fitted parameters
	NObs      int
	Status    Status
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
// White noise is stationary, but a stationary series need not be white
// noise: an AR(1) with φ = 0.5 is stationary and fails this test. Use it on
// a transformed series or on residuals to see whether structure is left.
func LjungBox(x []float64, h, fitted int) (WhiteNoiseResult, error) {
	if h < 0 || fitted < 0 {
		return WhiteNoiseResult{}, errorf("ljung-box: lags and fitted parameters must not be negative, got %d and %d", h, fitted)
	}
	if h > 0 && fitted >= h {
		return WhiteNoiseResult{}, errorf("ljung-box: fitted parameters (%d) must be fewer than the lags (%d)", fitted, h)
	}
	n := len(x)
	r := WhiteNoiseResult{NObs: n}
	if h == 0 {
		h = min(10, n/5)
	}
	r.Lags, r.DF = h, h-fitted
	fail := func(s Status) (WhiteNoiseResult, error) {
		r.Statistic, r.PValue, r.Status = nan(), nan(), s
		return r, nil
	}
	if s := checkFinite(x); s != StatusOK {
		return fail(s)
	}
	if h < 1 || n <= h+1 || r.DF < 1 {
		return fail(StatusTooShort)
	}
	if isConstant(x) {
		return fail(StatusConstant)
	}
	if tooLarge(x) {
		// The autocorrelations are scale-free; scaled to a largest
		// magnitude of 1 their sums of squares cannot overflow.
		x = scaledInto(make([]float64, n), x)
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
