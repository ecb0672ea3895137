package unitroot

import (
	"math"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// TestADFAgainstStatsmodels compares every ADF row of
// testdata/reference/unit_root_statsmodels.csv (python3-statsmodels 0.13.5,
// adfuller(x, maxlag=max_lag, regression=..., autolag=AIC|BIC|t-stat|None))
// on R's datasets, statsmodels' log realgdp and 200 simulated series: the
// statistic within 1e-6 relative, the same lag and number of observations,
// the p-value within 1e-3 and the critical values within 1e-9. Beyond the
// ends of MacKinnon's fits statsmodels reports 0 or 1; plumb reports the
// fit's value at its end, marked as a bound (mackinnonPValue).
func TestADFAgainstStatsmodels(t *testing.T) {
	_, series := testseries.ReferenceSeries(t)
	rows := testseries.ReadCSV(t, "unit_root_statsmodels.csv")
	checked := map[string]int{}
	bounded := 0
	for _, row := range rows {
		if row["test"] != "adf" {
			continue
		}
		x := series[row["series"]]
		maxLag := int(testseries.Num(t, row["max_lag"]))
		opts := ADFOptions{Deterministic: Deterministic(row["deterministic"]), LagRule: LagRule(row["lag_rule"]), MaxLag: &maxLag}
		got, err := ADF(x, opts)
		if err != nil {
			t.Fatal(err)
		}
		where := row["series"] + " " + row["deterministic"] + " " + row["lag_rule"] + " max " + row["max_lag"]
		if got.Status != stats.StatusOK {
			t.Errorf("%s: status %s", where, got.Status)
			continue
		}
		want := testseries.Num(t, row["statistic"])
		if math.Abs(got.Statistic-want) > 1e-6*math.Abs(want) {
			t.Errorf("%s: statistic %.12g, want %.12g", where, got.Statistic, want)
		}
		if got.Lags != int(testseries.Num(t, row["lags"])) || got.Observations != int(testseries.Num(t, row["observations"])) {
			t.Errorf("%s: lags %d observations %d, want %s %s", where, got.Lags, got.Observations, row["lags"], row["observations"])
		}
		p := testseries.Num(t, row["p_value"])
		switch got.PValueBound {
		case PValueEstimate:
			if math.Abs(got.PValue-p) > 1e-3 {
				t.Errorf("%s: p %v, want %v", where, got.PValue, p)
			}
		case PValueAtLeast: // beyond τmax: statsmodels says 1, plumb the fit's value there
			bounded++
			if p != 1 || got.PValue > 1 || got.PValue < 0.99 {
				t.Errorf("%s: p at least %v, statsmodels %v", where, got.PValue, p)
			}
		case PValueAtMost: // beyond τmin: statsmodels says 0
			bounded++
			if p != 0 || got.PValue > 1e-20 || got.PValue <= 0 {
				t.Errorf("%s: p at most %v, statsmodels %v", where, got.PValue, p)
			}
		}
		for i, col := range []string{"cutoff_01", "cutoff_05", "cutoff_10"} {
			if c := testseries.Num(t, row[col]); math.Abs(got.CriticalValues[i]-c) > 1e-9 {
				t.Errorf("%s: %s %v, want %v", where, col, got.CriticalValues[i], c)
			}
		}
		checked[row["lag_rule"]]++
	}
	t.Logf("rows checked per lag rule: %v; %d beyond the ends of MacKinnon's fits (p-value marked as a bound)", checked, bounded)
	if checked["aic"] < 600 || checked["bic"] < 600 || checked["given"] < 600 {
		t.Errorf("too few rows checked: %v", checked)
	}
}
