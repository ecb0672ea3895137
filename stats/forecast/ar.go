package forecast

import (
	"math"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
	"github.com/plumb-sql/plumb/stats/unitroot"
)

// ARModel is an autoregressive model with a constant,
//
//	w_t = c + φ_1·w_{t-1} + ... + φ_p·w_{t-p} + e_t,   e_t ~ N(0, σ²),
//
// fitted by ordinary least squares conditional on the first p values of w
// (the conditional maximum-likelihood estimate; Box, Jenkins & Reinsel,
// Time Series Analysis, §7.1). With these conventions it equals
// python3-statsmodels 0.13.5's AutoReg(w, lags=p, trend="c")
// (stats/forecast/forecast_reference_test.go).
type ARModel struct {
	// Order is p, the number of lagged values.
	Order int
	// Constant is c, the intercept of the regression, not the mean: the
	// process mean is c / (1 - Σ φ_i). In SARIMAX terms it is the
	// intercept of trend="c", which enters the equation of the differenced
	// series: φ(B)(1-B)^d(1-B^s)^D z_t = c + e_t.
	Constant float64
	// Coefficients holds φ_1..φ_p.
	Coefficients []float64
	// Variance is σ² = SSR / Observations, the residual sum of squares over the
	// number of observations in the regression (the maximum-likelihood
	// divisor, as AutoReg's sigma2; no degrees-of-freedom correction).
	Variance float64
	// Residuals holds e_t for t = p+1..n, Observations values.
	Residuals []float64
	// Observations is the number of observations in the regression, n - p.
	Observations int
	// AIC and BIC of the model on its own sample, from the Gaussian
	// conditional log-likelihood L = -Observations/2·(log 2π + log σ² + 1):
	// AIC = -2L + 2k, BIC = -2L + k·log Observations, with k = p + 2 (the constant,
	// p coefficients and σ²).
	AIC, BIC float64
	// MaxOrder is the largest order compared when the order was chosen
	// (FitAR); it equals Order for FitAROrder.
	MaxOrder int
	// Status is ok, or why the model is missing (its numbers are NaN):
	// too_short, constant, non_finite, singular (some order fits w
	// exactly, or σ² overflows or underflows float64 for a series of
	// extreme magnitude).
	Status stats.Status
}

// AROptions says how FitAR chooses the order.
type AROptions struct {
	// MaxOrder is the largest order compared; 0 means DefaultMaxAROrder.
	// It is kept to at most (n-1)/3 for n values of w, so that the common
	// sample holds about twice the widest model's coefficients.
	MaxOrder int
	// Rule is LagAIC (the default) or LagBIC.
	Rule unitroot.LagRule
	// Period is the seasonal period of the series (0 or 1 for none); it
	// only enters DefaultMaxAROrder.
	Period int
}

// MinARLength is the fewest values of w FitAR accepts: with four, orders 0
// and 1 can still be compared on a common sample.
const MinARLength = 4

// DefaultMaxAROrder is the largest order FitAR compares by default for n
// values: Schwert's (1989) floor(12·(n/100)^(1/4)), raised to period + 1
// for a seasonal series (period ≥ 2) so that the seasonal lag is among the
// candidates (plumb's choice), and kept to at most (n-1)/3.
func DefaultMaxAROrder(n, period int) int {
	p := unitroot.SchwertMaxLag(n)
	if period >= 2 && period+1 > p {
		p = period + 1
	}
	return min(p, max(n-1, 0)/3)
}

