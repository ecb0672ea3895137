package stats

import (
	"math"
	"math/rand/v2"
)

// testSeries returns a series of length n of one of three kinds, by
// kind % 3: a Gaussian random walk; noise around a weekly sine; noise whose
// spread grows with time. Invented data for tests that need a mix.
func testSeries(rng *rand.Rand, n, kind int) []float64 {
	x := make([]float64, n)
	w := 0.0
	for i := range x {
		w += rng.NormFloat64()
		switch kind % 3 {
		case 0:
			x[i] = w
		case 1:
			x[i] = 10 + 3*math.Sin(float64(i)*2*math.Pi/7) + rng.NormFloat64()
		default:
			x[i] = 50 + float64(i)/20*rng.NormFloat64()
		}
	}
	return x
}
