package verdict

import (
	"math"
	"strconv"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// conditionRows reads testdata/reference/conditions_*.csv (python3-statsmodels
// 0.13.5 via conditions_statsmodels.py; r-cran-forecast 8.20 via
// conditions_r.R) keyed by check, series and option.
func conditionRows(t *testing.T, file string) map[[3]string]float64 {
	out := map[[3]string]float64{}
	for _, row := range testseries.ReadCSV(t, file) {
		out[[3]string{row["check"], row["series"], row["option"]}] = testseries.Num(t, row["value"])
	}
	return out
}

// TestLjungBoxAgainstStatsmodels: acorr_ljungbox(x, lags=[h]) on nine
// datasets at h = 5, 10, 20, and on first differences with model_df=2;
// Q within 1e-9 relative, p within 1e-9.
func TestLjungBoxAgainstStatsmodels(t *testing.T) {
	ref := conditionRows(t, "conditions_statsmodels.csv")
	_, series := testseries.ReferenceSeries(t)
	checked := 0
	for key, want := range ref {
		x := series[key[1]]
		h, _ := strconv.Atoi(key[2])
		switch key[0] {
		case "ljung_box_q", "ljung_box_p":
			r, err := stats.LjungBox(x, h, 0)
			if err != nil {
				t.Fatal(err)
			}
			got := r.Statistic
			if key[0] == "ljung_box_p" {
				got = r.PValue
				if math.Abs(got-want) > 1e-9 {
					t.Errorf("%v: p %v, want %v", key, got, want)
				}
			} else if math.Abs(got-want) > 1e-9*want {
				t.Errorf("%v: Q %v, want %v", key, got, want)
			}
			checked++
		case "ljung_box_diff_df2_p":
			d, _ := stats.Difference(x, 1, 1)
			r, _ := stats.LjungBox(d, h, 2)
			if math.Abs(r.PValue-want) > 1e-9 {
				t.Errorf("%v: p %v, want %v", key, r.PValue, want)
			}
			checked++
		}
	}
	if checked < 50 {
		t.Errorf("only %d checks", checked)
	}
}

// TestSTLAgainstStatsmodels: STL(x, period=12, seasonal=7, robust=False,
// jumps 1).fit(inner_iter=2|5, outer_iter=0) on R's co2, nottem,
// UKDriverDeaths and log AirPassengers: seasonal and trend strength
// (Wang, Smith & Hyndman 2006) and two component values within 1e-9.
func TestSTLAgainstStatsmodels(t *testing.T) {
	ref := conditionRows(t, "conditions_statsmodels.csv")
	_, series := testseries.ReferenceSeries(t)
	checked := 0
	for key, want := range ref {
		var got float64
		inner, _ := strconv.Atoi(key[2])
		d, status := STL(series[key[1]], 12, STLOptions{Inner: inner})
		switch key[0] {
		case "stl_seasonal_strength":
			got = SeasonalStrength(d)
		case "stl_trend_strength":
			got = TrendStrength(d)
		case "stl_seasonal_first":
			got = d.Seasonal[0]
		case "stl_trend_last":
			got = d.Trend[len(d.Trend)-1]
		default:
			continue
		}
		if status != stats.StatusOK || math.Abs(got-want) > 1e-9*math.Max(1, math.Abs(want)) {
			t.Errorf("%v: %v (%s), want %v", key, got, status, want)
		}
		checked++
	}
	if checked != 32 {
		t.Errorf("%d checks, want 32", checked)
	}
}

// TestBenjaminiHochbergAgainstStatsmodels: multipletests(p, method="fdr_bh")
// on 50 p-values, within 1e-12.
func TestBenjaminiHochbergAgainstStatsmodels(t *testing.T) {
	ref := conditionRows(t, "conditions_statsmodels.csv")
	p := make([]float64, 50)
	for i := range p {
		p[i] = ref[[3]string{"bh_p", "uniform_mix", strconv.Itoa(i)}]
	}
	q := stats.BenjaminiHochberg(p)
	for i := range q {
		if want := ref[[3]string{"bh_q", "uniform_mix", strconv.Itoa(i)}]; math.Abs(q[i]-want) > 1e-12 {
			t.Errorf("q[%d] = %v, want %v", i, q[i], want)
		}
	}
	// NaN p-values are left out of m (plain arithmetic: m = 2).
	got := stats.BenjaminiHochberg([]float64{0.01, math.NaN(), 0.04})
	if got[0] != 0.02 || !math.IsNaN(got[1]) || got[2] != 0.04 {
		t.Errorf("with a NaN: %v, want [0.02 NaN 0.04]", got)
	}
}

// TestGuerreroAgainstForecast: BoxCox.lambda(x, method = "guerrero") from
// r-cran-forecast 8.20 on AirPassengers, UKDriverDeaths, nottem + 10 and
// lynx (period 1, so subseries of 2). R's optimize() stops at a tolerance
// of about 1.2e-4, so the check allows 1e-3.
func TestGuerreroAgainstForecast(t *testing.T) {
	ref := conditionRows(t, "conditions_r.csv")
	_, series := testseries.ReferenceSeries(t)
	source := map[string]func() []float64{
		"airpassengers": func() []float64 {
			x := append([]float64(nil), series["log_airpassengers"]...)
			for i := range x {
				x[i] = math.Round(math.Exp(x[i]))
			}
			return x
		},
		"ukdriverdeaths": func() []float64 { return series["ukdriverdeaths"] },
		"nottem_plus_10": func() []float64 {
			x := append([]float64(nil), series["nottem"]...)
			for i := range x {
				x[i] += 10
			}
			return x
		},
		"lynx": func() []float64 { return series["lynx"] },
	}
	checked := 0
	for key, want := range ref {
		if key[0] != "guerrero_lambda" {
			continue // the OCSB rows are checked through SQL (udf's TestConditionsSQL)
		}
		checked++
		period, _ := strconv.Atoi(key[2])
		got, status := stats.GuerreroLambda(source[key[1]](), period)
		if status != stats.StatusOK || math.Abs(got-want) > 1e-3 {
			t.Errorf("%v: λ %v (%s), want %v", key, got, status, want)
		}
	}
	if checked != 4 {
		t.Errorf("%d reference rows, want 4", checked)
	}
}
