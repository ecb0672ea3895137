package forecast

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
	"github.com/plumb-sql/plumb/stats/verdict"
)

// TestForecastByVerdictCoverage: the whole chain a user runs (the
// verdict's recipe, fitted on the series it judged, then ForecastByRecipe)
// on 1,000 planted series per pattern (patterns_test.go, seed 15), each
// 744 values long: the first 730 are judged and fitted, the last 14 held
// out. The 95% intervals must cover 95% ± 2.5% of the held-out values at
// h = 1 and at h = 14. For a trend, a level shift and a fixed weekly
// pattern this holds only if the recipe removes the deterministic part
// (differencing them instead would widen the intervals, over-covering);
// for a random walk, only if the intervals accumulate through the
// differencing.
func TestForecastByVerdictCoverage(t *testing.T) {
	const n, fit, h = 1000, 730, 14
	var rows []string
	for _, k := range []testseries.Pattern{testseries.PatTrend, testseries.PatLevelShift, testseries.PatFixedWeekly, testseries.PatRandomWalk, testseries.PatStationary} {
		covered1, coveredH, used := 0, 0, 0
		for _, s := range testseries.PlantPanel(k, n, fit+h, 15) {
			v, err := verdict.Stationarity(s.X[:fit], verdict.StationarityOptions{Period: s.Period})
			if err != nil {
				t.Fatal(err)
			}
			if v.Status != stats.StatusOK && v.Status != stats.StatusSeasonUnknown {
				continue
			}
			f, err := ForecastByRecipe(v.Judged(), v.Recipe(), RecipeForecastOptions{Horizon: h, Coverage: 0.95})
			if err != nil {
				t.Fatal(err)
			}
			if f.Status != stats.StatusOK {
				continue
			}
			used++
			future := s.X[fit:]
			if future[0] >= f.Lower[0] && future[0] <= f.Upper[0] {
				covered1++
			}
			if future[h-1] >= f.Lower[h-1] && future[h-1] <= f.Upper[h-1] {
				coveredH++
			}
		}
		rows = append(rows, fmt.Sprintf("%-14s %5d %6.1f%% %6.1f%%", k, used, 100*float64(covered1)/float64(used), 100*float64(coveredH)/float64(used)))
		for _, c := range []struct {
			name    string
			covered int
		}{{"h = 1", covered1}, {"h = 14", coveredH}} {
			if r := float64(c.covered) / float64(used); used < n*95/100 || math.Abs(r-0.95) > 0.025 {
				t.Errorf("%s: 95%% intervals cover %d of %d at %s", k, c.covered, used, c.name)
			}
		}
	}
	t.Logf("coverage of 95%% intervals, verdict's recipe fitted on 730 values:\n%-14s %5s %7s %7s\n%s", "planted", "used", "h = 1", "h = 14", strings.Join(rows, "\n"))
}

// TestForecastByRecipeContinuesDeterministicSteps: with no noise left to
// model, forecasts continue a recipe's deterministic part exactly: a
// straight line goes on, a shifted level stays, a fixed weekly pattern
// repeats (plain algebra).
func TestForecastByRecipeContinuesDeterministicSteps(t *testing.T) {
	x := make([]float64, 200)
	shape := []float64{1, -2, 0.5, 3, -1, -1.5, 0}
	noise := testseries.AR1Noise(rand.New(rand.NewPCG(3, 4)), len(x), 0, 1e-4) // keeps the AR fit from being exact
	for i := range x {
		x[i] = 10 + 0.5*float64(i) + shape[i%7] + noise[i]
	}
	rec := verdict.Recipe{Period: 7, SeasonalMeans: shape, Trend: true, TrendIntercept: 10, TrendSlope: 0.5}
	f, err := ForecastByRecipe(x, rec, RecipeForecastOptions{Horizon: 10, Coverage: 0.9})
	if err != nil || f.Status != stats.StatusOK {
		t.Fatalf("%v %s", err, f.Status)
	}
	for i, got := range f.Mean {
		tpos := 200 + i
		want := 10 + 0.5*float64(tpos) + shape[tpos%7]
		if math.Abs(got-want) > 1e-3 {
			t.Errorf("step %d: %v, want %v", i+1, got, want)
		}
	}
	if _, err := ForecastByRecipe(x, rec, RecipeForecastOptions{Horizon: 0, Coverage: 0.9}); err == nil {
		t.Error("horizon 0 gave no error")
	}
	if _, err := ForecastByRecipe(x, rec, RecipeForecastOptions{Horizon: 3, Coverage: 1}); err == nil {
		t.Error("coverage 1 gave no error")
	}
	if f, err := ForecastByRecipe([]float64{1, 2}, verdict.Recipe{}, RecipeForecastOptions{Horizon: 3, Coverage: 0.9}); err != nil || f.Status != stats.StatusTooShort || !math.IsNaN(f.Mean[0]) {
		t.Errorf("two values: %v %s %v", err, f.Status, f.Mean)
	}
}
