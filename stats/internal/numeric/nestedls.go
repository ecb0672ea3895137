package numeric

import "math"

// NestedLS is the Householder QR factorisation of a regression design X
// (n rows, p columns) applied to a response y. From one factorisation it
// gives, for every m = 1..p, the residual sum of squares of the regression
// of y on the first m columns and the t-statistic of the m-th column in that
// regression: with X = QR and z = Qᵀy,
//
//	SSR_m = Σ_{i>p} z_i² + Σ_{m<i≤p} z_i²,
//	t_m   = z_m / (|R_mm|/R_mm · sqrt(SSR_m/(n-m))),
//
// because the last coefficient of the m-column model is z_m/R_mm with
// standard error sqrt(SSR_m/(n-m))/|R_mm| (Golub & Van Loan, Matrix
// Computations, §5.3). Forming SSR from the tail of z avoids the
// cancellation of ‖y‖² - Σz².
type NestedLS struct {
	N, p int
	Z    []float64 // Qᵀy, length p
	Rdg  []float64 // diagonal of R
	tail float64   // Σ_{i>p} z_i², the SSR of the full model
	Rank int       // columns before the first numerically dependent one
}

// Factor computes the factorisation. cols holds X's columns, each of length
// n; they and y are overwritten. A column whose part orthogonal to the
// columns before it is below 1e-10 of its own norm ends the usable rank.
func (q *NestedLS) Factor(cols [][]float64, y []float64) {
	q.N, q.p = len(y), len(cols)
	q.Z = q.Z[:0]
	q.Rdg = q.Rdg[:0]
	q.Rank = q.p
	for j := 0; j < q.p; j++ {
		a := cols[j]
		var norm2, full2 float64
		for i := j; i < q.N; i++ {
			norm2 += a[i] * a[i]
		}
		for i := 0; i < q.N; i++ {
			full2 += a[i] * a[i]
		}
		norm := math.Sqrt(norm2)
		if norm <= 1e-10*math.Sqrt(full2) || norm == 0 {
			if q.Rank == q.p {
				q.Rank = j
			}
			q.Z = append(q.Z, 0)
			q.Rdg = append(q.Rdg, 0)
			continue
		}
		alpha := -math.Copysign(norm, a[j])
		// v = a[j:] - alpha·e_1; H = I - 2vvᵀ/(vᵀv); vᵀv = 2·norm·(norm + |a_j|).
		a[j] -= alpha
		vtv := 2 * norm * (norm + math.Abs(a[j]+alpha))
		apply := func(b []float64) {
			var dot float64
			for i := j; i < q.N; i++ {
				dot += a[i] * b[i]
			}
			f := 2 * dot / vtv
			for i := j; i < q.N; i++ {
				b[i] -= f * a[i]
			}
		}
		for k := j + 1; k < q.p; k++ {
			apply(cols[k])
		}
		apply(y)
		q.Rdg = append(q.Rdg, alpha)
		q.Z = append(q.Z, y[j])
	}
	q.tail = 0
	for i := q.p; i < q.N; i++ {
		q.tail += y[i] * y[i]
	}
}

// SSR returns the residual sum of squares of the model with the first m columns.
func (q *NestedLS) SSR(m int) float64 {
	s := q.tail
	for i := m; i < q.p; i++ {
		s += q.Z[i] * q.Z[i]
	}
	return s
}

// TLast returns the t-statistic of column m (1-based) in the model with the
// first m columns.
func (q *NestedLS) TLast(m int) float64 {
	r := q.Rdg[m-1]
	if r == 0 || q.N <= m {
		return math.NaN()
	}
	s := math.Sqrt(q.SSR(m) / float64(q.N-m))
	return q.Z[m-1] / (math.Copysign(1, r) * s)
}

// CoefLast returns the coefficient of column m in the model with the first m columns.
func (q *NestedLS) CoefLast(m int) float64 {
	return q.Z[m-1] / q.Rdg[m-1]
}

// SELast returns the standard error of column m's coefficient in the model
// with the first m columns.
func (q *NestedLS) SELast(m int) float64 {
	return math.Sqrt(q.SSR(m)/float64(q.N-m)) / math.Abs(q.Rdg[m-1])
}

// N0 returns the number of observations as a float, for relative tolerances.
func (q *NestedLS) N0() float64 { return float64(q.N) }
