package stats

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/stat"
)

func TestDifference(t *testing.T) {
	for _, test := range []struct {
		x          []float64
		lag, times int
		want       []float64
	}{
		// Plain algebra: successive differences of the squares are the odd numbers.
		{x: []float64{1, 4, 9, 16}, lag: 1, times: 1, want: []float64{3, 5, 7}},
		// Plain algebra: second differences of the squares are 2.
		{x: []float64{1, 4, 9, 16}, lag: 1, times: 2, want: []float64{2, 2}},
		// Plain algebra: a lag-2 difference of 1..5 is 2 everywhere.
		{x: []float64{1, 2, 3, 4, 5}, lag: 2, times: 1, want: []float64{2, 2, 2}},
		// Plain algebra: third differences of cubes are 6.
		{x: []float64{1, 8, 27, 64, 125, 216}, lag: 1, times: 3, want: []float64{6, 6, 6}},
		// Seasonal then again: (1-B^2)^2 on 0,1,4,9,16,25 = 8,8.
		{x: []float64{0, 1, 4, 9, 16, 25}, lag: 2, times: 2, want: []float64{8, 8}},
		// Too short: nothing left.
		{x: []float64{1, 2}, lag: 2, times: 1, want: []float64{}},
		{x: nil, lag: 1, times: 1, want: []float64{}},
	} {
		got, err := Difference(test.x, test.lag, test.times)
		if err != nil {
			t.Fatalf("Difference(%v, %d, %d): %v", test.x, test.lag, test.times, err)
		}
		if !slices.Equal(got, test.want) {
			t.Errorf("Difference(%v, %d, %d) = %v, want %v", test.x, test.lag, test.times, got, test.want)
		}
	}
}

func TestDifferenceRejectsBadOptions(t *testing.T) {
	for _, test := range []struct{ lag, times int }{{0, 1}, {-1, 1}, {1, 0}, {1, -3}} {
		if _, err := Difference([]float64{1, 2, 3}, test.lag, test.times); err == nil {
			t.Errorf("Difference(lag=%d, times=%d) gave no error", test.lag, test.times)
		}
	}
	if _, err := Undifference([]float64{1}, []float64{1}, 0); err == nil {
		t.Error("Undifference(lag=0) gave no error")
	}
	if _, err := Undifference([]float64{1}, []float64{1}, 2); err == nil {
		t.Error("Undifference with too short an anchor gave no error")
	}
}

func TestDifferencePropagatesNaN(t *testing.T) {
	got, _ := Difference([]float64{1, math.NaN(), 4, 8}, 1, 1)
	if !math.IsNaN(got[0]) || !math.IsNaN(got[1]) || got[2] != 4 {
		t.Errorf("Difference with a NaN = %v, want [NaN NaN 4]", got)
	}
}

func TestUndifferenceInvertsDifference(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, 50)
	for i := range x {
		x[i] = rng.NormFloat64()*3 + float64(i)
	}
	for _, lag := range []int{1, 2, 7, 12} {
		for _, k := range []int{lag, lag + 3, 20} {
			d, err := Difference(x[k-lag:], lag, 1)
			if err != nil {
				t.Fatal(err)
			}
			got, err := Undifference(d, x[:k], lag)
			if err != nil {
				t.Fatal(err)
			}
			for i, v := range got {
				if math.Abs(v-x[k+i]) > 1e-12*math.Max(1, math.Abs(x[k+i])) {
					t.Fatalf("lag %d, anchor %d: restored[%d] = %v, want %v", lag, k, i, v, x[k+i])
				}
			}
		}
	}
}

// TestDifferenceOfLinearTrend checks a fact of the trade (common practice,
// plain algebra): for y_t = b0 + b1·t + e_t with e white noise of variance s²,
// Δy_t = b1 + e_t - e_{t-1} has mean b1 and variance 2·s².
func TestDifferenceOfLinearTrend(t *testing.T) {
	const (
		n        = 100000
		b0, b1   = 5.0, 0.3
		s        = 2.0
		seedA    = 7
		seedB    = 11
		meanTol  = 0.02 // mean of Δy has standard error ≈ s·√2/n (telescoping sum): tiny; 0.02 is generous
		varRelTo = 0.02 // sample variance of n=1e5 values: relative s.e. ≈ √(2/n)·√(1+2ρ²) ≈ 0.0055; 0.02 is > 3 s.e.
	)
	rng := rand.New(rand.NewPCG(seedA, seedB))
	y := make([]float64, n)
	for i := range y {
		y[i] = b0 + b1*float64(i) + s*rng.NormFloat64()
	}
	d, err := Difference(y, 1, 1)
	if err != nil {
		t.Fatal(err)
	}
	mean, variance := stat.MeanVariance(d, nil)
	if math.Abs(mean-b1) > meanTol {
		t.Errorf("mean of Δy = %v, want %v ± %v", mean, b1, meanTol)
	}
	if math.Abs(variance/(2*s*s)-1) > varRelTo {
		t.Errorf("variance of Δy = %v, want %v within %v relative", variance, 2*s*s, varRelTo)
	}
}
