package stats

import (
	"math"
	"testing"
)

// TestKPSSTable checks the p-value at each point of Kwiatkowski et al.
// (1992) Table 1 and the bounds beyond it.
func TestKPSSTable(t *testing.T) {
	for _, test := range []struct {
		d     Deterministic
		stat  float64
		p     float64
		bound PValueBound
	}{
		// KPSS (1992) Table 1, level: 10, 5, 2.5, 1% points.
		{DeterministicConstant, 0.347, 0.10, PValueAtLeast},
		{DeterministicConstant, 0.463, 0.05, PValueEstimate},
		{DeterministicConstant, 0.574, 0.025, PValueEstimate},
		{DeterministicConstant, 0.739, 0.01, PValueAtMost},
		// KPSS (1992) Table 1, trend.
		{DeterministicTrend, 0.119, 0.10, PValueAtLeast},
		{DeterministicTrend, 0.146, 0.05, PValueEstimate},
		{DeterministicTrend, 0.176, 0.025, PValueEstimate},
		{DeterministicTrend, 0.216, 0.01, PValueAtMost},
		// Linear interpolation half-way between 5% and 2.5% (plain arithmetic).
		{DeterministicConstant, (0.463 + 0.574) / 2, 0.0375, PValueEstimate},
		// Beyond the table.
		{DeterministicConstant, 0.1, 0.10, PValueAtLeast},
		{DeterministicTrend, 3, 0.01, PValueAtMost},
	} {
		p, bound := interpolateUpperTail(test.stat, kpssTable[test.d], kpssLevels)
		if math.Abs(p-test.p) > 1e-12 || bound != test.bound {
			t.Errorf("%s η=%v: p %v (%s), want %v (%s)", test.d, test.stat, p, bound, test.p, test.bound)
		}
	}
}

// TestKPSSAgainstStatsmodels compares every KPSS row of
// testdata/reference/unit_root_statsmodels.csv (python3-statsmodels 0.13.5,
// kpss(x, regression='c'|'ct', nlags='auto'|k)): the statistic within 1e-6
// relative, the same bandwidth, and the p-value within 1e-3 (statsmodels
// clips it to the table's ends as plumb does).
func TestKPSSAgainstStatsmodels(t *testing.T) {
	_, series := referenceSeries(t)
	checked := map[string]int{}
	for _, row := range readCSV(t, "unit_root_statsmodels.csv") {
		if row["test"] != "kpss" {
			continue
		}
		x := series[row["series"]]
		opts := KPSSOptions{Deterministic: Deterministic(row["deterministic"])}
		if row["lag_rule"] == "fixed" {
			l := int(num(t, row["max_lag"]))
			opts.Bandwidth = &l
		}
		got, err := KPSS(x, opts)
		if err != nil {
			t.Fatal(err)
		}
		where := row["series"] + " " + row["deterministic"] + " " + row["lag_rule"] + " " + row["max_lag"]
		want := num(t, row["statistic"])
		if got.Status != StatusOK || math.Abs(got.Statistic-want) > 1e-6*math.Abs(want) {
			t.Errorf("%s: statistic %.12g (%s), want %.12g", where, got.Statistic, got.Status, want)
		}
		if got.Lags != int(num(t, row["lags"])) {
			t.Errorf("%s: bandwidth %d, want %s", where, got.Lags, row["lags"])
		}
		if p := num(t, row["p_value"]); math.Abs(got.PValue-p) > 1e-3 {
			t.Errorf("%s: p %v, want %v", where, got.PValue, p)
		}
		checked[row["lag_rule"]]++
	}
	t.Logf("rows checked: %v", checked)
	if checked["auto"] < 400 || checked["fixed"] < 1000 {
		t.Errorf("too few rows: %v", checked)
	}
}
