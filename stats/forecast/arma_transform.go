package forecast

import "math"

// stationaryFromFree maps unconstrained reals x_1..x_p to the coefficients
// φ_1..φ_p of a stationary autoregression 1 - φ_1·B - ... - φ_p·B^p, and
// every stationary autoregression is reached. Each x_k becomes a partial
// autocorrelation r_k = x_k / sqrt(1 + x_k²) in (-1, 1), and the
// Durbin-Levinson recursion turns partial autocorrelations into
// coefficients,
//
//	φ_k^(k) = r_k,   φ_j^(k) = φ_j^(k-1) - r_k·φ_{k-j}^(k-1),  j < k,
//
// which is stationary exactly when every |r_k| < 1 (Barndorff-Nielsen &
// Schou 1973; the reparametrisation of Jones 1980 and Monahan 1984, with
// Monahan's choice of map from the real line). The same map, negated, gives
// an invertible moving average: θ(B) = 1 + θ_1·B + ... is invertible exactly
// when -θ is a stationary autoregression (see invertibleFromFree).
func stationaryFromFree(x []float64) []float64 {
	phi := make([]float64, len(x))
	prev := make([]float64, len(x))
	for k, xk := range x {
		r := xk / math.Sqrt(1+xk*xk)
		copy(prev, phi[:k])
		phi[k] = r
		for j := 0; j < k; j++ {
			phi[j] = prev[j] - r*prev[k-1-j]
		}
	}
	return phi
}

// freeFromStationary is the inverse of stationaryFromFree: the backward
// Durbin-Levinson recursion φ_j^(k-1) = (φ_j^(k) + r_k·φ_{k-j}^(k)) /
// (1 - r_k²) recovers the partial autocorrelations, and x_k = r_k /
// sqrt(1 - r_k²). ok is false when φ is not stationary (some |r_k| ≥ 1).
func freeFromStationary(phi []float64) (x []float64, ok bool) {
	p := len(phi)
	cur := append([]float64(nil), phi...)
	x = make([]float64, p)
	next := make([]float64, p)
	for k := p - 1; k >= 0; k-- {
		r := cur[k]
		if !(math.Abs(r) < 1) {
			return nil, false
		}
		x[k] = r / math.Sqrt(1-r*r)
		for j := 0; j < k; j++ {
			next[j] = (cur[j] + r*cur[k-1-j]) / (1 - r*r)
		}
		copy(cur, next[:k])
	}
	return x, true
}

// invertibleFromFree maps unconstrained reals to the coefficients θ_1..θ_q
// of an invertible moving average 1 + θ_1·B + ... + θ_q·B^q: the negated
// stationary map.
func invertibleFromFree(x []float64) []float64 {
	theta := stationaryFromFree(x)
	for i := range theta {
		theta[i] = -theta[i]
	}
	return theta
}

// freeFromInvertible is the inverse of invertibleFromFree.
func freeFromInvertible(theta []float64) ([]float64, bool) {
	neg := make([]float64, len(theta))
	for i, v := range theta {
		neg[i] = -v
	}
	return freeFromStationary(neg)
}
