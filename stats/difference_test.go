package stats

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/plumb-sql/plumb/stats/internal/testseries"
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
		// Plain algebra: at lag 2 the squares t² give t² - (t-2)² = 4t - 4,
		// and differencing that again at lag 2 gives 4·2 = 8 everywhere.
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

// TestDifferenceAgainstR compares Difference with R's own diff(x, lag,
// differences) (r-base-core 4.2.2, testdata/reference/difference_r.R, values
// in difference_r.csv) on eight open datasets shipped with R, at lags 1, 3,
// 11 and 12 and up to three passes: every value within 1e-12 relative
// (both sides subtract the same 17-digit numbers in the same order, so the
// results should agree to the last bit or two).
func TestDifferenceAgainstR(t *testing.T) {
	_, series := testseries.ReferenceSeries(t)
	type key struct {
		name       string
		lag, times int
	}
	want := map[key][]float64{}
	var order []key
	for _, row := range testseries.ReadCSV(t, "difference_r.csv") {
		k := key{row["series"], int(testseries.Num(t, row["lag"])), int(testseries.Num(t, row["times"]))}
		if _, ok := want[k]; !ok {
			order = append(order, k)
		}
		want[k] = append(want[k], testseries.Num(t, row["value"]))
	}
	if len(order) < 8 {
		t.Fatalf("difference_r.csv holds %d cases, want 8", len(order))
	}
	for _, k := range order {
		x, ok := series[k.name]
		if !ok {
			t.Fatalf("%s: not among the reference series", k.name)
		}
		got, err := Difference(x, k.lag, k.times)
		if err != nil {
			t.Fatal(err)
		}
		if len(got) != len(want[k]) {
			t.Errorf("%v: %d values, R gives %d", k, len(got), len(want[k]))
			continue
		}
		for i, w := range want[k] {
			if math.Abs(got[i]-w) > 1e-12*math.Max(1, math.Abs(w)) {
				t.Errorf("%v: value %d = %v, R gives %v", k, i+1, got[i], w)
				break
			}
		}
	}
}

// TestDifferenceIsBinomial checks Difference against its closed form on
// seeded random data (plain algebra: expanding (1 - B^lag)^times by the
// binomial theorem),
//
//	Δ^times_lag x_t = Σ_{j=0..times} (-1)^j · C(times, j) · x_{t - j·lag},
//
// computed here directly, term by term, for every lag and number of passes
// up to 4 and 13.
func TestDifferenceIsBinomial(t *testing.T) {
	rng := rand.New(rand.NewPCG(20, 26))
	x := make([]float64, 90)
	for i := range x {
		x[i] = rng.Float64()*200 - 100
	}
	for lag := 1; lag <= 13; lag++ {
		for times := 1; times <= 4; times++ {
			got, err := Difference(x, lag, times)
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != len(x)-lag*times {
				t.Fatalf("lag %d, times %d: %d values, want %d", lag, times, len(got), len(x)-lag*times)
			}
			for i := range got {
				t0 := i + lag*times // the position in x of this value
				want, binom := 0.0, 1.0
				for j := 0; j <= times; j++ {
					sign := 1.0
					if j%2 == 1 {
						sign = -1
					}
					want += sign * binom * x[t0-j*lag]
					binom = binom * float64(times-j) / float64(j+1)
				}
				// Sums of 2^times terms of magnitude up to 100: rounding only.
				if math.Abs(got[i]-want) > 1e-12*math.Pow(2, float64(times))*100 {
					t.Fatalf("lag %d, times %d, value %d: %v, closed form %v", lag, times, i, got[i], want)
				}
			}
		}
	}
}
