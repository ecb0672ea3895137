package udf

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/stats/forecast"
	"github.com/plumb-sql/plumb/stats/verdict"
)

// TestForecastSQL: forecast's rows equal forecast.ForecastByRecipe on the same
// series (the verdict's recipe, fitted on the series it judged), continue
// each group's own time axis in the at column's type, and forecast_models
// reports the model behind them.
func TestForecastSQL(t *testing.T) {
	db := openTest(t)
	// Invented data: a trend with a weekly pattern and hash-based noise.
	exec(t, db, `CREATE TABLE sales AS
		SELECT 'store' || g AS store, DATE '2025-01-01' + i::INTEGER AS day,
		       50 + 0.05 * i + 3 * sin(2 * pi() * (i % 7) / 7) + ((hash(g, i) % 1000) / 1000.0 - 0.5) * 4 AS units
		FROM range(3) a(g), range(400) b(i)`)
	rows, err := db.Query(`SELECT store, day::VARCHAR, step, forecast, lower, upper, status
		FROM forecast('sales', by := 'store', at := 'day', value := 'units', horizon := 5, period := 7) ORDER BY store, step`)
	if err != nil {
		t.Fatal(err)
	}
	got := map[string][]float64{}
	for rows.Next() {
		var store, day, status string
		var step int
		var f, lo, hi float64
		if err := rows.Scan(&store, &day, &step, &f, &lo, &hi, &status); err != nil {
			t.Fatal(err)
		}
		// The last day is 2025-01-01 + 399 = 2026-02-04; forecasts follow it day by day.
		if want := fmt.Sprintf("2026-02-%02d", 4+step); day != want || !(lo < f && f < hi) || status != "ok" {
			t.Errorf("%s step %d: day %s (want %s), %v in [%v, %v], %s", store, step, day, want, f, lo, hi, status)
		}
		got[store] = append(got[store], f)
	}
	rows.Close()
	// The same in Go.
	for g := 0; g < 3; g++ {
		store := fmt.Sprintf("store%d", g)
		var xs []float64
		r, err := db.Query(fmt.Sprintf(`SELECT units FROM sales WHERE store = '%s' ORDER BY day`, store))
		if err != nil {
			t.Fatal(err)
		}
		for r.Next() {
			var v float64
			r.Scan(&v)
			xs = append(xs, v)
		}
		r.Close()
		v, _ := verdict.Stationarity(xs, verdict.StationarityOptions{Period: 7})
		f, err := forecast.ForecastByRecipe(v.Judged(), v.Recipe(), forecast.RecipeForecastOptions{Horizon: 5, Coverage: 0.95, AR: forecast.AROptions{Period: 7}})
		if err != nil {
			t.Fatal(err)
		}
		for i := range f.Mean {
			if i >= len(got[store]) || math.Abs(got[store][i]-f.Mean[i]) > 1e-9*math.Abs(f.Mean[i]) {
				t.Fatalf("%s: SQL forecasts %v, Go %v", store, got[store], f.Mean)
			}
		}
	}
	for _, test := range []struct{ query, want string }{
		// at of every type continues the group's own step.
		{`SELECT max(t)::VARCHAR FROM forecast('(SELECT 1 AS g, TIMESTAMP ''2025-01-01'' + INTERVAL (i) HOUR AS t, sin(i) + i % 5 AS v FROM range(100) r(i))', by := 'g', at := 't', value := 'v', horizon := 3)`, "2025-01-05 06:00:00"},
		{`SELECT max(t)::VARCHAR FROM forecast('(SELECT 1 AS g, 10 * i AS t, sin(i) + i % 5 AS v FROM range(100) r(i))', by := 'g', at := 't', value := 'v', horizon := 3)`, "1020"},
		{`SELECT count(*)::VARCHAR FROM forecast('sales', by := 'store', at := 'day', value := 'units')`, "42"},
		// A group too short for any model: its rows, NULL forecasts, a status.
		{`SELECT string_agg(coalesce(forecast::VARCHAR, 'NULL') || ' ' || status, ',') FROM forecast('(SELECT 1 AS g, i AS t, i::DOUBLE AS v FROM range(3) r(i))', by := 'g', at := 't', value := 'v', horizon := 2)`, "NULL too_short,NULL too_short"},
		{`SELECT string_agg(DISTINCT status, ',') FROM forecast('(SELECT 1 AS g, i AS t, 5.0 AS v FROM range(30) r(i))', by := 'g', at := 't', value := 'v', horizon := 2)`, "constant"},
		// holdout: the held-out values beside their forecasts, and the model's accuracy.
		{`SELECT count(actual)::VARCHAR FROM forecast('sales', by := 'store', at := 'day', value := 'units', period := 7, holdout := 10)`, "30"},
		{`SELECT bool_and(mase > 0 AND mase < 2 AND interval_coverage BETWEEN 0 AND 1)::VARCHAR FROM forecast_models('sales', by := 'store', at := 'day', value := 'units', period := 7, holdout := 10)`, "true"},
		{`SELECT bool_and(ar_order = len(ar_coefficients) AND residual_variance > 0 AND ljung_box_p_value BETWEEN 0 AND 1)::VARCHAR FROM forecast_models('sales', by := 'store', at := 'day', value := 'units', period := 7)`, "true"},
	} {
		if got := queryString(t, db, test.query); got != test.want {
			t.Errorf("%s = %s, want %s", test.query, got, test.want)
		}
	}
	for _, test := range []struct{ query, want string }{
		{`FROM forecast('sales', by := 'store', at := 'day', value := 'units', horizon := 0)`, "horizon must be between 1"},
		{`FROM forecast('sales', by := 'store', at := 'day', value := 'units', horizon := -3)`, "horizon must be between 1"},
		{`FROM forecast('sales', by := 'store', at := 'day', value := 'units', coverage := 1)`, "coverage must be between 0 and 1"},
		{`FROM forecast('sales', by := 'store', at := 'day', value := 'units', coverage := 0)`, "coverage must be between 0 and 1"},
		{`FROM forecast('sales', by := 'store', at := 'day', value := 'units', holdout := -1)`, "holdout must be 0"},
		{`FROM forecast_models('sales', by := 'store', at := 'day', value := 'units', fill := 'spline')`, "unknown fill method"},
	} {
		if msg := queryError(t, db, test.query); !strings.Contains(msg, test.want) {
			t.Errorf("%s: error %q does not say %q", test.query, msg, test.want)
		}
	}
}

// TestForecastInBatches: forecast and forecast_models give the same rows
// when their groups are taken a few at a time (plumb_batch_rows, as under a
// small memory_limit) as in one batch.
func TestForecastInBatches(t *testing.T) {
	db := openTest(t)
	exec(t, db, `CREATE TABLE s AS SELECT 'g' || (i % 12) AS g, DATE '2025-01-01' + (i // 12)::INTEGER AS d,
		10 + sin(i) + (i % 5) + (i // 12) * (i % 12) / 200 AS v FROM range(12 * 300) r(i)`)
	for _, q := range []string{
		`FROM forecast('s', by := 'g', at := 'd', value := 'v', horizon := 5, period := 7)`,
		`FROM forecast_models('s', by := 'g', at := 'd', value := 'v', holdout := 20)`,
	} {
		exec(t, db, "SET VARIABLE plumb_batch_rows = NULL")
		want := textRows(t, db, q)
		exec(t, db, "SET VARIABLE plumb_batch_rows = 1000") // 3 or 4 groups a batch
		sameRows(t, q, textRows(t, db, q), want)
	}
}
