package numeric

import "math"

// FactorGram fills q as Factor does, but from the Cholesky factor of the
// cross-product matrix of the augmented design [X y] instead of a QR
// factorisation of X. If [X y]ᵀ[X y] = L·Lᵀ, the last row of L holds
// (z_1..z_p, sqrt(SSR_full)) and diag(L) holds |R_ii|, so every nested
// model's SSR and last t-statistic follow exactly as from QR.
//
// It costs n·p²/2 multiply-adds for the cross products and p³/6 for the
// factor, against 2·n·p² for Householder QR, but squares the design's
// condition number; each column is scaled to unit length first. plumb uses
// it only to choose among nested lag models (see adfDesign.chooseLag); the
// reported statistic always comes from a QR fit, and the tests check that
// the chosen lags agree with python3-statsmodels on every reference series.
func (q *NestedLS) FactorGram(cols [][]float64, y []float64) {
	p := len(cols)
	all := append(cols[:p:p], y)
	m := p + 1
	a := make([]float64, m*m)
	for i := 0; i < m; i++ {
		for j := 0; j <= i; j++ {
			a[i*m+j] = Dot(all[i], all[j])
		}
	}
	q.FactorCross(a, p, len(y))
}

// Dot returns Σ a_t·b_t, with four running sums so that the additions do
// not wait on one another.
func Dot(a, b []float64) float64 {
	b = b[:len(a)]
	var s0, s1, s2, s3 float64
	// Re-slicing by four lets the compiler drop the bounds checks.
	for len(a) >= 4 && len(b) >= 4 {
		s0 += a[0] * b[0]
		s1 += a[1] * b[1]
		s2 += a[2] * b[2]
		s3 += a[3] * b[3]
		a, b = a[4:], b[4:]
	}
	for i := range a {
		s0 += a[i] * b[i]
	}
	return (s0 + s1) + (s2 + s3)
}

// Sum returns Σ a_t with four running sums, as Dot does.
func Sum(a []float64) float64 {
	var s0, s1, s2, s3 float64
	for len(a) >= 4 {
		s0 += a[0]
		s1 += a[1]
		s2 += a[2]
		s3 += a[3]
		a = a[4:]
	}
	for _, v := range a {
		s0 += v
	}
	return (s0 + s1) + (s2 + s3)
}

// FactorCross fills q from the lower triangle of the (p+1)×(p+1)
// cross-product matrix a of [X y] (row-major, y last) on n observations.
// a is overwritten. It returns the smallest pivot of the regressors'
// factor relative to a unit diagonal (1 for orthogonal columns, near 0 for
// nearly dependent ones).
func (q *NestedLS) FactorCross(a []float64, p, n int) float64 {
	m := p + 1
	q.N, q.p = n, p
	scale := make([]float64, m)
	for j := range scale {
		scale[j] = math.Sqrt(a[j*m+j])
		if scale[j] == 0 {
			scale[j] = 1
		}
	}
	for i := 0; i < m; i++ {
		for j := 0; j <= i; j++ {
			a[i*m+j] /= scale[i] * scale[j]
		}
	}
	// In-place Cholesky; a pivot below 1e-10 (relative to a unit diagonal)
	// marks a dependent column, which ends the usable rank.
	q.Z = q.Z[:0]
	q.Rdg = q.Rdg[:0]
	q.Rank = p
	minPivot := 1.0
	for j := 0; j < m; j++ {
		d := a[j*m+j]
		for k := 0; k < j; k++ {
			d -= a[j*m+k] * a[j*m+k]
		}
		if j < p {
			minPivot = math.Min(minPivot, d)
		}
		if j < p && d <= 1e-10 {
			if q.Rank == p {
				q.Rank = j
			}
			d = 0
		}
		ljj := math.Sqrt(math.Max(d, 0))
		a[j*m+j] = ljj
		for i := j + 1; i < m; i++ {
			s := a[i*m+j]
			for k := 0; k < j; k++ {
				s -= a[i*m+k] * a[j*m+k]
			}
			if ljj > 0 {
				a[i*m+j] = s / ljj
			} else {
				a[i*m+j] = 0
			}
		}
	}
	ys := scale[p]
	for j := 0; j < p; j++ {
		q.Rdg = append(q.Rdg, a[j*m+j]*scale[j])
		q.Z = append(q.Z, a[p*m+j]*ys)
	}
	q.tail = a[p*m+p] * a[p*m+p] * ys * ys
	return minPivot
}
