package unitroot

import (
	"math"
	"testing"

	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

func TestMacKinnonAsymptoticCritical(t *testing.T) {
	for _, test := range []struct {
		d    Deterministic
		want [3]float64
	}{
		// MacKinnon (2010) Table 2, asymptotic: from memory, and the same
		// numbers as the rows with observations "inf" in
		// testdata/reference/mackinnon_crit_statsmodels.csv (python3-statsmodels
		// 0.13.5, mackinnoncrit).
		{DeterministicLevel, [3]float64{-3.43035, -2.86154, -2.56677}},
		{DeterministicLevelAndSlope, [3]float64{-3.95877, -3.41049, -3.12705}},
		{DeterministicNone, [3]float64{-2.56574, -1.94100, -1.61682}},
	} {
		got := MacKinnonCritical(test.d, 0)
		for i := range got {
			if math.Abs(got[i]-test.want[i]) > 1e-4 {
				t.Errorf("%s: critical %v, want %v", test.d, got, test.want)
			}
		}
	}
}

// TestMacKinnonAgainstStatsmodels compares the finite-sample critical values
// at T = 25, 50, 100, 250, 500 and the p-values on a grid of τ from -20 to 3
// with python3-statsmodels 0.13.5 (mackinnoncrit, mackinnonp; written by
// testdata/reference/unit_root_statsmodels.py).
func TestMacKinnonAgainstStatsmodels(t *testing.T) {
	for _, row := range testseries.ReadCSV(t, "mackinnon_crit_statsmodels.csv") {
		d := Deterministic(row["deterministic"])
		observations := 0
		if row["observations"] != "inf" {
			observations = int(testseries.Num(t, row["observations"]))
		}
		got := MacKinnonCritical(d, observations)
		for i, col := range []string{"cutoff_01", "cutoff_05", "cutoff_10"} {
			if want := testseries.Num(t, row[col]); math.Abs(got[i]-want) > 1e-9 {
				t.Errorf("%s T=%s %s: %v, want %v", d, row["observations"], col, got[i], want)
			}
		}
	}
	rows := testseries.ReadCSV(t, "mackinnon_p_statsmodels.csv")
	if len(rows) < 200 {
		t.Fatalf("only %d p-value rows", len(rows))
	}
	for _, row := range rows {
		d, tau, want := Deterministic(row["deterministic"]), testseries.Num(t, row["statistic"]), testseries.Num(t, row["p_value"])
		if got := MacKinnonP(tau, d); math.Abs(got-want) > 1e-12 {
			t.Errorf("%s τ=%v: p %v, want %v", d, tau, got, want)
		}
	}
}

// TestMacKinnonPValueBounds: beyond the fits' ends the p-value is the fit's
// value at the end, marked; inside, MacKinnonP unchanged.
func TestMacKinnonPValueBounds(t *testing.T) {
	for _, d := range []Deterministic{DeterministicNone, DeterministicLevel, DeterministicLevelAndSlope} {
		m := mackinnon[d]
		p, bound := mackinnonPValue(m.min-5, d)
		if bound != PValueAtMost || p != MacKinnonP(m.min, d) || !(p > 0) {
			t.Errorf("%s below τmin: %v %s", d, p, bound)
		}
		t.Logf("%s: below τmin = %v, p at most %.3g", d, m.min, p)
		if !math.IsInf(m.max, 1) {
			p, bound = mackinnonPValue(m.max+1, d)
			if bound != PValueAtLeast || p != MacKinnonP(m.max, d) || !(p < 1) {
				t.Errorf("%s above τmax: %v %s", d, p, bound)
			}
			t.Logf("%s: above τmax = %v, p at least %.5f", d, m.max, p)
		}
		if p, bound = mackinnonPValue(-2, d); bound != PValueEstimate || p != MacKinnonP(-2, d) {
			t.Errorf("%s at -2: %v %s", d, p, bound)
		}
	}
}
