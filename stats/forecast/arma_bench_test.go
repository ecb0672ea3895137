package forecast

import (
	"math/rand/v2"
	"testing"

	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// BenchmarkChooseARMA: the model search on one seeded AR(1) series
// (φ = 0.5) of 1,000 values, the stationary part of a bench group.
func BenchmarkChooseARMA(b *testing.B) {
	rng := rand.New(rand.NewPCG(20261204, 3))
	w := make([]float64, 1000)
	testseries.ARSeries(rng, w, 0.5)
	b.ResetTimer()
	for range b.N {
		if _, err := ChooseARMA(w, ARMASearch{}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkFitAR: the least-squares autoregression alone on the same
// series, for comparison.
func BenchmarkFitARSame(b *testing.B) {
	rng := rand.New(rand.NewPCG(20261204, 3))
	w := make([]float64, 1000)
	testseries.ARSeries(rng, w, 0.5)
	b.ResetTimer()
	for range b.N {
		if _, err := FitAR(w, AROptions{}); err != nil {
			b.Fatal(err)
		}
	}
}
