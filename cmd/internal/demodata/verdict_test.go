package demodata

import (
	"fmt"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/stats"
)

// TestVerdictFindsPlantedBehaviour runs stats.Stationarity on every series
// of the default demo (seed 1) and prints the confusion table of planted
// kind against verdict. The targets are the issue's: at least 95% of random
// walks get d ≥ 1; at least 90% of seasonal series get D = 1; at least 90%
// of growing-spread series are flagged on spread; at most 10% of stationary
// AR(1) series are flagged on anything, at α = 0.05.
//
// It runs twice: with the period given (7 for shops, 24 for containers) and
// with the period detected among stats.DefaultPeriods; and over three seeds
// (378 series), so that the rates are not one seed's luck.
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
	type tally struct{ n, d1, bigD, spread, mean, any, period int }
	counts := map[Kind]*tally{}
	for _, k := range Kinds {
		counts[k] = &tally{}
	}
	for _, ds := range sets {
		for _, s := range ds.Series {
			opts := stats.StationarityOptions{Period: ds.Period}
			if detect {
				opts.Period = 0
			}
			v, err := stats.Stationarity(s.Values, opts)
			if err != nil {
				t.Fatal(err)
			}
			c := counts[s.Truth.Kind]
			c.n++
			if v.Differences >= 1 {
				c.d1++
			}
			if v.SeasonalDifferences == 1 {
				c.bigD++
			}
			if !v.SpreadStable {
				c.spread++
			}
			if !v.MeanStable {
				c.mean++
			}
			if !v.Stationary {
				c.any++
			}
			if v.Period == ds.Period {
				c.period++
			}
		}
	}
	var b strings.Builder
	fmt.Fprintf(&b, "%-15s %6s %6s %6s %7s %7s %8s %7s\n", "planted", "series", "d>=1", "D=1", "mean", "spread", "flagged", "period")
	for _, k := range Kinds {
		c := counts[k]
		fmt.Fprintf(&b, "%-15s %6d %6d %6d %7d %7d %8d %7d\n", k, c.n, c.d1, c.bigD, c.mean, c.spread, c.any, c.period)
	}
	t.Logf("confusion table, demo seeds 1-3, α = 0.05, period detected: %v\n%s", detect, b.String())
	rate := func(k, n int) float64 { return float64(k) / float64(n) }
	if c := counts[RandomWalk]; rate(c.d1, c.n) < 0.95 {
		t.Errorf("random walks with d ≥ 1: %d of %d", c.d1, c.n)
	}
	if c := counts[Seasonal]; rate(c.period, c.n) < 0.90 {
		t.Errorf("seasonal series with the planted period: %d of %d", c.period, c.n)
	}
	if c := counts[Seasonal]; rate(c.bigD, c.n) < 0.90 {
		t.Errorf("seasonal series with D = 1: %d of %d", c.bigD, c.n)
	}
	if c := counts[GrowingSpread]; rate(c.spread, c.n) < 0.90 {
		t.Errorf("growing-spread series flagged on spread: %d of %d", c.spread, c.n)
	}
	if c := counts[Stationary]; rate(c.any, c.n) > 0.10 {
		t.Errorf("stationary series flagged: %d of %d", c.any, c.n)
	}
}
