package demodata

import (
	"fmt"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/verdict"
)

// TestVerdictFindsPlantedBehaviour runs verdict.Stationarity on every series
// of the demo for seeds 1-3 (378 series, 63 of each planted kind) and
// prints the confusion table of planted kind against verdict and cause. The
// targets, at α = 0.05: random walks get a unit root and d ≥ 1 in at least
// 90%; trends get trend in at least 85%; level shifts get level_shift in at
// least 80%; seasonal series are seasonal with the planted period in at
// least 90%; growing-spread series are flagged on spread in at least 90%;
// at most 10% of stationary AR(1) series are flagged on anything.
//
// It also applies each series' recipe and judges the output again: of the
// series whose recipe is not the identity (a spread that changes over time
// aside: no recipe cures it, and the verdict says so), at least 90% must be
// judged stationary.
//
// It runs with the period given (7 for shops, 24 for containers) and with
// the period detected among verdict.DefaultPeriods.
func TestVerdictFindsPlantedBehaviour(t *testing.T) {
	for _, detect := range []bool{false, true} {
		t.Run(fmt.Sprintf("detect=%v", detect), func(t *testing.T) { verdictConfusion(t, detect) })
	}
}

func verdictConfusion(t *testing.T, detect bool) {
	var sets []Dataset
	for _, seed := range []uint64{1, 2, 3} {
		s, err := Generate(seed, DefaultSizes)
		if err != nil {
			t.Fatal(err)
		}
		sets = append(sets, s...)
	}
	type tally struct {
		n, unitRoot, trend, shift, seasonal, spread, spreadTime, spreadLevel, any, period int
		recipes, cured                                                                    int
	}
	counts := map[Kind]*tally{}
	for _, k := range Kinds {
		counts[k] = &tally{}
	}
	for _, ds := range sets {
		for _, s := range ds.Series {
			opts := verdict.StationarityOptions{Period: ds.Period}
			if detect {
				opts.Period = 0
			}
			v, err := verdict.Stationarity(s.Values, opts)
			if err != nil {
				t.Fatal(err)
			}
			c := counts[s.Truth.Kind]
			c.n++
			switch v.MeanCause {
			case verdict.MeanUnitRoot:
				c.unitRoot++
			case verdict.MeanTrend:
				c.trend++
			case verdict.MeanLevelShift:
				c.shift++
			}
			if v.Seasonal && v.Period == ds.Period {
				c.seasonal++
			}
			if !v.SpreadStable {
				c.spread++
			}
			switch v.SpreadCause {
			case verdict.SpreadTime:
				c.spreadTime++
			case verdict.SpreadLevel:
				c.spreadLevel++
			}
			if !v.Stationary {
				c.any++
			}
			if v.Period == ds.Period {
				c.period++
			}
			rec := v.Recipe()
			if !rec.Identity() && v.SpreadCause != verdict.SpreadTime {
				c.recipes++
				y, status, err := rec.Apply(s.Values)
				if err != nil {
					t.Fatal(err)
				}
				if status == stats.StatusOK {
					again, err := verdict.Stationarity(y, opts)
					if err != nil {
						t.Fatal(err)
					}
					if again.Stationary {
						c.cured++
					}
				}
			}
		}
	}
	var b strings.Builder
	fmt.Fprintf(&b, "%-15s %6s %6s %6s %6s %8s %7s %7s %7s %8s %7s %s\n", "planted", "series", "unit", "trend", "shift", "seasonal", "spread", "s:time", "s:level", "flagged", "period", "stationary after recipe")
	recipes, cured := 0, 0
	for _, k := range Kinds {
		c := counts[k]
		fmt.Fprintf(&b, "%-15s %6d %6d %6d %6d %8d %7d %7d %7d %8d %7d %d of %d\n", k, c.n, c.unitRoot, c.trend, c.shift, c.seasonal, c.spread, c.spreadTime, c.spreadLevel, c.any, c.period, c.cured, c.recipes)
		recipes += c.recipes
		cured += c.cured
	}
	t.Logf("confusion table, demo seeds 1-3, α = 0.05, period detected: %v\n%s", detect, b.String())
	rate := func(k, n int) float64 { return float64(k) / float64(n) }
	if c := counts[RandomWalk]; rate(c.unitRoot, c.n) < 0.90 {
		t.Errorf("random walks with a unit root: %d of %d", c.unitRoot, c.n)
	}
	if c := counts[Trend]; rate(c.trend, c.n) < 0.85 {
		t.Errorf("trends called trend: %d of %d", c.trend, c.n)
	}
	if c := counts[LevelShift]; rate(c.shift, c.n) < 0.80 {
		t.Errorf("level shifts called level_shift: %d of %d", c.shift, c.n)
	}
	if c := counts[Seasonal]; rate(c.seasonal, c.n) < 0.90 {
		t.Errorf("seasonal series found seasonal at the planted period: %d of %d", c.seasonal, c.n)
	}
	if c := counts[GrowingSpread]; rate(c.spread, c.n) < 0.90 {
		t.Errorf("growing-spread series flagged on spread: %d of %d", c.spread, c.n)
	}
	if c := counts[Stationary]; rate(c.any, c.n) > 0.10 {
		t.Errorf("stationary series flagged: %d of %d", c.any, c.n)
	}
	t.Logf("stationary after their recipe: %d of %d (%.1f%%)", cured, recipes, 100*rate(cured, recipes))
	if rate(cured, recipes) < 0.90 {
		t.Errorf("stationary after their recipe: %d of %d", cured, recipes)
	}
}