// FitAR chooses the order of an autoregressive model with a constant by
// an information criterion and fits it. Every order 0..P (P the maximum) is
// fitted on one common sample, w_{P+1}..w_n, so that the criteria compare
// like with like (as python3-statsmodels 0.13.5's ar_select_order(w,
// maxlag=P, trend="c") does; AIC and BIC as ARModel states them, on that
// sample); the chosen order is then refitted on its own longest sample,
// w_{p+1}..w_n. AIC is Akaike (1974); BIC is Schwarz (1978).
//
// The search factors the cross-product matrix of the widest design once
// (Cholesky); every nested model's residual sum of squares follows from that
// one factor (see numeric.NestedLS). The cross products are built from lagged dot
// products, since every column is a shift of w.
func FitAR(w []float64, opts AROptions) (ARModel, error) {
	rule, err := opts.Rule.Normalize()
	if err != nil {
		return ARModel{}, err
	}
	if rule != unitroot.LagAIC && rule != unitroot.LagBIC {
		return ARModel{}, numeric.Errorf("autoregression: the order is chosen by aic or bic, not %q", string(rule))
	}
	if opts.MaxOrder < 0 {
		return ARModel{}, numeric.Errorf("autoregression: the maximum order must not be negative, got %d", opts.MaxOrder)
	}
	n := len(w)
	if s := arInputStatus(w, MinARLength); s != stats.StatusOK {
		return failedAR(s, 0), nil
	}
	maxOrder := opts.MaxOrder
	if maxOrder == 0 {
		maxOrder = DefaultMaxAROrder(n, opts.Period)
	}
	maxOrder = min(maxOrder, (n-1)/3)
	d := newARDesign(w)
	defer d.release()
	criteria, status := d.criteria(maxOrder, rule)
	if status != stats.StatusOK {
		return failedAR(status, maxOrder), nil
	}
	best := 0
	for k, v := range criteria {
		if v < criteria[best] {
			best = k
		}
	}
	m := d.fit(best)
	m.MaxOrder = maxOrder
	return m, nil
}

// FitAROrder fits the autoregressive model of order p with a constant on
// w_{p+1}..w_n, as FitAR refits its chosen order. It needs n - p ≥ p + 2
// values (status too_short otherwise).
func FitAROrder(w []float64, p int) (ARModel, error) {
	if p < 0 {
		return ARModel{}, numeric.Errorf("autoregression: the order must not be negative, got %d", p)
	}
	if s := arInputStatus(w, 2*p+2); s != stats.StatusOK {
		return failedAR(s, p), nil
	}
	d := newARDesign(w)
	defer d.release()
	return d.fit(p), nil
}

// arInputStatus checks w before any fit: finite, at least minLen values,
// not constant.
func arInputStatus(w []float64, minLen int) stats.Status {
	if s := stats.CheckFinite(w); s != stats.StatusOK {
		return s
	}
	if len(w) < minLen || len(w) < 2 {
		return stats.StatusTooShort
	}
	if numeric.IsConstant(w) {
		return stats.StatusConstant
	}
	return stats.StatusOK
}

// failedAR is the model reported when none could be fitted.
func failedAR(s stats.Status, order int) ARModel {
	return ARModel{
		Order: order, MaxOrder: order, Constant: numeric.NaN(), Variance: numeric.NaN(),
		AIC: numeric.NaN(), BIC: numeric.NaN(), Status: s,
	}
}

// arDesign holds w centred on its mean and divided by the largest
// remaining magnitude. The fit is invariant to both (only the constant
// changes, and is mapped back), and the column of ones is then nearly
// orthogonal to the lagged columns, which keeps the cross-product matrix
// well conditioned for a series far from zero.
type arDesign struct {
	w           []float64 // (w_t - mean) / scale
	mean, scale float64
}

func newARDesign(w []float64) *arDesign {
	mean := numeric.Sum(w) / float64(len(w))
	ws := numeric.GetScratch(len(w))
	for i, v := range w {
		ws[i] = v - mean
	}
	scale := numeric.MaxAbs(ws)
	for i := range ws {
		ws[i] /= scale
	}
	return &arDesign{w: ws, mean: mean, scale: scale}
}

// release returns the design's scratch slice; d must not be used again.
func (d *arDesign) release() {
	numeric.PutScratch(d.w)
	d.w = nil
}

