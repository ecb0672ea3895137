package unitroot

import (
	"math"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
	"gonum.org/v1/gonum/mat"
)

// breakScan fills path[i] with the t-statistic of the lagged level in the
// Zivot-Andrews regression (see ZivotAndrews) with lags lagged differences
// and the break at BreakIndex lo+i, or NaN where the break columns are
// dependent on the others at that date. It returns StatusSingular when the
// fixed columns are dependent or some date's regression fits exactly.
//
// Only the break columns D (one or two) change with the date; the fixed
// columns F = [1, trend, Δy_{t-1..t-k}], the lagged level l and the response
// y do not. With F, l, y factored once as [F l y] = Q·R (Q orthonormal, R
// upper triangular; the rows q_t of Q are found one at a time), everything a
// date needs is a projection of D on Q's columns, and for D = DU or DT those
// are suffix sums: Qᵀ·DU = Σ_{t≥b} q_t and Qᵀ·DT = Σ_{t≥b} (t-b+1)·q_t =
// Σ_{t≥b} t·q_t - (b-1)·Σ_{t≥b} q_t. Walking b from the end of the sample
// to its start adds one row to each sum, so a date costs O(p) and the whole
// scan n·p²/2 (the rows of Q) plus n·p, against n·p² per date for a fresh
// regression.
//
// At a date, with W = Q_Fᵀ·D, a = [q_lᵀ·D; q_yᵀ·D] (2×q) and the Schur
// complement S = DᵀD - WᵀW, the part of l and y left after F and D has the
// Gram matrix (in the coordinates of q_l, q_y)
//
//	B = I - aᵀ·S⁻¹·a,
//
// and with l = … + R_ll·q_l and y = … + R_ly·q_l + R_yy·q_y,
//
//	t = sqrt(df)·(R_ly·B11 + R_yy·B12) / (R_yy·sqrt(B11·B22 - B12²)),
//
// df = n - (columns of F) - q - 1: the usual OLS t-statistic of l's
// coefficient (Frisch-Waugh), which without D is ADF's with a trend.
func breakScan(a *adfDesign, lags int, kind BreakKind, lo int, path []float64) stats.Status {
	start := lags // first index of a.dx in the sample
	n := len(a.dx) - start
	p0 := 2 + lags // constant, trend, lagged differences
	pl, py := p0, p0+1
	m := p0 + 2
	L, scale, st := breakFactor(a, lags, start)
	defer numeric.PutScratch(L)
	defer numeric.PutScratch(scale)
	if st != stats.StatusOK {
		return st
	}
	// R_ly and R_yy; R_ll = L[pl][pl] is positive, so t has the sign of
	// its numerator and R_ll cancels.
	rly, ryy := L[py*m+pl], L[py*m+py]
	inv := numeric.GetScratch(m)
	row := numeric.GetScratch(m)
	U := numeric.GetScratch(m * m) // Lᵀ, so that the substitution reads rows
	su := numeric.GetZeroed(m)     // Σ_{r≥rb} q_r
	sr := numeric.GetZeroed(m)     // Σ_{r≥rb} r·q_r
	defer func() {
		for _, s := range [][]float64{inv, row, U, su, sr} {
			numeric.PutScratch(s)
		}
	}()
	for j := 0; j < m; j++ {
		inv[j] = 1 / L[j*m+j]
		for i := j; i < m; i++ {
			U[j*m+i] = L[i*m+j]
		}
	}
	nf := float64(n)
	q := kind.dummies()
	sdf := math.Sqrt(float64(n - p0 - q - 1))
	invScale := numeric.GetScratch(m)
	defer numeric.PutScratch(invScale)
	for j := range invScale {
		invScale[j] = 1 / scale[j]
	}
	trendStep := invScale[1] / nf
	rLo := lo - 1 - lags // sample row of the first candidate date
	rHi := rLo + len(path) - 1
	for i := range path {
		path[i] = math.NaN()
	}
	for r := n - 1; r >= rLo; r-- {
		// Row r of [F l y], scaled as the factor was, then q_r = L⁻¹·row.
		u := start + r
		row[0] = invScale[0]
		row[1] = float64(r+1) * trendStep
		for j := 1; j <= lags; j++ {
			row[1+j] = a.dx[u-j] * invScale[1+j]
		}
		row[pl] = a.x[u] * invScale[pl]
		row[py] = a.dx[u] * invScale[py]
		// Forward substitution by columns: each step's updates of the
		// remaining entries are independent of one another, so they
		// pipeline, where a dot product per entry would wait on its sum.
		rf := float64(r)
		for k := 0; k < m; k++ {
			gk := row[k] * inv[k]
			su[k] += gk
			sr[k] += rf * gk
			rest := row[k+1 : m]
			for i, v := range U[k*m+k+1 : k*m+m] {
				rest[i] -= v * gk
			}
		}
		if r > rHi {
			continue
		}
		// Break at this row: DU = 1 and DT = (r' - r + 1)/n for rows r' ≥ r.
		N := float64(n - r)
		var t float64
		var ok, exact bool
		switch kind {
		case BreakLevel:
			var ww float64
			for j := 0; j < p0; j++ {
				ww += su[j] * su[j]
			}
			t, ok, exact = breakT1(N-ww, N, su[pl], su[py], rly, ryy, sdf)
		case BreakSlope:
			var ww float64
			for j := 0; j < p0; j++ {
				d := (sr[j] - (rf-1)*su[j]) / nf
				ww += d * d
			}
			dd := N * (N + 1) * (2*N + 1) / (6 * nf * nf)
			al := (sr[pl] - (rf-1)*su[pl]) / nf
			ay := (sr[py] - (rf-1)*su[py]) / nf
			t, ok, exact = breakT1(dd-ww, dd, al, ay, rly, ryy, sdf)
		case BreakLevelAndSlope:
			var uu, ut, tt float64
			for j := 0; j < p0; j++ {
				d := (sr[j] - (rf-1)*su[j]) / nf
				uu += su[j] * su[j]
				ut += su[j] * d
				tt += d * d
			}
			du := N
			dd := N * (N + 1) * (2*N + 1) / (6 * nf * nf)
			dut := N * (N + 1) / (2 * nf)
			s11, s12, s22 := du-uu, dut-ut, dd-tt
			al := [2]float64{su[pl], (sr[pl] - (rf-1)*su[pl]) / nf}
			ay := [2]float64{su[py], (sr[py] - (rf-1)*su[py]) / nf}
			t, ok, exact = breakT2(s11, s12, s22, du, dd, al, ay, rly, ryy, sdf)
		}
		if exact {
			return stats.StatusSingular
		}
		if ok {
			path[r-rLo] = t
		}
	}
	return stats.StatusOK
}

