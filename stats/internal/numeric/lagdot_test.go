package numeric

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// TestLagDots checks LagDots against one dot product per lag, for lengths
// odd and even and lag counts below, at and above a multiple of four.
func TestLagDots(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	for _, n := range []int{1, 2, 7, 100, 101} {
		for _, lags := range []int{0, 1, 3, 4, 5, 21} {
			a := make([]float64, n)
			b := make([]float64, n+lags)
			for i := range a {
				a[i] = rng.NormFloat64()
			}
			for i := range b {
				b[i] = rng.NormFloat64()
			}
			out := make([]float64, lags+1)
			LagDots(a, b, out)
			for l := range out {
				want := 0.0
				for r := range a {
					want += a[r] * b[lags-l+r]
				}
				if math.Abs(out[l]-want) > 1e-12*math.Max(1, math.Abs(want)) {
					t.Errorf("n=%d lags=%d l=%d: got %v, want %v", n, lags, l, out[l], want)
				}
			}
		}
	}
}

// BenchmarkLagDots: 22 lags of a series of 1,000, as in ADF's lag search,
// by LagDots and by one dot product per lag.
func BenchmarkLagDots(b *testing.B) {
	x := testseries.RandomWalk(1022, 2)
	a := x[21:]
	out := make([]float64, 22)
	b.Run("lagDots", func(b *testing.B) {
		for b.Loop() {
			LagDots(a, x, out)
		}
	})
	b.Run("dot", func(b *testing.B) {
		for b.Loop() {
			for l := range out {
				out[l] = Dot(a, x[21-l:21-l+len(a)])
			}
		}
	})
}
