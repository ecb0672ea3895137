package stats

import (
	"math"
	"testing"
)

// TestDFGLSAgainstUrca compares the DF-GLS statistic with r-cran-urca 1.3-3,
// ur.ers(x, type = "DF-GLS", model = "constant" | "trend", lag.max = k), in
// testdata/reference/unit_root_r.csv, within 1e-6 relative, and the trend
// critical values with urca's (ERS 1996 Table 1).
func TestDFGLSAgainstUrca(t *testing.T) {
	_, series := referenceSeries(t)
	checked, worst := 0, 0.0
	for _, row := range readCSV(t, "unit_root_r.csv") {
		if row["test"] != "dfgls" {
			continue
		}
		k := int(num(t, row["lags"]))
		d := Deterministic(row["deterministic"])
		got, err := DFGLS(series[row["series"]], DFGLSOptions{Deterministic: d, LagRule: LagFixed, MaxLag: &k})
		if err != nil {
			t.Fatal(err)
		}
		want := num(t, row["statistic"])
		rel := math.Abs(got.Statistic-want) / math.Abs(want)
		worst = math.Max(worst, rel)
		if got.Status != StatusOK || rel > 1e-6 {
			t.Errorf("%s %s k=%d: %.10g (%s), want %.10g", row["series"], d, k, got.Statistic, got.Status, want)
		}
		if d == DeterministicTrend {
			for i, col := range []string{"crit_1pct", "crit_5pct", "crit_10pct"} {
				if c := num(t, row[col]); math.Abs(got.CriticalValues[i]-c) > 1e-9 {
					t.Errorf("%s n=%d %s: %v, want %v", row["series"], len(series[row["series"]]), col, got.CriticalValues[i], c)
				}
			}
		}
		checked++
	}
	t.Logf("%d rows, largest relative difference %.3g", checked, worst)
	if checked < 600 {
		t.Errorf("only %d rows", checked)
	}
}
