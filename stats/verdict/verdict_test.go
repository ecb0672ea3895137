package verdict

import (
	"math"
	"sort"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// TestVerdictAirPassengers: R's AirPassengers (r-base-core 4.2.2's
// datasets, monthly airline passengers 1949-60; recovered exactly from the
// exported logarithm in datasets_r.csv by rounding exp(v) to whole
// passengers), the textbook series whose spread grows with its level: the
// verdict recommends a Box-Cox transform and one seasonal difference at
// period 12, and the recipe cures it.
func TestVerdictAirPassengers(t *testing.T) {
	_, series := testseries.ReferenceSeries(t)
	x := append([]float64(nil), series["log_airpassengers"]...)
	for i := range x {
		x[i] = math.Round(math.Exp(x[i]))
	}
	if x[0] != 112 || x[len(x)-1] != 432 {
		t.Fatalf("AirPassengers starts %v and ends %v, want 112 and 432", x[0], x[len(x)-1])
	}
	for _, period := range []int{12, 0} {
		v, err := Stationarity(x, StationarityOptions{Period: period})
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("period %d: λ %.3f, D %d, d %d, spread %s, cured %v: %s", period, v.BoxCoxLambda, v.SeasonalDifferences, v.Differences, v.SpreadCause, v.Cured, v.Reason)
		if math.IsNaN(v.BoxCoxLambda) || v.SpreadCause != SpreadLevel || v.SpreadStable {
			t.Errorf("period %d: no Box-Cox transform recommended (λ %v, spread cause %q)", period, v.BoxCoxLambda, v.SpreadCause)
		}
		if v.Period != 12 || v.SeasonalDifferences != 1 {
			t.Errorf("period %d: D = %d at period %d, want 1 at 12", period, v.SeasonalDifferences, v.Period)
		}
		if !v.Cured {
			t.Errorf("period %d: the recipe leaves %v", period, v.LeftViolations)
		}
	}
}

// TestVerdictScoresDistinct: on 400 planted groups (patterns_test.go, 36
// or 37 of each pattern, seed 404) the score takes at least 395 distinct
// values, so that rank orders the groups, and it lies in [0, 3].
func TestVerdictScoresDistinct(t *testing.T) {
	var scores []float64
	for i := 0; len(scores) < 400; i++ {
		k := testseries.AllPatterns[i%len(testseries.AllPatterns)]
		s := testseries.PlantPanel(k, 1, 730, 404+uint64(i))[0]
		v, err := Stationarity(s.X, StationarityOptions{Period: s.Period})
		if err != nil {
			t.Fatal(err)
		}
		if !(v.Score >= 0 && v.Score <= 3) {
			t.Fatalf("%s: score %v outside [0, 3]", k, v.Score)
		}
		scores = append(scores, v.Score)
	}
	sort.Float64s(scores)
	distinct := 1
	for i := 1; i < len(scores); i++ {
		if scores[i] != scores[i-1] {
			distinct++
		}
	}
	t.Logf("%d distinct scores among 400 groups, from %.3f to %.3f", distinct, scores[0], scores[399])
	if distinct < 395 {
		t.Errorf("%d distinct scores among 400", distinct)
	}
}

// TestVerdictReasons: every verdict has a reason, also when it cannot
// judge; a stationary series is told so; the reason names the cause.
// (One series of each pattern: its rates are TestVerdictPatterns' job.)
func TestVerdictReasons(t *testing.T) {
	for _, test := range []struct {
		name string
		x    []float64
		want string
	}{
		{"too short", []float64{1, 2, 3}, "Too short"},
		{"constant", make([]float64, 30), "Constant"},
		{"missing", append(make([]float64, 30), math.NaN()), "missing"},
		{"stationary", testseries.PlantPanel(testseries.PatStationary, 1, 730, 2)[0].X, "stable"},
		{"trend", testseries.PlantPanel(testseries.PatTrend, 1, 730, 1)[0].X, "straight line"},
		{"shift", testseries.PlantPanel(testseries.PatLevelShift, 1, 730, 1)[0].X, "jumps once"},
		{"random walk", testseries.PlantPanel(testseries.PatRandomWalk, 1, 730, 1)[0].X, "random walk"},
		{"intermittent", testseries.PlantPanel(testseries.PatIntermittent, 1, 730, 1)[0].X, "intermittent demand"},
	} {
		v, err := Stationarity(test.x, StationarityOptions{Period: 7})
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(v.Reason, test.want) {
			t.Errorf("%s: reason %q does not say %q", test.name, v.Reason, test.want)
		}
	}
}
