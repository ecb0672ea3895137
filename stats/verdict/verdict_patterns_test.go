package verdict

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// TestVerdictPatterns judges 200 seeded series of each planted pattern
// (patterns_test.go: length 730, period 7, hourly series period 24; invented
// data, seed 2026, not the demo's) and prints the whole confusion table.
// The targets are the (a share of the 200 series of a pattern):
//
//	level shift of 4 marginal SDs: level_shift, d = 0, shift within 10   ≥ 80%
//	trend plus AR(1): trend, d = 0                                        ≥ 85%
//	random walk: unit_root, d ≥ 1                                         ≥ 90%
//	random walk in the logarithm: λ in [-0.5, 0.5], d ≥ 1                 ≥ 85%
//	growing noise at a steady level: spread cause time                    ≥ 85%
//	70% zero days: intermittent or lumpy, no λ                            ≥ 95%
//	five outliers of 10 SDs: at least 3 counted, not differenced          ≥ 80%
//	stationary AR(1): stationary                                          ≥ 90%
//	fixed weekly pattern: seasonal kind fixed                             ≥ 85%
//	hourly, periods 24 and 168: 168 handled or named                      ≥ 85%
//
// and, pooled over every pattern, of the series whose recipe is not the
// identity (intermittent demand and a spread that changes over time
// aside), at least 90% are judged stationary again after the recipe is
// applied to the series as it came (what stationarize returns).
func TestVerdictPatterns(t *testing.T) {
	const n, T = 200, 730
	type tally struct {
		total, unitRoot, trend, shift, shiftNear, d1, bigD, fixed, drifting  int
		lambda, lambdaNear, spreadLevel, spreadTime, intermittent, outliers3 int
		stationary, second, cured, recipes, passed, target                   int
	}
	var rows []string
	var pooledRecipes, pooledPassed int
	for _, k := range testseries.AllPatterns {
		var c tally
		for _, s := range testseries.PlantPanel(k, n, T, 2026) {
			v, err := Stationarity(s.X, StationarityOptions{Period: s.Period})
			if err != nil {
				t.Fatal(err)
			}
			c.total++
			switch v.MeanCause {
			case MeanUnitRoot:
				c.unitRoot++
			case MeanTrend:
				c.trend++
			case MeanLevelShift:
				c.shift++
				if s.Kind == testseries.PatLevelShift && v.Differences == 0 && testseries.Abs(v.ShiftIndex-s.ShiftAt) <= 10 {
					c.shiftNear++
				}
			}
			if v.Differences >= 1 {
				c.d1++
			}
			if v.SeasonalDifferences >= 1 {
				c.bigD++
			}
			switch v.SeasonalKind {
			case SeasonalFixed:
				c.fixed++
			case SeasonalDrifting:
				c.drifting++
			}
			if !math.IsNaN(v.BoxCoxLambda) {
				c.lambda++
				if math.Abs(v.BoxCoxLambda) <= 0.5 && v.Differences >= 1 {
					c.lambdaNear++
				}
			}
			switch v.SpreadCause {
			case SpreadLevel:
				c.spreadLevel++
			case SpreadTime:
				c.spreadTime++
			}
			if v.Demand.Intermittent() && math.IsNaN(v.BoxCoxLambda) {
				c.intermittent++
			}
			if len(v.Outliers) >= 3 && v.Differences == 0 && v.SeasonalDifferences == 0 {
				c.outliers3++
			}
			if v.Stationary {
				c.stationary++
			}
			if v.SecondPeriod > 0 {
				c.second++
			}
			if v.Cured {
				c.cured++
			}
			rec := v.Recipe()
			if !rec.Identity() && !v.Demand.Intermittent() && v.SpreadCause != SpreadTime {
				c.recipes++
				y, status, err := rec.Apply(s.X)
				if err != nil {
					t.Fatal(err)
				}
				if status == stats.StatusOK {
					again, err := Stationarity(y, StationarityOptions{Period: s.Period})
					if err != nil {
						t.Fatal(err)
					}
					if again.Stationary {
						c.passed++
					}
				}
			}
		}
		want, got := 0.0, 0
		switch k {
		case testseries.PatLevelShift:
			want, got = 0.80, c.shiftNear
		case testseries.PatTrend:
			want, got = 0.85, c.trend // a trend cause never differences
		case testseries.PatRandomWalk:
			want, got = 0.90, c.unitRoot // a unit-root cause always differences
		case testseries.PatLogWalk:
			want, got = 0.85, c.lambdaNear
		case testseries.PatGrowingNoise:
			want, got = 0.85, c.spreadTime
		case testseries.PatIntermittent:
			want, got = 0.95, c.intermittent
		case testseries.PatOutliers:
			want, got = 0.80, c.outliers3
		case testseries.PatStationary:
			want, got = 0.90, c.stationary
		case testseries.PatFixedWeekly:
			want, got = 0.85, c.fixed
		case testseries.PatTwoPeriods:
			want, got = 0.85, c.second
		}
		if float64(got) < want*float64(c.total) {
			t.Errorf("%s: target met in %d of %d, want at least %.0f%%", k, got, c.total, 100*want)
		}
		pooledRecipes += c.recipes
		pooledPassed += c.passed
		met := "(no target)"
		if want > 0 {
			met = fmt.Sprintf("%d of %d, want ≥ %.0f%%", got, c.total, 100*want)
		}
		rows = append(rows, fmt.Sprintf("%-16s %5d %5d %5d %5d %5d %5d %5d %5d %5d %5d %5d %5d %5d %5d %5d %5d %5d  %s",
			k, c.unitRoot, c.trend, c.shift, c.d1, c.bigD, c.fixed, c.drifting, c.lambda, c.spreadLevel, c.spreadTime,
			c.intermittent, c.outliers3, c.stationary, c.second, c.cured, c.recipes, c.passed, met))
	}
	header := fmt.Sprintf("%-16s %5s %5s %5s %5s %5s %5s %5s %5s %5s %5s %5s %5s %5s %5s %5s %5s %5s  %s",
		"planted", "unit", "trend", "shift", "d>=1", "D=1", "fixed", "drift", "λ", "s:lev", "s:tim", "inter", "outl3", "stat", "2nd", "cured", "recip", "again", "target met")
	t.Logf("verdict on 200 planted series per pattern (length 730, seed 2026):\n%s\n%s", header, strings.Join(rows, "\n"))
	t.Logf("judged stationary again after the recipe: %d of %d (%.1f%%)", pooledPassed, pooledRecipes, 100*float64(pooledPassed)/float64(pooledRecipes))
	if float64(pooledPassed) < 0.90*float64(pooledRecipes) {
		t.Errorf("only %d of %d recipes cure their series", pooledPassed, pooledRecipes)
	}
}
