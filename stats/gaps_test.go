package stats

import (
	"math"
	"slices"
	"testing"
)

func TestRegularize(t *testing.T) {
	nan := math.NaN()
	for _, test := range []struct {
		name          string
		at            []int64
		x             []float64
		method        FillMethod
		want          []float64
		step          int64
		gaps, missing int
	}{
		// Plain arithmetic throughout.
		{"no gaps", []int64{1, 2, 3}, []float64{5, 6, 7}, FillLinear, []float64{5, 6, 7}, 1, 0, 0},
		{"one gap, linear", []int64{0, 10, 30, 40}, []float64{1, 2, 4, 5}, FillLinear, []float64{1, 2, 3, 4, 5}, 10, 1, 0},
		{"one gap, previous", []int64{0, 10, 30, 40}, []float64{1, 2, 4, 5}, FillPrevious, []float64{1, 2, 2, 4, 5}, 10, 1, 0},
		{"gap kept with none", []int64{0, 10, 30, 40}, []float64{1, 2, 4, 5}, FillNone, []float64{1, 2, 4, 5}, 10, 1, 0},
		{"missing value, linear", []int64{0, 1, 2, 3}, []float64{1, nan, 3, 4}, FillLinear, []float64{1, 2, 3, 4}, 1, 0, 1},
		{"missing at the ends", []int64{0, 1, 2, 3}, []float64{nan, 2, 3, nan}, FillPrevious, []float64{2, 2, 3, 3}, 1, 0, 2},
	} {
		r, err := Regularize(test.at, test.x, test.method)
		if err != nil {
			t.Fatalf("%s: %v", test.name, err)
		}
		same := slices.EqualFunc(r.Values, test.want, func(a, b float64) bool { return a == b || math.IsNaN(a) && math.IsNaN(b) })
		if !same || r.Step != test.step || r.Gaps != test.gaps || r.Missing != test.missing {
			t.Errorf("%s: %+v, want values %v step %d gaps %d missing %d", test.name, r, test.want, test.step, test.gaps, test.missing)
		}
	}
	if _, err := Regularize([]int64{1, 1}, []float64{1, 2}, FillLinear); err == nil {
		t.Error("repeated time gave no error")
	}
	if _, err := Regularize([]int64{1, 2}, []float64{1, 2}, "spline"); err == nil {
		t.Error("unknown method gave no error")
	}
}

// TestRegularizeRefusesASparseFill: a fill whose grid would hold more than
// MaxFillFactor points per observation is refused before the grid is
// allocated (four points a billion steps apart once asked for 8 GB), and
// extreme times whose span overflows are refused too; the values come back
// unfilled.
func TestRegularizeRefusesASparseFill(t *testing.T) {
	for _, at := range [][]int64{
		{0, 1, 2, 1_000_000_000},
		{0, 1, 2, 40},           // 41 grid points for 4 observations: more than 10 per observation
		{-6e18, -5e18, 0, 5e18}, // every step fits in int64, the span does not
	} {
		x := []float64{1, 2, 3, 4}
		for _, method := range []FillMethod{FillLinear, FillPrevious} {
			r, err := Regularize(at, x, method)
			if err != nil || !r.TooSparse || len(r.Values) != len(x) {
				t.Errorf("at %v, %s: TooSparse %v, %d values, %v", at, method, r.TooSparse, len(r.Values), err)
			}
		}
	}
	// 39 grid points for 4 observations stay within the bound and are filled.
	r, err := Regularize([]int64{0, 1, 2, 38}, []float64{1, 2, 3, 4}, FillPrevious)
	if err != nil || r.TooSparse || len(r.Values) != 39 {
		t.Errorf("a fill within the bound: TooSparse %v, %d values, %v", r.TooSparse, len(r.Values), err)
	}
}
