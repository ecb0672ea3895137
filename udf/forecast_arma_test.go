package udf

import (
	"database/sql"
	"math"
	"testing"

	"github.com/plumb-sql/plumb/stats/forecast"
	"github.com/plumb-sql/plumb/stats/verdict"
)

// armaDatasets loads testdata/reference/datasets_arma_r.csv (Debian's
// r-base-core 4.2.2 datasets) as a table.
func armaDatasets(t *testing.T, db *sql.DB) map[string][]float64 {
	exec(t, db, `CREATE TABLE r_data AS SELECT dataset, t, value FROM read_csv('../testdata/reference/datasets_arma_r.csv')`)
	rows, err := db.Query(`SELECT dataset, value FROM r_data ORDER BY dataset, t`)
	if err != nil {
		t.Fatal(err)
	}
	defer rows.Close()
	out := map[string][]float64{}
	for rows.Next() {
		var name string
		var v float64
		if err := rows.Scan(&name, &v); err != nil {
			t.Fatal(err)
		}
		out[name] = append(out[name], v)
	}
	return out
}

// TestForecastModelsARMA: forecast_models reports the model
// forecast.ForecastByRecipe chose (orders, coefficients, likelihood, how it
// was fitted), with period := 1 declaring a series non-seasonal, and mase
// scaled at the lag of the period passed.
func TestForecastModelsARMA(t *testing.T) {
	db := openTest(t)
	data := armaDatasets(t, db)
	for _, test := range []struct {
		dataset string
		period  int
		holdout int
	}{
		{"nile", 1, 10}, {"wwwusage", 1, 10}, {"lakehuron", 1, 10}, {"airpassengers", 12, 24}, {"airpassengers", 1, 24},
	} {
		var status, fit string
		var period sql.NullInt64
		var p, q, sp, sq int
		var ma []any
		var logL, aic, aicc, mase float64
		err := db.QueryRow(`SELECT status, period, ar_order, ma_order, seasonal_ar_order, seasonal_ma_order, ma_coefficients,
				log_likelihood, aic, aicc, model_fit, mase
			FROM forecast_models('(SELECT dataset, t, value FROM r_data WHERE dataset = ''`+test.dataset+`'')',
				by := 'dataset', at := 't', value := 'value', period := ?, holdout := ?)`, test.period, test.holdout).
			Scan(&status, &period, &p, &q, &sp, &sq, &ma, &logL, &aic, &aicc, &fit, &mase)
		if err != nil {
			t.Fatalf("%s: %v", test.dataset, err)
		}
		x := data[test.dataset]
		train, held := x[:len(x)-test.holdout], x[len(x)-test.holdout:]
		v, err := verdict.Stationarity(train, verdict.StationarityOptions{Period: test.period})
		if err != nil {
			t.Fatal(err)
		}
		rec := v.Recipe()
		f, err := forecast.ForecastByRecipe(v.Judged(), rec, forecast.RecipeForecastOptions{Horizon: test.holdout, Coverage: 0.95, AR: forecast.AROptions{Period: rec.Period}})
		if err != nil {
			t.Fatal(err)
		}
		m := f.Chosen
		wantFit := "exact_likelihood"
		if m.LeastSquares {
			wantFit = "least_squares"
		}
		if status != "ok" || p != m.Order.AR || q != m.Order.MA || sp != m.Order.SeasonalAR || sq != m.Order.SeasonalMA ||
			len(ma) != q || fit != wantFit || math.Abs(logL-m.LogLikelihood) > 1e-9*math.Abs(logL) || !(aicc > aic) {
			t.Errorf("%s period %d: status %s, (%d,%d)(%d,%d), %d MA coefficients, log L %v, %s; Go: %+v, log L %v, %s",
				test.dataset, test.period, status, p, q, sp, sq, len(ma), logL, fit, m.Order, m.LogLikelihood, wantFit)
		}
		if test.period == 1 && period.Valid {
			t.Errorf("%s: period := 1 reported period %d", test.dataset, period.Int64)
		}
		// mase at the lag of the period passed (lag 1 for period := 1).
		e, err := forecast.MeanAbsoluteScaledError(held, f.Mean, train, test.period)
		if err != nil || math.Abs(e.MASE-mase) > 1e-9*mase {
			t.Errorf("%s period %d: mase %v, want %v at lag %d (%v)", test.dataset, test.period, mase, e.MASE, test.period, err)
		}
	}
}