// breakT1 returns the t-statistic for one break column with Schur
// complement s (of its squared norm dd) and projections al, ay on q_l, q_y;
// ok is false when the column (or the level) is dependent on the others,
// exact when the regression fits exactly. B is used as s·B, which needs no
// division.
func breakT1(s, dd, al, ay, rly, ryy, sdf float64) (t float64, ok, exact bool) {
	if s <= 1e-10*dd {
		return 0, false, false
	}
	return breakT(s-al*al, -al*ay, s-ay*ay, s, rly, ryy, sdf)
}

// breakT2 is breakT1 for two break columns (DU, DT) with Schur complement
// [[s11, s12], [s12, s22]] and squared norms du, dd; B is used as det(S)·B
// = det(S)·I - aᵀ·adj(S)·a.
func breakT2(s11, s12, s22, du, dd float64, al, ay [2]float64, rly, ryy, sdf float64) (t float64, ok, exact bool) {
	det := s11*s22 - s12*s12
	if s11 <= 1e-10*du || det <= 1e-10*dd*s11 { // DU dependent, or DT after DU
		return 0, false, false
	}
	quad := func(x, y [2]float64) float64 {
		return x[0]*(s22*y[0]-s12*y[1]) + x[1]*(s11*y[1]-s12*y[0])
	}
	return breakT(det-quad(al, al), -quad(al, ay), det-quad(ay, ay), det, rly, ryy, sdf)
}

