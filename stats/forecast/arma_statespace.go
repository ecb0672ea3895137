package forecast

import (
	"math"

	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// armaStateSpace is the state-space form of a zero-mean ARMA(p, q) process
//
//	x_t = φ_1·x_{t-1} + ... + φ_p·x_{t-p} + e_t + θ_1·e_{t-1} + ... + θ_q·e_{t-q}
//
// of Harvey (1989, Forecasting, Structural Time Series Models and the
// Kalman Filter, §3.3.1) and Durbin & Koopman (2012, Time Series Analysis by
// State Space Methods, §3.4): with r = max(p, q+1) and φ_i = 0 for i > p,
// θ_j = 0 for j > q,
//
//	x_t = Z·α_t,                Z = (1, 0, ..., 0),
//	α_{t+1} = T·α_t + R·e_{t+1}, T = [φ | I_{r-1} over 0ᵀ],  R = (1, θ_1, ..., θ_{r-1})ᵀ,
//
// the first column of T holding φ_1..φ_r and its superdiagonal ones. A
// multiplicative seasonal model enters through its expanded polynomials
// (expandARMA). The filter works with e_t of unit variance: σ² is
// concentrated out of the likelihood (armaFilter).
type armaStateSpace struct {
	r     int
	phi   []float64 // φ_1..φ_r, zero-padded
	theta []float64 // R: 1, θ_1..θ_{r-1}, zero-padded
}

func newARMAStateSpace(phi, theta []float64) *armaStateSpace {
	r := max(len(phi), len(theta)+1)
	ss := &armaStateSpace{r: r, phi: make([]float64, r), theta: make([]float64, r)}
	copy(ss.phi, phi)
	ss.theta[0] = 1
	copy(ss.theta[1:], theta)
	return ss
}

// expandARMA multiplies out the seasonal model's polynomials,
//
//	φ(B)·Φ(B^s) = 1 - Σ a_k B^k,   θ(B)·Θ(B^s) = 1 + Σ b_k B^k,
//
// and returns a (the full autoregressive coefficients) and b (the full
// moving-average ones), trailing zeros kept.
func expandARMA(ar, ma, sar, sma []float64, s int) (a, b []float64) {
	arPoly := lagPolynomial(ar, 1, -1)
	if len(sar) > 0 {
		arPoly = multiplyLagPolynomials(arPoly, lagPolynomial(sar, s, -1))
	}
	maPoly := lagPolynomial(ma, 1, 1)
	if len(sma) > 0 {
		maPoly = multiplyLagPolynomials(maPoly, lagPolynomial(sma, s, 1))
	}
	a = make([]float64, len(arPoly)-1)
	for i := range a {
		a[i] = -arPoly[i+1]
	}
	return a, append([]float64(nil), maPoly[1:]...)
}

// lagPolynomial returns 1 + sign·(c_1·B^s + c_2·B^{2s} + ...), lowest power
// first.
func lagPolynomial(c []float64, s int, sign float64) []float64 {
	p := make([]float64, len(c)*s+1)
	p[0] = 1
	for i, v := range c {
		p[(i+1)*s] = sign * v
	}
	return p
}

// stationaryCovariance returns P, the covariance of α_t when the process is
// stationary (unit innovation variance): the solution of the discrete
// Lyapunov equation P = T·P·Tᵀ + R·Rᵀ. It sums P = Σ_k T^k·R·Rᵀ·T'^k by
// doubling (P ← P + A·P·Aᵀ, A ← A², starting from R·Rᵀ and T; Anderson &
// Moore 1979, Optimal Filtering, §6.7), which converges in about log2 of the
// number of terms that matter. ok is false when the sum does not settle (an
// autoregression at or beyond the unit circle) or is not finite.
func (ss *armaStateSpace) stationaryCovariance() (p []float64, ok bool) {
	r := ss.r
	p = make([]float64, r*r)
	for i := 0; i < r; i++ {
		for j := 0; j < r; j++ {
			p[i*r+j] = ss.theta[i] * ss.theta[j]
		}
	}
	a := make([]float64, r*r)
	for i := 0; i < r; i++ {
		a[i*r] = ss.phi[i]
		if i+1 < r {
			a[i*r+i+1] = 1
		}
	}
	ap := make([]float64, r*r)
	apa := make([]float64, r*r)
	aa := make([]float64, r*r)
	for iter := 0; iter < 64; iter++ {
		matMul(ap, a, p, r)
		matMulTransposed(apa, ap, a, r)
		biggest, change := 0.0, 0.0
		for i := range p {
			p[i] += apa[i]
			biggest = math.Max(biggest, math.Abs(p[i]))
			change = math.Max(change, math.Abs(apa[i]))
		}
		if !(biggest < math.Inf(1)) {
			return nil, false
		}
		if change <= 1e-16*biggest {
			for i := 0; i < r; i++ { // symmetric by construction; make it exact
				for j := 0; j < i; j++ {
					v := (p[i*r+j] + p[j*r+i]) / 2
					p[i*r+j], p[j*r+i] = v, v
				}
			}
			return p, true
		}
		matMul(aa, a, a, r)
		a, aa = aa, a
	}
	return nil, false
}

// matMul sets c = a·b for r×r row-major matrices.
func matMul(c, a, b []float64, r int) {
	for i := 0; i < r; i++ {
		ci := c[i*r : i*r+r]
		for j := range ci {
			ci[j] = 0
		}
		for k := 0; k < r; k++ {
			v := a[i*r+k]
			if v == 0 {
				continue
			}
			bk := b[k*r : k*r+r]
			for j := range ci {
				ci[j] += v * bk[j]
			}
		}
	}
}

// matMulTransposed sets c = a·bᵀ for r×r row-major matrices.
func matMulTransposed(c, a, b []float64, r int) {
	for i := 0; i < r; i++ {
		for j := 0; j < r; j++ {
			s := 0.0
			for k := 0; k < r; k++ {
				s += a[i*r+k] * b[j*r+k]
			}
			c[i*r+j] = s
		}
	}
}

// armaFilterResult is what the Kalman filter leaves after the last value.
type armaFilterResult struct {
	// SumSquares is Σ v_t²/F_t and SumLogF is Σ log F_t, with v_t the
	// one-step prediction error of x_t and F_t its variance over σ².
	SumSquares, SumLogF float64
	// Residuals are v_t/sqrt(F_t), whose variance is σ², when asked for.
	Residuals []float64
	// Next and NextCov are the prediction of α_{n+1} and its covariance
	// over σ², from which forecasts continue.
	Next, NextCov []float64
	OK            bool
}

// steadyTolerance is the largest change of any element of the state
// covariance (over σ²) between two steps at which the filter treats it as
// converged and keeps the gain fixed: the steady-state shortcut (Harvey
// 1989, §3.3.4). For a stationary, invertible ARMA the predicted covariance
// converges to R·Rᵀ (F_t → 1); after that the filter costs O(r) a value
// instead of O(r²).
const steadyTolerance = 1e-13

// filter runs the Kalman filter of Harvey (1989, §3.2) over x (already
// centred on the model's mean), started from the stationary covariance, so
// that the prediction-error decomposition gives the exact Gaussian
// likelihood (Gardner, Harvey & Phillips 1980):
//
//	v_t = x_t - Z·a_t,  F_t = Z·P_t·Zᵀ,  K_t = T·P_t·Zᵀ / F_t,
//	a_{t+1} = T·a_t + K_t·v_t,  P_{t+1} = T·P_t·Tᵀ + R·Rᵀ - K_t·K_tᵀ·F_t,
//
// with a_1 = 0 and P_1 the stationary covariance. With σ² concentrated
// out, σ̂² = Σ v_t²/F_t / n and
//
//	log L = -n/2·(log 2π + 1 + log σ̂²) - ½·Σ log F_t.
func (ss *armaStateSpace) filter(x []float64, keepResiduals bool) armaFilterResult {
	var res armaFilterResult
	p, ok := ss.stationaryCovariance()
	if !ok {
		return res
	}
	r := ss.r
	phi, rr := ss.phi, ss.theta
	a := make([]float64, r)
	an := make([]float64, r)
	k := make([]float64, r)
	tp := make([]float64, r*r)
	pn := make([]float64, r*r)
	if keepResiduals {
		res.Residuals = make([]float64, len(x))
	}
	steady := false
	settled := 0
	f := 0.0
	for t, xt := range x {
		if !steady {
			f = p[0]
			if !(f > 0) || math.IsInf(f, 0) {
				return res
			}
			// tp = T·P: row i is φ_i·P[0,·] + P[i+1,·].
			for i := 0; i < r; i++ {
				for j := 0; j < r; j++ {
					v := phi[i] * p[j]
					if i+1 < r {
						v += p[(i+1)*r+j]
					}
					tp[i*r+j] = v
				}
			}
			for i := 0; i < r; i++ {
				k[i] = tp[i*r] / f
			}
			// pn = tp·Tᵀ + R·Rᵀ - K·Kᵀ·F: (tp·Tᵀ)[i,j] = tp[i,0]·φ_j + tp[i,j+1].
			for i := 0; i < r; i++ {
				for j := 0; j < r; j++ {
					v := tp[i*r]*phi[j] + rr[i]*rr[j] - k[i]*k[j]*f
					if j+1 < r {
						v += tp[i*r+j+1]
					}
					pn[i*r+j] = v
				}
			}
		}
		v := xt - a[0]
		res.SumSquares += v * v / f
		if !steady {
			res.SumLogF += math.Log(f)
		} else if t == len(x)-1 { // F has stayed fixed since the filter settled
			res.SumLogF += float64(len(x)-settled) * math.Log(f)
		}
		if keepResiduals {
			res.Residuals[t] = v / math.Sqrt(f)
		}
		for i := 0; i < r; i++ {
			w := phi[i]*a[0] + k[i]*v
			if i+1 < r {
				w += a[i+1]
			}
			an[i] = w
		}
		a, an = an, a
		if !steady {
			change := 0.0
			for i := range pn {
				change = math.Max(change, math.Abs(pn[i]-p[i]))
			}
			p, pn = pn, p
			if change < steadyTolerance {
				steady, settled = true, t+1
				f = p[0]
				// The gain for the next step from the converged P.
				for i := 0; i < r; i++ {
					v := phi[i] * p[0]
					if i+1 < r {
						v += p[(i+1)*r]
					}
					k[i] = v / f
				}
			}
		}
	}
	if !(res.SumSquares < math.Inf(1)) {
		return res
	}
	res.Next, res.NextCov, res.OK = a, p, true
	return res
}

// concentratedLogLikelihood is log L at σ̂² from a filter run over n values,
// and σ̂² itself.
func (res armaFilterResult) concentratedLogLikelihood(n int) (logL, sigma2 float64) {
	nf := float64(n)
	sigma2 = res.SumSquares / nf
	logL = -nf/2*(math.Log(2*math.Pi)+1+math.Log(sigma2)) - res.SumLogF/2
	return logL, sigma2
}

// firstColumn returns F_1 = Z·P_1·Zᵀ and G_1 = T·P_1·Zᵀ for the
// stationary covariance P_1, from the process's autocovariances γ_k and
// ψ-weights (unit innovation variance): with the state
//
//	α_t[j] = Σ_{i>j} φ_i·x_{t+j-i} + Σ_{i≥j} θ_i·e_{t+j-i}   (j ≥ 1),
//
// Cov(α_t[j], x_t) = Σ_{i>j} φ_i·γ_{i-j} + Σ_{i≥j} θ_i·ψ_{i-j}. The
// autocovariances solve the first p+1 equations γ_k - Σ_i φ_i·γ_{|k-i|} =
// Σ_{j≥k} θ_j·ψ_{j-k} and follow the recursion beyond (Brockwell & Davis
// 1991, Time Series: Theory and Methods, §3.3, second method). ok is false
// when the system is singular or γ_0 is not positive (not stationary).
func (ss *armaStateSpace) firstColumn(g []float64) (f float64, ok bool) {
	r := ss.r
	phi, theta := ss.phi, ss.theta // theta[j] = θ_j, θ_0 = 1
	p := 0
	for i := r - 1; i >= 0; i-- {
		if phi[i] != 0 {
			p = i + 1
			break
		}
	}
	psi := make([]float64, r+1)
	for j := 0; j <= r; j++ {
		v := 0.0
		if j < r {
			v = theta[j]
		}
		for i := 1; i <= min(j, p); i++ {
			v += phi[i-1] * psi[j-i]
		}
		psi[j] = v
	}
	rhs := func(k int) float64 {
		s := 0.0
		for j := k; j < r; j++ {
			s += theta[j] * psi[j-k]
		}
		return s
	}
	gamma := make([]float64, r+1)
	if p == 0 {
		for k := 0; k <= r; k++ {
			gamma[k] = rhs(k)
		}
	} else {
		// (p+1)×(p+1) system in γ_0..γ_p, Gaussian elimination with partial pivoting.
		m := p + 1
		a := make([]float64, m*(m+1))
		for k := 0; k < m; k++ {
			a[k*(m+1)+k] += 1
			for i := 1; i <= p; i++ {
				lag := k - i
				if lag < 0 {
					lag = -lag
				}
				a[k*(m+1)+lag] -= phi[i-1]
			}
			a[k*(m+1)+m] = rhs(k)
		}
		for c := 0; c < m; c++ {
			piv := c
			for rr := c + 1; rr < m; rr++ {
				if math.Abs(a[rr*(m+1)+c]) > math.Abs(a[piv*(m+1)+c]) {
					piv = rr
				}
			}
			if !(math.Abs(a[piv*(m+1)+c]) > 1e-300) {
				return 0, false
			}
			if piv != c {
				for j := 0; j <= m; j++ {
					a[c*(m+1)+j], a[piv*(m+1)+j] = a[piv*(m+1)+j], a[c*(m+1)+j]
				}
			}
			for rr := c + 1; rr < m; rr++ {
				fac := a[rr*(m+1)+c] / a[c*(m+1)+c]
				if fac == 0 {
					continue
				}
				for j := c; j <= m; j++ {
					a[rr*(m+1)+j] -= fac * a[c*(m+1)+j]
				}
			}
		}
		for c := m - 1; c >= 0; c-- {
			s := a[c*(m+1)+m]
			for j := c + 1; j < m; j++ {
				s -= a[c*(m+1)+j] * gamma[j]
			}
			gamma[c] = s / a[c*(m+1)+c]
		}
		for k := m; k <= r; k++ {
			v := rhs(k)
			for i := 1; i <= p; i++ {
				v += phi[i-1] * gamma[k-i]
			}
			gamma[k] = v
		}
	}
	if !(gamma[0] > 0) || math.IsInf(gamma[0], 0) {
		return 0, false
	}
	// c_j = Cov(α_1[j], x_1), then G_1 = T·c.
	c := make([]float64, r)
	c[0] = gamma[0]
	for j := 1; j < r; j++ {
		v := 0.0
		for i := j + 1; i <= r; i++ {
			v += phi[i-1] * gamma[i-j]
		}
		for i := j; i < r; i++ {
			v += theta[i] * psi[i-j]
		}
		c[j] = v
	}
	for i := 0; i < r; i++ {
		v := phi[i] * c[0]
		if i+1 < r {
			v += c[i+1]
		}
		g[i] = v
	}
	return gamma[0], true
}

// fastSums returns Σ v_t²/F_t and Σ log F_t over x, the same prediction-
// error decomposition as filter, by the Chandrasekhar recursions (Morf,
// Sidhu & Kailath 1974; for ARMA likelihoods, Herbst 2015): for a
// time-invariant model started from its stationary covariance, P_{t+1} -
// P_t has rank one, w_t·m_t·w_tᵀ, and with G_t = T·P_t·Zᵀ,
//
//	F_{t+1} = F_t + m_t·(Z·w_t)²,  G_{t+1} = G_t + m_t·(Z·w_t)·T·w_t,
//	w_{t+1} = T·w_t - (Z·w_t / F_t)·G_t,  m_{t+1} = m_t·F_t / F_{t+1},
//
// from w_1 = G_1, m_1 = -1/F_1 (derived by expanding the Riccati step). It
// needs only the first column of P_1 (firstColumn) and costs O(r) a value,
// against O(r²) for filter and O(r³) for the covariance filter starts
// from; it is what the optimiser evaluates. Once the update m_t·(Z·w_t)² is
// negligible (steadyTolerance relative to F), F and G stay fixed.
func (ss *armaStateSpace) fastSums(x []float64) (sumSquares, sumLogF float64, ok bool) {
	sumSquares, sumLogF, _, ok = ss.fastSumsMean(x, false)
	return sumSquares, sumLogF, ok
}

// fastSumsMean is fastSums with, when withMean is set, the mean of x
// concentrated out: the model's gains do not depend on the mean, so the
// innovations of x - μ are v_t - μ·u_t, with u_t those of a series of ones
// filtered alongside, and Σ (v_t - μ·u_t)²/F_t is least at the generalised
// least-squares mean μ̂ = Σ v_t·u_t/F_t / Σ u_t²/F_t, the maximum-likelihood
// estimate of μ at the given coefficients. It returns the sums at μ̂, and μ̂
// (0 without withMean).
func (ss *armaStateSpace) fastSumsMean(x []float64, withMean bool) (sumSquares, sumLogF, mean float64, ok bool) {
	r := ss.r
	phi := ss.phi
	buf := numeric.GetScratch(5 * r)
	defer numeric.PutScratch(buf)
	g, w, a, tw, a1 := buf[:r], buf[r:2*r], buf[2*r:3*r], buf[3*r:4*r], buf[4*r:5*r]
	for i := range a1 {
		a1[i] = 0
	}
	var cross, ones float64 // Σ v·u/F and Σ u²/F
	f, ok := ss.firstColumn(g)
	if !ok {
		return 0, 0, 0, false
	}
	copy(w, g)
	m := -1 / f
	for i := range a {
		a[i] = 0
	}
	settled := 0 // the first value whose F is the settled one
	steady := false
	for t, xt := range x {
		v := xt - a[0]
		sumSquares += v * v / f
		if steady {
			if t == len(x)-1 { // F has stayed fixed since the filter settled
				sumLogF += float64(len(x)-settled) * math.Log(f)
			}
		} else {
			sumLogF += math.Log(f)
		}
		// a ← T·a + (G/F)·v
		a0 := a[0]
		for i := 0; i < r-1; i++ {
			a[i] = phi[i]*a0 + a[i+1] + g[i]/f*v
		}
		a[r-1] = phi[r-1]*a0 + g[r-1]/f*v
		if withMean {
			u := 1 - a1[0]
			cross += v * u / f
			ones += u * u / f
			b0 := a1[0]
			for i := 0; i < r-1; i++ {
				a1[i] = phi[i]*b0 + a1[i+1] + g[i]/f*u
			}
			a1[r-1] = phi[r-1]*b0 + g[r-1]/f*u
		}
		if steady {
			continue
		}
		u := w[0]
		for i := 0; i < r-1; i++ {
			tw[i] = phi[i]*u + w[i+1]
		}
		tw[r-1] = phi[r-1] * u
		df := m * u * u
		fNext := f + df
		if !(fNext > 0) {
			return 0, 0, 0, false
		}
		dg := 0.0
		for i := 0; i < r; i++ {
			w[i] = tw[i] - u/f*g[i] // the old G
			step := m * u * tw[i]
			g[i] += step
			dg = math.Max(dg, math.Abs(step))
		}
		m *= f / fNext
		f = fNext
		if math.Abs(df) < steadyTolerance*f && dg < steadyTolerance*f {
			steady, settled = true, t+1
		}
	}
	if withMean {
		if !(ones > 0) {
			return 0, 0, 0, false
		}
		mean = cross / ones
		sumSquares -= cross * mean
	}
	if !(sumSquares > 0) || math.IsInf(sumSquares, 0) || math.IsNaN(sumSquares) {
		return 0, 0, 0, false
	}
	return sumSquares, sumLogF, mean, true
}
