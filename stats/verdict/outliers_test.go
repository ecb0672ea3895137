package verdict

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
	"testing"

	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// TestOutliersFindsPlanted: on 200 planted series each (patterns_test.go,
// seed 99) the five planted outliers of 10 marginal standard deviations in
// an AR(1) are found exactly, and series with no outlier (a stationary
// AR(1), a level shift of 4 standard deviations, a random walk, noise whose
// spread grows fourfold, a fixed weekly pattern) have at most a handful
// flagged over all 200 series: a level shift, a wandering level, a growing
// spread or a seasonal peak is not an outlier.
func TestOutliersFindsPlanted(t *testing.T) {
	found, planted := 0, 0
	for _, s := range testseries.PlantPanel(testseries.PatOutliers, 200, 730, 99) {
		o := Outliers(s.X, OutlierOptions{Period: 7})
		planted += len(s.Outliers)
		hit := map[int]bool{}
		for _, p := range o.Positions {
			hit[p] = true
		}
		for _, p := range s.Outliers {
			if hit[p] {
				found++
			}
		}
		for _, p := range s.Outliers {
			// The replacement lies near the level, far from the outlier
			// (10 standard deviations of 5 away).
			if hit[p] && math.Abs(o.Cleaned[p]-s.X[p]) < 5*5 {
				t.Errorf("outlier at %d (%v) replaced by %v", p, s.X[p], o.Cleaned[p])
			}
		}
	}
	t.Logf("planted outliers found: %d of %d", found, planted)
	if found < planted*98/100 {
		t.Errorf("found %d of %d planted outliers", found, planted)
	}
	for _, k := range []testseries.Pattern{testseries.PatStationary, testseries.PatLevelShift, testseries.PatRandomWalk, testseries.PatGrowingNoise, testseries.PatFixedWeekly} {
		flagged, series := 0, 0
		for _, s := range testseries.PlantPanel(k, 200, 730, 99) {
			n := len(Outliers(s.X, OutlierOptions{Period: 7}).Positions)
			flagged += n
			if n > 0 {
				series++
			}
		}
		t.Logf("%s: %d points flagged in %d of 200 series", k, flagged, series)
		if series > 6 {
			t.Errorf("%s: outliers flagged in %d of 200 series without any", k, series)
		}
	}
}

// TestOutliersEdges: short, constant and mostly-zero series have no
// outliers; a run of three extreme values is a change of level, not three
// outliers; a single spike at either end is found.
func TestOutliersEdges(t *testing.T) {
	ramp := func(n int) []float64 {
		x := make([]float64, n)
		for i := range x {
			x[i] = float64(i%5) + 0.1*float64(i%3)
		}
		return x
	}
	zeros := make([]float64, 100)
	zeros[10], zeros[50] = 7, 3
	run := ramp(100)
	run[40], run[41], run[42] = 90, 91, 92
	first, last := ramp(100), ramp(100)
	first[0], last[99] = 80, 80
	for _, test := range []struct {
		name string
		x    []float64
		want string
	}{
		{"short", []float64{1, 2, 100, 3}, "[]"},
		{"constant", []float64{5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 5}, "[]"},
		{"mostly zero", zeros, "[]"},
		{"run of three", run, "[]"},
		{"spike first", first, "[0]"},
		{"spike last", last, "[99]"},
	} {
		if got := fmt.Sprint(Outliers(test.x, OutlierOptions{}).Positions); got != test.want {
			t.Errorf("%s: outliers at %s, want %s", test.name, got, test.want)
		}
	}
}

// TestMedianOfFew checks the small-window median against sorting, for
// every length up to 17 and with ties.
func TestMedianOfFew(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 42))
	for n := 0; n <= 17; n++ {
		for rep := 0; rep < 50; rep++ {
			v := make([]float64, n)
			for i := range v {
				v[i] = math.Round(rng.NormFloat64() * 2)
			}
			s := append([]float64(nil), v...)
			sort.Float64s(s)
			want := math.NaN()
			if n > 0 {
				want = s[n/2]
				if n%2 == 0 {
					want = (s[n/2-1] + s[n/2]) / 2
				}
			}
			if got := medianOfFew(v); got != want && !(math.IsNaN(got) && math.IsNaN(want)) {
				t.Fatalf("median of %v = %v, want %v", v, got, want)
			}
		}
	}
}