// breakT finishes the t-statistic from κ·B, the residual Gram matrix of
// (q_l, q_y) after the break columns times κ > 0; t does not depend on κ,
// the thresholds do: the level's residual share B11 below 1e-10 makes the
// date unusable, and q_y's residual share B22 - B12²/B11 below 1e-9 (a
// difference of numbers of order 1, accurate to about 1e-13) counts as an
// exact fit. sdf is sqrt(df).
func breakT(b11, b12, b22, kappa, rly, ryy, sdf float64) (t float64, ok, exact bool) {
	if b11 <= 1e-10*kappa {
		return 0, false, false
	}
	det := b11*b22 - b12*b12 // κ²·B11·(B22 - B12²/B11)
	if det <= 1e-9*kappa*b11 {
		return 0, false, true
	}
	return sdf * (rly*b11 + ryy*b12) / (ryy * math.Sqrt(det)), true, false
}

// breakFactor returns the lower-triangular factor L (m×m, row-major) of the
// column-scaled cross-product matrix of [F l y] on the sample from start
// (see breakScan) and the column scales. It takes the Cholesky factor of
// the cross products (built as ADF builds them), and when that shows the
// columns nearly dependent (a pivot below 1e-8 of a unit diagonal) it takes
// R from a Householder QR of the columns themselves instead, whose accuracy
// does not suffer from squaring the condition number. The factor's diagonal
// is made positive. Status singular when the fixed columns are dependent
// or y is fitted exactly without a break.
func breakFactor(a *adfDesign, lags, start int) (L, scale []float64, st stats.Status) {
	p0 := 2 + lags
	m := p0 + 2
	cross, _, n := a.crossMatrix(lags, start) // order: 1, trend, level, lags, y
	defer numeric.PutScratch(cross)
	// Move the level after the lags: [1, trend, lags, level, y].
	order := make([]int, m)
	order[0], order[1] = 0, 1
	for j := 1; j <= lags; j++ {
		order[1+j] = 2 + j
	}
	order[p0], order[p0+1] = 2, m-1
	L = numeric.GetZeroed(m * m)
	scale = numeric.GetScratch(m)
	for i := 0; i < m; i++ {
		for j := 0; j <= i; j++ {
			r, c := order[i], order[j]
			if r < c {
				r, c = c, r
			}
			L[i*m+j] = cross[r*m+c]
		}
		scale[i] = math.Sqrt(L[i*m+i])
		if scale[i] == 0 {
			return L, scale, stats.StatusSingular
		}
	}
	var ls numeric.NestedLS
	minPivot := ls.FactorCross(L, m-1, n) // L now holds the scaled factor
	if minPivot >= 1e-8 && ls.Rank == m-1 && L[(m-1)*m+m-1] >= 1e-4 {
		return L, scale, stats.StatusOK
	}
	// Householder QR of the scaled columns.
	x := mat.NewDense(n, m, nil)
	for r := 0; r < n; r++ {
		u := start + r
		x.Set(r, 0, 1/scale[0])
		x.Set(r, 1, float64(r+1)/float64(n)/scale[1])
		for j := 1; j <= lags; j++ {
			x.Set(r, 1+j, a.dx[u-j]/scale[1+j])
		}
		x.Set(r, p0, a.x[u]/scale[p0])
		x.Set(r, p0+1, a.dx[u]/scale[p0+1])
	}
	var qr mat.QR
	qr.Factorize(x)
	var R mat.Dense
	qr.RTo(&R)
	clear(L)
	for i := 0; i < m; i++ {
		sign := 1.0
		if R.At(i, i) < 0 {
			sign = -1
		}
		for j := i; j < m; j++ {
			L[j*m+i] = sign * R.At(i, j)
		}
	}
	for j := 0; j < m-1; j++ {
		if L[j*m+j] <= 1e-10 {
			return L, scale, stats.StatusSingular
		}
	}
	if L[(m-1)*m+m-1] <= 1e-10 {
		return L, scale, stats.StatusSingular
	}
	return L, scale, stats.StatusOK
}
