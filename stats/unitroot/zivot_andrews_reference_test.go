package unitroot

import (
	"math"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// P-values: statsmodels interpolates in a table of its own that depends on
// neither the length nor the trimming; plumb's table (zivot_andrews_table.go,
// its own simulation) is for the series' length and trimming, and
// TestZivotAndrewsPValueCalibrated checks that it is right there. So the
// p-values are compared at trim 0.15 only, two ways: plumb's table at its
// longest length (n = 3,199) against statsmodels' within
// zivotAndrewsLargeNTolerance (the two simulations' difference; largest
// for a break in the intercept, where statsmodels' centre lies about 0.05
// lower), and the reported p-value within zivotAndrewsReportedTolerance
// (the length's effect is largest for short series, n < 100).
const (
	zivotAndrewsLargeNTolerance   = 0.045
	zivotAndrewsReportedTolerance = 0.13
)

// TestZivotAndrewsAgainstStatsmodels compares every row of
// testdata/reference/break_statsmodels.csv, written by
// testdata/reference/break_statsmodels.py from python3-statsmodels 0.13.5's
// zivot_andrews(x, trim=trim, maxlag=max_lag, regression="c"|"t"|"ct",
// autolag="AIC"|"BIC"|"t-stat"|None), on R's datasets, log realgdp, 100 of
// simulated.csv's series and the 100 break series of break_simulated.csv:
// the statistic within 1e-6 relative, the same lag, the same break date
// (the break_index column, statsmodels' break index, is BreakIndex-1 for a
// break in the level or in both, and BreakIndex for the slope) and the
// p-value as described above. Rows
// where statsmodels failed are counted and must still give plumb a result.
func TestZivotAndrewsAgainstStatsmodels(t *testing.T) {
	_, series := testseries.ReferenceSeries(t)
	for _, row := range testseries.ReadCSV(t, "break_simulated.csv") {
		series[row["dataset"]] = append(series[row["dataset"]], testseries.Num(t, row["value"]))
	}
	checked := map[string]int{}
	var failedThere int
	var worstStat float64
	worstP, worstLarge := map[BreakKind]float64{}, map[BreakKind]float64{}
	for _, row := range testseries.ReadCSV(t, "break_statsmodels.csv") {
		x := series[row["series"]]
		if x == nil {
			t.Fatalf("no series %q", row["series"])
		}
		maxLag := int(testseries.Num(t, row["max_lag"]))
		kind := BreakKind(row["kind"])
		opts := ZivotAndrewsOptions{Break: kind, Trim: testseries.Num(t, row["trim"]), LagRule: LagRule(row["lag_rule"]), MaxLag: &maxLag}
		got, err := ZivotAndrews(x, opts)
		if err != nil {
			t.Fatal(err)
		}
		where := "break_statsmodels.py " + row["series"] + ": zivot_andrews(trim=" + row["trim"] + ", maxlag=" +
			row["max_lag"] + ", break " + row["kind"] + ", lag rule " + row["lag_rule"] + ")"
		if got.Status != stats.StatusOK {
			t.Errorf("%s: status %s", where, got.Status)
			continue
		}
		if row["statistic"] == "failed" {
			failedThere++
			continue
		}
		want := testseries.Num(t, row["statistic"])
		rel := math.Abs(got.Statistic-want) / math.Abs(want)
		worstStat = math.Max(worstStat, rel)
		if rel > 1e-6 {
			t.Errorf("%s: statistic %.12g, want %.12g", where, got.Statistic, want)
		}
		wantBreak := int(testseries.Num(t, row["break_index"]))
		if kind != BreakSlope {
			wantBreak++
		}
		if got.BreakIndex != wantBreak {
			t.Errorf("%s: break index %d, want %d", where, got.BreakIndex, wantBreak)
		}
		if got.Lags != int(testseries.Num(t, row["lags"])) {
			t.Errorf("%s: lags %d, want %s", where, got.Lags, row["lags"])
		}
		if got.Observations != len(x)-1-got.Lags {
			t.Errorf("%s: observations %d, want %d", where, got.Observations, len(x)-1-got.Lags)
		}
		if row["trim"] == "0.15" {
			sm := testseries.Num(t, row["p_value"])
			dp := math.Abs(got.PValue - sm)
			worstP[kind] = math.Max(worstP[kind], dp)
			if dp > zivotAndrewsReportedTolerance {
				t.Errorf("%s: p-value %.4f (n = %d), statsmodels %s", where, got.PValue, got.Observations, row["p_value"])
			}
			// statsmodels clips its p-values to about [0.001, 0.999].
			if large, _ := zivotAndrewsP(got.Statistic, kind, 0.15, 3199); sm > 0.0011 && sm < 0.998 {
				d := math.Abs(large - sm)
				worstLarge[kind] = math.Max(worstLarge[kind], d)
				if d > zivotAndrewsLargeNTolerance {
					t.Errorf("%s: p-value at n = 3,199 %.4f, statsmodels %s", where, large, row["p_value"])
				}
			}
		}
		checked[row["kind"]+" "+row["lag_rule"]]++
	}
	t.Logf("rows checked: %v; statsmodels failed on %d rows (plumb gave a result on each)", checked, failedThere)
	t.Logf("largest relative statistic difference %.2g", worstStat)
	t.Logf("largest p-value difference at trim 0.15, reported: %v; plumb's table at n = 3,199: %v", worstP, worstLarge)
	for _, k := range []string{"level", "slope", "level_and_slope"} {
		for _, r := range []string{"aic", "bic", "drop_insignificant", "given"} {
			if checked[k+" "+r] < 200 {
				t.Errorf("only %d rows checked for %s %s", checked[k+" "+r], k, r)
			}
		}
	}
}