// crossMatrix returns the lower triangle (row-major, (p+2)×(p+2)) of the
// cross-product matrix of [1, w_{t-1}, ..., w_{t-p}, w_t] over t =
// start..n-1, and the number of observations. The lagged columns and the
// response are shifts of one series, so with S(i, j) = Σ_t w_{t-i}·w_{t-j}
// the products follow from the row S(0, ·) (lagged dot products) by
//
//	S(i+1, j+1) = S(i, j) + w_{s-1-i}·w_{s-1-j} - w_{s+N-1-i}·w_{s+N-1-j}
//
// (s = start, N the sample size): about (p+3)·N work instead of N·p²/2.
// Index 0 is the constant, 1..p the lags, p+1 the response (lag 0).
func (d *arDesign) crossMatrix(p, start int) ([]float64, int) {
	w := d.w
	N := len(w) - start
	m := p + 2
	mat := make([]float64, m*m)
	at := func(lag int) int { // matrix index of the column lagged lag steps
		if lag == 0 {
			return p + 1
		}
		return lag
	}
	set := func(r, c int, v float64) {
		if r < c {
			r, c = c, r
		}
		mat[r*m+c] = v
	}
	set(0, 0, float64(N))
	windowSum := numeric.Sum(w[start:])
	for lag := 0; lag <= p; lag++ {
		if lag > 0 { // the window moves back one step
			windowSum += w[start-lag] - w[start-lag+N]
		}
		set(at(lag), 0, windowSum)
	}
	band := make([]float64, p+1)
	numeric.LagDots(w[start:], w[start-p:], band)
	for gap := 0; gap <= p; gap++ { // pairs (i, i+gap)
		v := band[gap]
		set(at(0), at(gap), v)
		for i := 0; i+gap < p; i++ {
			j := i + gap
			v += w[start-1-i]*w[start-1-j] - w[start+N-1-i]*w[start+N-1-j]
			set(at(i+1), at(j+1), v)
		}
	}
	return mat, N
}

// criteria returns the information criterion of every order 0..maxOrder on
// the common sample t = maxOrder..n-1. Orders beyond the design's numerical
// rank are not candidates; an order whose residuals vanish makes the whole
// search singular.
func (d *arDesign) criteria(maxOrder int, rule unitroot.LagRule) ([]float64, stats.Status) {
	mat, N := d.crossMatrix(maxOrder, maxOrder)
	var ls numeric.NestedLS
	if ls.FactorCross(mat, maxOrder+1, N) < nearSingularPivot {
		cols, y := d.columns(maxOrder, maxOrder)
		ls.Factor(cols, y)
	}
	nf := float64(N)
	logScale2 := 2 * math.Log(d.scale)
	var out []float64
	for k := 0; k <= maxOrder && k+1 <= ls.Rank; k++ {
		ssr := ls.SSR(k + 1)
		if ssr <= 1e-20*nf {
			return nil, stats.StatusSingular
		}
		params := float64(k + 2)
		minus2L := nf * (math.Log(2*math.Pi) + math.Log(ssr/nf) + logScale2 + 1)
		penalty := 2 * params
		if rule == unitroot.LagBIC {
			penalty = params * math.Log(nf)
		}
		out = append(out, minus2L+penalty)
	}
	if len(out) == 0 {
		return nil, stats.StatusSingular
	}
	return out, stats.StatusOK
}

// fit fits order p on the sample t = p..n-1. The coefficients come from
// the Cholesky factor of the cross products; when its smallest pivot shows
// the design ill-conditioned (see nearSingularPivot), from a Householder QR
// of the design itself.
func (d *arDesign) fit(p int) ARModel {
	beta, ok := d.solveNormal(p)
	if !ok {
		if beta, ok = d.solveQR(p); !ok {
			return failedAR(stats.StatusSingular, p)
		}
	}
	w := d.w
	N := len(w) - p
	resid := make([]float64, N)
	ssr := 0.0
	for t := p; t < len(w); t++ {
		e := w[t] - beta[0]
		for i := 1; i <= p; i++ {
			e -= beta[i] * w[t-i]
		}
		resid[t-p] = e * d.scale
		ssr += e * e
	}
	nf := float64(N)
	if ssr <= 1e-20*nf {
		return failedAR(stats.StatusSingular, p)
	}
	m := ARModel{Order: p, MaxOrder: p, Observations: N, Residuals: resid, Status: stats.StatusOK}
	m.Coefficients = append([]float64{}, beta[1:]...)
	sumPhi := 0.0
	for _, v := range m.Coefficients {
		sumPhi += v
	}
	m.Constant = beta[0]*d.scale + d.mean*(1-sumPhi)
	m.Variance = ssr / nf * d.scale * d.scale
	if m.Variance == 0 || math.IsInf(m.Variance, 0) {
		// σ² lies beyond float64's range (a series near 1e±200 or beyond).
		return failedAR(stats.StatusSingular, p)
	}
	minus2L := nf * (math.Log(2*math.Pi) + math.Log(m.Variance) + 1)
	k := float64(p + 2)
	m.AIC = minus2L + 2*k
	m.BIC = minus2L + k*math.Log(nf)
	return m
}

