package testseries

import (
	"math"
	"math/rand/v2"
	"os"
	"runtime"
	"sync"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// Helpers for the seeded simulations that check p-values far into the tail
// (pvalue_calibration_test.go, segment_wald_test.go, dfgls_test.go). Their
// sizes depend on the run:
//
//	go test ./stats/verdict ./stats/unitroot -run 'Uniform|MixedPanels|Grid' -v          # CI size
//	go test ./stats/verdict ./stats/unitroot -run 'Uniform|MixedPanels|Grid' -short -v   # quick
//	PLUMB_FULL_SIMULATIONS=1 go test ./stats/verdict ./stats/unitroot -run 'Uniform|MixedPanels|Grid' -v -timeout 1h
//
// The full run is the one the README's tables come from.

// SimulationSize returns the CI size, a tenth of it with -short, and full
// when PLUMB_FULL_SIMULATIONS is set.
func SimulationSize(ci, full int) int {
	switch {
	case os.Getenv("PLUMB_FULL_SIMULATIONS") != "":
		return full
	case testing.Short():
		return max(1, ci/10)
	}
	return ci
}

// ARSeries fills x with a Gaussian AR(1) with coefficient phi started from
// its stationary distribution (phi = 0: white noise).
func ARSeries(rng *rand.Rand, x []float64, phi float64) {
	a := rng.NormFloat64() / math.Sqrt(1-phi*phi)
	for i := range x {
		a = phi*a + rng.NormFloat64()
		x[i] = a
	}
}

// InParallel runs work(w, workers) for w = 0..workers-1 on as many
// goroutines, workers = GOMAXPROCS, and waits for them.
func InParallel(work func(w, workers int)) {
	workers := runtime.GOMAXPROCS(0)
	var wg sync.WaitGroup
	for w := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			work(w, workers)
		}()
	}
	wg.Wait()
}

// UniformityLevels are the nominal levels checked.
var UniformityLevels = [3]float64{0.05, 1e-3, 1e-4}

// Rejections counts, for each of the p-values f returns, how many of reps
// series (from fill, seeded by the series' index) fall below each level;
// the series are spread over the CPUs.
func Rejections(reps, T int, seed uint64, fill func(*rand.Rand, []float64), f func([]float64) []float64) [][3]int {
	parts := make([][][3]int, runtime.GOMAXPROCS(0))
	InParallel(func(w, workers int) {
		x := make([]float64, T)
		for r := w; r < reps; r += workers {
			fill(rand.New(rand.NewPCG(seed, uint64(r))), x)
			ps := f(x)
			if parts[w] == nil {
				parts[w] = make([][3]int, len(ps))
			}
			for i, p := range ps {
				for j, level := range UniformityLevels {
					if p < level {
						parts[w][i][j]++
					}
				}
			}
		}
	})
	var total [][3]int
	for _, part := range parts {
		if total == nil {
			total = make([][3]int, len(part))
		}
		for i := range part {
			for j := range 3 {
				total[i][j] += part[i][j]
			}
		}
	}
	return total
}

// PoissonQuantile is the q-quantile of a Poisson distribution with mean
// mu: the smallest k with P(X ≤ k) ≥ q.
func PoissonQuantile(mu, q float64) int {
	d := distuv.Poisson{Lambda: mu}
	k := 0
	for d.CDF(float64(k)) < q {
		k++
	}
	return k
}

// MeanSE returns the mean of v and its standard error.
func MeanSE(v []float64) (float64, float64) {
	n := float64(len(v))
	m := 0.0
	for _, x := range v {
		m += x
	}
	m /= n
	if len(v) < 2 {
		return m, math.NaN()
	}
	ss := 0.0
	for _, x := range v {
		ss += (x - m) * (x - m)
	}
	return m, math.Sqrt(ss/(n-1)) / math.Sqrt(n)
}
