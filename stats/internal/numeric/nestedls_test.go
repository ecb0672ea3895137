package numeric

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestNestedLSMatchesGonum checks every nested model's SSR and last
// t-statistic against a separate least-squares fit by gonum's mat.Dense.Solve
// (QR based), the residuals and covariance computed directly.
func TestNestedLSMatchesGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	n, p := 60, 6
	cols := make([][]float64, p)
	for j := range cols {
		cols[j] = make([]float64, n)
		for i := range cols[j] {
			cols[j][i] = rng.NormFloat64() + float64(j)*0.1*float64(i%5)
		}
	}
	y := make([]float64, n)
	for i := range y {
		y[i] = rng.NormFloat64() + 0.5*cols[1][i]
	}
	var q NestedLS
	work := make([][]float64, p)
	for j := range cols {
		work[j] = append([]float64(nil), cols[j]...)
	}
	q.Factor(work, append([]float64(nil), y...))
	for m := 1; m <= p; m++ {
		x := mat.NewDense(n, m, nil)
		for i := 0; i < n; i++ {
			for j := 0; j < m; j++ {
				x.Set(i, j, cols[j][i])
			}
		}
		var beta mat.VecDense
		if err := beta.SolveVec(x, mat.NewVecDense(n, append([]float64(nil), y...))); err != nil {
			t.Fatal(err)
		}
		var fit mat.VecDense
		fit.MulVec(x, &beta)
		ssr := 0.0
		for i := 0; i < n; i++ {
			r := y[i] - fit.AtVec(i)
			ssr += r * r
		}
		var xtx, inv mat.Dense
		xtx.Mul(x.T(), x)
		if err := inv.Inverse(&xtx); err != nil {
			t.Fatal(err)
		}
		tWant := beta.AtVec(m-1) / math.Sqrt(ssr/float64(n-m)*inv.At(m-1, m-1))
		if got := q.SSR(m); math.Abs(got-ssr) > 1e-10*ssr {
			t.Errorf("m=%d: ssr %v, want %v", m, got, ssr)
		}
		if got := q.TLast(m); math.Abs(got-tWant) > 1e-9*math.Abs(tWant) {
			t.Errorf("m=%d: t %v, want %v", m, got, tWant)
		}
		if got := q.CoefLast(m); math.Abs(got-beta.AtVec(m-1)) > 1e-9*math.Abs(beta.AtVec(m-1)) {
			t.Errorf("m=%d: coef %v, want %v", m, got, beta.AtVec(m-1))
		}
	}
	if q.Rank != p {
		t.Errorf("rank %d, want %d", q.Rank, p)
	}
}

func TestNestedLSRank(t *testing.T) {
	a := []float64{1, 2, 3, 4}
	b := []float64{2, 4, 6, 8} // b = 2a
	var q NestedLS
	q.Factor([][]float64{append([]float64(nil), a...), b}, []float64{1, 0, 1, 0})
	if q.Rank != 1 {
		t.Errorf("rank %d, want 1", q.Rank)
	}
}

// TestGramMatchesQR: the Cholesky route gives the QR route's nested SSRs and
// t-statistics on a well-conditioned design (to 1e-8 relative).
func TestGramMatchesQR(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	n, p := 200, 8
	cols := make([][]float64, p)
	for j := range cols {
		cols[j] = make([]float64, n)
		for i := range cols[j] {
			cols[j][i] = rng.NormFloat64()
		}
	}
	y := make([]float64, n)
	for i := range y {
		y[i] = rng.NormFloat64() + 0.3*cols[2][i]
	}
	copyCols := func() [][]float64 {
		out := make([][]float64, p)
		for j := range cols {
			out[j] = append([]float64(nil), cols[j]...)
		}
		return out
	}
	var qr, gram NestedLS
	qr.Factor(copyCols(), append([]float64(nil), y...))
	gram.FactorGram(copyCols(), append([]float64(nil), y...))
	for m := 1; m <= p; m++ {
		if a, b := qr.SSR(m), gram.SSR(m); math.Abs(a-b) > 1e-8*a {
			t.Errorf("m=%d: ssr QR %v, Gram %v", m, a, b)
		}
		if a, b := qr.TLast(m), gram.TLast(m); math.Abs(a-b) > 1e-8*math.Abs(a) {
			t.Errorf("m=%d: t QR %v, Gram %v", m, a, b)
		}
	}
}

// TestAutocovariancesFFT: the FFT route equals the direct sums (to 1e-12
// relative to γ_0).
func TestAutocovariancesFFT(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	e := make([]float64, 777)
	for i := range e {
		e[i] = rng.NormFloat64()
	}
	got := Autocovariances(e, 700) // long enough to take the FFT route
	for j := 0; j <= 700; j++ {
		if want := autocovariance(e, j); math.Abs(got[j]-want) > 1e-12*got[0] {
			t.Fatalf("γ_%d = %v, want %v", j, got[j], want)
		}
	}
}
