package stats

import (
	"math/rand/v2"
	"testing"
)

func randomWalk(n int, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 1))
	x := make([]float64, n)
	w := 0.0
	for i := range x {
		w += rng.NormFloat64()
		x[i] = w
	}
	return x
}

// BenchmarkADF: AIC lag choice at T = 1000 with the default maximum lag
// (floor(12·10^(1/4)) = 21 lags, 22 nested models), then the re-fit.
func BenchmarkADF(b *testing.B) {
	x := randomWalk(1000, 1)
	b.ReportAllocs()
	for b.Loop() {
		ADF(x, ADFOptions{})
	}
}

func BenchmarkKPSS(b *testing.B) {
	x := randomWalk(1000, 1)
	b.ReportAllocs()
	for b.Loop() {
		KPSS(x, KPSSOptions{})
	}
}

func BenchmarkPhillipsPerron(b *testing.B) {
	x := randomWalk(1000, 1)
	b.ReportAllocs()
	for b.Loop() {
		PhillipsPerron(x, PPOptions{})
	}
}

func BenchmarkDFGLS(b *testing.B) {
	x := randomWalk(1000, 1)
	b.ReportAllocs()
	for b.Loop() {
		DFGLS(x, DFGLSOptions{})
	}
}
