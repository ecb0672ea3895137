package demodata

import (
	"cmp"
	"fmt"
	"slices"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/stats/verdict"
)

// TestDemoTopRanksRight judges the demo's shop series for seeds 1-5 as
// plumb diagnose does in the README (period 7, α = 0.05) and with the
// period detected, ranks them by score as diagnose's rank does (highest
// first), and requires that no planted random walk among the 12 ranked
// first (the 12 the report draws) is given a cause other than a unit root
// with d ≥ 1: the top of the ranking is what a new user reads first. It
// logs, per seed, the planted kinds of the top 12 and the causes given to
// every random walk.
func TestDemoTopRanksRight(t *testing.T) {
	for _, period := range []int{7, 0} {
		t.Run(fmt.Sprintf("period=%d", period), func(t *testing.T) { demoTopRanks(t, period) })
	}
}

func demoTopRanks(t *testing.T, period int) {
	const top = 12
	for _, seed := range []uint64{1, 2, 3, 4, 5} {
		sets, err := Generate(seed, DefaultSizes)
		if err != nil {
			t.Fatal(err)
		}
		shops := sets[0]
		type judged struct {
			s Series
			v verdict.StationarityResult
		}
		var all []judged
		for _, s := range shops.Series {
			v, err := verdict.Stationarity(s.Values, verdict.StationarityOptions{Period: period})
			if err != nil {
				t.Fatal(err)
			}
			all = append(all, judged{s, v})
		}
		slices.SortStableFunc(all, func(a, b judged) int { return cmp.Compare(b.v.Score, a.v.Score) })
		var kinds []string
		causes := map[string]int{}
		for i, j := range all {
			if j.s.Truth.Kind == RandomWalk {
				cause := fmt.Sprintf("%s/d=%d", j.v.MeanCause, j.v.Differences)
				causes[cause]++
				if i < top && (j.v.MeanCause != verdict.MeanUnitRoot || j.v.Differences < 1) {
					t.Errorf("seed %d: rank %d, %v, a planted random walk, is given %s", seed, i+1, j.s.Key, cause)
				}
			}
			if i < top {
				kinds = append(kinds, string(j.s.Truth.Kind))
			}
		}
		var c []string
		for k, n := range causes {
			c = append(c, fmt.Sprintf("%s %d", k, n))
		}
		slices.Sort(c)
		t.Logf("seed %d: top %d: %s\n  random walks' causes: %s", seed, top, strings.Join(kinds, ", "), strings.Join(c, ", "))
	}
}
