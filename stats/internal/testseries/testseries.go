package testseries

import (
	"math"
	"math/rand/v2"
)

// Series returns a series of length n of one of three kinds, by
// kind % 3: a Gaussian random walk; noise around a weekly sine; noise whose
// spread grows with time. Invented data for tests that need a mix.
func Series(rng *rand.Rand, n, kind int) []float64 {
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

// RandomWalk returns the partial sums of n standard normal steps, seeded.
func RandomWalk(n int, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 1))
	x := make([]float64, n)
	w := 0.0
	for i := range x {
		w += rng.NormFloat64()
		x[i] = w
	}
	return x
}

// Abs is the absolute value of an integer.
func Abs(a int) int {
	if a < 0 {
		return -a
	}
	return a
}

// AR1Noise returns n values of a zero-mean AR(1) with coefficient phi and
// marginal standard deviation sd, started in its stationary distribution.
func AR1Noise(rng *rand.Rand, n int, phi, sd float64) []float64 {
	out := make([]float64, n)
	innov := sd * math.Sqrt(1-phi*phi)
	prev := sd * rng.NormFloat64()
	for i := range out {
		prev = phi*prev + innov*rng.NormFloat64()
		out[i] = prev
	}
	return out
}

// AR1 returns n values of w_t = c + φ·w_{t-1} + σ·e_t after a burn-in of
// 200 steps from the process mean.
func AR1(rng *rand.Rand, n int, c, phi, sigma float64) []float64 {
	w := make([]float64, n)
	prev := c / (1 - phi)
	for t := -200; t < n; t++ {
		v := c + phi*prev + sigma*rng.NormFloat64()
		if t >= 0 {
			w[t] = v
		}
		prev = v
	}
	return w
}