// solveNormal solves the normal equations of order p through a Cholesky
// factor of the column-scaled cross products (numeric.NestedLS.FactorCross, which
// leaves the factor L in mat): Lᵀβ = z in scaled coordinates, then each
// coefficient is rescaled by its column's norm.
func (d *arDesign) solveNormal(p int) ([]float64, bool) {
	mat, N := d.crossMatrix(p, p)
	m := p + 2
	norms := make([]float64, m)
	for j := range norms {
		norms[j] = math.Sqrt(mat[j*m+j])
		if norms[j] == 0 {
			norms[j] = 1
		}
	}
	var ls numeric.NestedLS
	if ls.FactorCross(mat, p+1, N) < nearSingularPivot || ls.Rank < p+1 {
		return nil, false
	}
	k := p + 1 // regressors
	beta := make([]float64, k)
	for i := k - 1; i >= 0; i-- {
		s := mat[k*m+i] // z_i, scaled
		for j := i + 1; j < k; j++ {
			s -= mat[j*m+i] * beta[j] // Lᵀ[i][j] = L[j][i]
		}
		beta[i] = s / mat[i*m+i]
	}
	for i := range beta {
		beta[i] *= norms[k] / norms[i]
	}
	return beta, true
}

// nearSingularPivot is the smallest pivot of the column-scaled Cholesky
// factor (relative to a unit diagonal) at which the cross products are
// trusted. The normal equations' error grows with the square of the
// design's condition number, about 2e-15/pivot in the coefficients here
// (measured on a sine wave with little noise, against QR): at 1e-4 that is
// 2e-11, well inside the 1e-8 agreement with statsmodels. Below it, the
// search and the fit use a Householder QR, whose error grows with the
// condition number itself.
const nearSingularPivot = 1e-4

// columns returns the design [1, w_{t-1}, ..., w_{t-p}] and the response
// w_t over t = start..n-1, as fresh slices (NestedLS.Factor overwrites them).
func (d *arDesign) columns(p, start int) ([][]float64, []float64) {
	w := d.w
	N := len(w) - start
	cols := make([][]float64, p+1)
	cols[0] = make([]float64, N)
	for i := range cols[0] {
		cols[0][i] = 1
	}
	for lag := 1; lag <= p; lag++ {
		cols[lag] = append([]float64(nil), w[start-lag:start-lag+N]...)
	}
	return cols, append([]float64(nil), w[start:]...)
}

// solveQR fits order p by a Householder QR of the design [1, lags] and back
// substitution: R β = Qᵀy, R's upper part being what NestedLS.Factor leaves
// above the diagonal of each column.
func (d *arDesign) solveQR(p int) ([]float64, bool) {
	k := p + 1
	cols, y := d.columns(p, p)
	var ls numeric.NestedLS
	ls.Factor(cols, y)
	if ls.Rank < k {
		return nil, false
	}
	beta := make([]float64, k)
	for i := k - 1; i >= 0; i-- {
		s := ls.Z[i]
		for j := i + 1; j < k; j++ {
			s -= cols[j][i] * beta[j]
		}
		beta[i] = s / ls.Rdg[i]
	}
	return beta, true
}
