package udf

import (
	"database/sql/driver"
	_ "embed"
	"fmt"
	"math"
	"strings"
	"time"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/defaults"
	"github.com/plumb-sql/plumb/stats/forecast"
	"github.com/plumb-sql/plumb/stats/verdict"
)

// The maths: forecast.ForecastByRecipe (stats/forecast/forecast_recipe.go, stats/forecast/forecast.go, stats/forecast/ar.go, stats/forecast/accuracy.go).

//go:embed sql/forecast.sql
var forecastMacros string

// forecastFunctions provides two table functions that forecast every group
// through its own recipe (forecast.ForecastByRecipe):
//
//	forecast(source, by, at, value, horizon, coverage, period, alpha, fill, holdout, point)
//	    (the defaults in udf/sql/forecast.sql, from package defaults)
//	    one row per group and step: the group columns, at (continuing each
//	    group's own step, in the at column's type), step (1..horizon),
//	    forecast, lower, upper (the central prediction interval of the given
//	    coverage) and status. With holdout := k the last k values of each
//	    group are held out: the recipe and the model come from the rest, the
//	    rows forecast the held-out stretch, and actual holds its values.
//	    point says which centre of the forecast distribution the forecast
//	    column gives in original units after a Box-Cox transform: median
//	    (the transform of the forecast on its scale) or mean.
//	forecast_models(same arguments)
//	    one row per group: the recipe and the model behind the forecasts,
//	    chosen by AICc among ARMA models fitted by exact likelihood and the
//	    least-squares autoregression (forecast.ChooseARMA): its orders
//	    (ar_order, ma_order, seasonal_ar_order, seasonal_ma_order at
//	    seasonal_period), constant, coefficients, residual variance, observations
//	    (values of the stationary series), log_likelihood, aic, aicc, how it
//	    was fitted (model_fit: exact_likelihood or least_squares) and the
//	    Ljung-Box p-value of its residuals; with holdout := k the mean
//	    absolute scaled error and the share of held-out values inside the
//	    intervals. mase is scaled by the in-sample naive error at the lag of
//	    the period passed (period := 1: lag 1; a period ≥ 2: that lag, even
//	    when the verdict found no seasonality), and at the detected period
//	    of a seasonal series when period is NULL (lag 1 otherwise).
func forecastFunctions(t *types) []*function {
	d := t.double()
	funcs := []*function{{
		name:     "plumb_forecast",
		parallel: true,
		params: []duckdb.TypeInfo{t.anyType(), t.bigint(), d, t.bigint(), d, t.varchar(), t.bigint(),
			t.varchar()},
		result:   forecastLayout.info(t),
		nullable: true,
		eval: withPoints(func(p points, args []driver.Value) (any, error) {
			o, err := readForecastOptions(args[1:])
			if err != nil {
				return nil, err
			}
			p.sortByTime()
			return forecastGroup(p.at, p.values, o)
		}),
	}, {
		name:     "plumb_forecast_sql",
		params:   []duckdb.TypeInfo{t.varchar(), t.anyType(), t.varchar(), t.varchar(), t.bigint(), d, t.bigint(), d, t.varchar(), t.bigint(), t.varchar(), t.boolean()},
		result:   t.varchar(),
		nullable: true,
		eval: func(args []driver.Value) (any, error) {
			models, _ := args[11].(bool)
			name := "forecast"
			if models {
				name = "forecast_models"
			}
			q, err := readSeriesQuery(name, args[:4])
			if err != nil {
				return nil, err
			}
			q.points = true
			if _, err := readForecastOptions(args[4:11]); err != nil {
				return nil, err
			}
			literals := make([]string, 7)
			for i, a := range args[4:11] {
				literals[i] = forecastLiteral(a)
			}
			return forecastSQL(q, literals, models), nil
		},
	}}
	// plumb_advance(at, offset, k) = at + k·offset, offset in plumb's
	// internal units (microseconds for a DATE or TIMESTAMP, the number for
	// an integer): one overload per kind of time column, so that the
	// forecasts' at has the source's own type.
	advance := func(at duckdb.TypeInfo, f func(at driver.Value, delta int64) (any, error)) *function {
		return &function{name: "plumb_advance", params: []duckdb.TypeInfo{at, t.bigint(), t.bigint()}, result: at,
			eval: func(args []driver.Value) (any, error) {
				off, err := integer(args[1], "offset")
				if err != nil {
					return nil, err
				}
				k, err := integer(args[2], "k")
				if err != nil {
					return nil, err
				}
				return f(args[0], int64(off)*int64(k))
			}}
	}
	funcs = append(funcs,
		advance(t.date(), func(at driver.Value, delta int64) (any, error) {
			a, ok := at.(time.Time)
			if !ok {
				return nil, fmt.Errorf("expected a DATE, got %T", at)
			}
			return a.AddDate(0, 0, int(delta/86_400_000_000)), nil
		}),
		advance(t.timestamp(), func(at driver.Value, delta int64) (any, error) {
			a, ok := at.(time.Time)
			if !ok {
				return nil, fmt.Errorf("expected a TIMESTAMP, got %T", at)
			}
			return a.Add(time.Duration(delta) * time.Microsecond), nil
		}),
		advance(t.bigint(), func(at driver.Value, delta int64) (any, error) {
			a, err := integer(at, "at")
			if err != nil {
				return nil, err
			}
			return int64(a) + delta, nil
		}),
	)
	return funcs
}

// forecastOptions are forecast's per-group settings.
type forecastOptions struct {
	verdict          verdict.StationarityOptions
	horizon, holdout int
	coverage         float64
	fill             stats.FillMethod
	meanPoint        bool
}

// readForecastOptions reads (horizon, coverage, period, alpha, fill,
// holdout, point) and checks them.
func readForecastOptions(args []driver.Value) (forecastOptions, error) {
	var o forecastOptions
	var err error
	if o.horizon, err = intOr(args[0], "horizon", forecast.DefaultHorizon); err != nil {
		return o, err
	}
	if o.coverage, err = floatOr(args[1], "coverage", forecast.DefaultCoverage); err != nil {
		return o, err
	}
	if o.verdict, err = stationarityOptions(args[2], args[3]); err != nil {
		return o, err
	}
	if o.fill, err = fillMethod(args[4]); err != nil {
		return o, err
	}
	if o.holdout, err = intOr(args[5], "holdout", defaults.Holdout); err != nil {
		return o, err
	}
	if args[6] != nil {
		point, err := text(args[6], "point")
		if err != nil {
			return o, err
		}
		switch point {
		case "median":
		case "mean":
			o.meanPoint = true
		default:
			return o, fmt.Errorf("unknown point %q: use median or mean", point)
		}
	}
	switch {
	case o.holdout < 0:
		return o, fmt.Errorf("holdout must be 0 (none) or a positive number of values, got %d", o.holdout)
	case o.holdout == 0 && (o.horizon < 1 || o.horizon > forecast.MaxHorizon):
		return o, fmt.Errorf("horizon must be between 1 and %d, got %d", forecast.MaxHorizon, o.horizon)
	case !(o.coverage > 0 && o.coverage < 1):
		return o, fmt.Errorf("coverage must be between 0 and 1, got %v", o.coverage)
	}
	if o.holdout > 0 {
		o.horizon = min(o.holdout, forecast.MaxHorizon)
	}
	return o, nil
}

// forecastLiteral renders an option back as SQL.
func forecastLiteral(v driver.Value) string {
	switch x := v.(type) {
	case string:
		return quoteLiteral(x)
	case bool:
		if x {
			return "true"
		}
		return "false"
	}
	return sqlLiteral(v)
}

// forecastGroup judges one group (on all but the held-out values), fits the
// recipe's model and forecasts.
func forecastGroup(at []int64, x []float64, o forecastOptions) (any, error) {
	var out forecastRow
	for i := 1; i < len(at); i++ {
		if at[i] == at[i-1] {
			out.status = duplicateAt
			return forecastLayout.record(&out), nil
		}
	}
	reg, err := stats.Regularize(at, x, o.fill)
	if err != nil {
		return nil, err
	}
	y := reg.Values
	// The forecasts' times: after the last value used, on the usual step;
	// held-out values at their own times.
	n := len(y) - o.holdout
	offsets := make(doubleList, o.horizon)
	nan := make(doubleList, o.horizon)
	for h := range offsets {
		offsets[h], nan[h] = math.NaN(), math.NaN()
	}
	if n >= 1 && len(at) >= 2 {
		for h := range offsets {
			offsets[h] = float64(timeAt(at, reg, n+h) - at[0])
		}
	}
	out.offsets, out.forecast, out.lower, out.upper = offsets, nan, nan, nan
	if o.holdout > 0 {
		actual := make(doubleList, o.horizon)
		for h := range actual {
			actual[h] = math.NaN()
			if n+h >= 0 && n+h < len(y) {
				actual[h] = y[n+h]
			}
		}
		out.actual = actual
	}
	if reg.TooSparse {
		out.status = string(stats.StatusTooSparse)
		out.reason = verdict.StatusReason(stats.StatusTooSparse)
		return forecastLayout.record(&out), nil
	}
	if n < 2 {
		out.status = string(stats.StatusTooShort)
		out.reason = verdict.StatusReason(stats.StatusTooShort)
		return forecastLayout.record(&out), nil
	}
	train := y[:n]
	v, err := verdict.Stationarity(train, o.verdict)
	if err != nil {
		return nil, err
	}
	out.status, out.reason = string(v.Status), v.Reason
	if v.Status != stats.StatusOK && v.Status != stats.StatusSeasonUnknown {
		return forecastLayout.record(&out), nil
	}
	rec := v.Recipe()
	out.meanCause, out.seasonalKind = textOrNull(string(v.MeanCause)), textOrNull(string(v.SeasonalKind))
	if rec.Period > 0 {
		out.period = int64(rec.Period)
	}
	if rec.BoxCox {
		out.boxCoxLambda = rec.Lambda
	}
	out.seasonalDifferences, out.differences = int64(rec.SeasonalDifferences), int64(rec.Differences)
	f, err := forecast.ForecastByRecipe(v.Judged(), rec, forecast.RecipeForecastOptions{
		Horizon: o.horizon, Coverage: o.coverage, AR: forecast.AROptions{Period: rec.Period}, MeanPoint: o.meanPoint})
	if err != nil {
		return nil, err
	}
	if f.Status != stats.StatusOK {
		out.status = string(f.Status)
		return forecastLayout.record(&out), nil
	}
	out.forecast, out.lower, out.upper = doubleList(f.Mean), doubleList(f.Lower), doubleList(f.Upper)
	m := f.Chosen
	out.arOrder, out.arConstant, out.arCoefficients = int64(m.Order.AR), orNull(m.Constant), doubleList(m.AR)
	out.residualVariance, out.observations, out.aic = orNull(m.Variance), int64(m.Observations), orNull(m.AIC)
	out.maOrder, out.seasonalAROrder, out.seasonalMAOrder = int64(m.Order.MA), int64(m.Order.SeasonalAR), int64(m.Order.SeasonalMA)
	if m.Order.SeasonalAR+m.Order.SeasonalMA > 0 {
		out.seasonalPeriod = int64(m.Order.Period)
	}
	out.maCoefficients, out.seasonalARCoefficients, out.seasonalMACoefficients = doubleList(m.MA), doubleList(m.SeasonalAR), doubleList(m.SeasonalMA)
	out.logLikelihood, out.aicc = orNull(m.LogLikelihood), orNull(m.AICc)
	out.modelFit = "exact_likelihood"
	if m.LeastSquares {
		out.modelFit = "least_squares"
	}
	if f.WhiteNoise.Status == stats.StatusOK {
		out.ljungBox = orNull(f.WhiteNoise.PValue)
	}
	if o.holdout > 0 {
		actual := []float64(out.actual.(doubleList))
		lag := 1
		switch {
		case o.verdict.Period >= 2: // the period the user passed
			lag = o.verdict.Period
		case o.verdict.Period == 0 && v.Seasonal && rec.Period > 1:
			lag = rec.Period
		}
		if e, err := forecast.MeanAbsoluteScaledError(actual, f.Mean, train, lag); err == nil && e.Status == stats.StatusOK {
			out.mase = orNull(e.MASE)
		}
		if share, used, err := forecast.IntervalCoverage(actual, f.Lower, f.Upper); err == nil && used > 0 {
			out.intervalCoverage = share
		}
	}
	return forecastLayout.record(&out), nil
}

// forecastRow is one group's forecast as plumb_forecast returns it; nil is
// NULL.
type forecastRow struct {
	status, reason, offsets, forecast, lower, upper, actual             any
	meanCause, seasonalKind, period, boxCoxLambda                       any
	seasonalDifferences, differences, arOrder, arConstant               any
	arCoefficients, residualVariance, observations, aic, ljungBox, mase any
	intervalCoverage                                                    any
	// the rest of the chosen model (forecast.ChooseARMA)
	maOrder, seasonalAROrder, seasonalMAOrder, seasonalPeriod                any
	maCoefficients, seasonalARCoefficients, seasonalMACoefficients, modelFit any
	logLikelihood, aicc                                                      any
}

// forecastLayout is plumb_forecast's STRUCT, which forecastSQL unpacks.
var forecastLayout = newLayout(
	varchar("status", func(r *forecastRow) any { return r.status }),
	varchar("reason", func(r *forecastRow) any { return r.reason }),
	doubles("offsets", func(r *forecastRow) any { return r.offsets }),
	doubles("forecast", func(r *forecastRow) any { return r.forecast }),
	doubles("lower", func(r *forecastRow) any { return r.lower }),
	doubles("upper", func(r *forecastRow) any { return r.upper }),
	doubles("actual", func(r *forecastRow) any { return r.actual }),
	varchar("mean_cause", func(r *forecastRow) any { return r.meanCause }),
	varchar("seasonal_kind", func(r *forecastRow) any { return r.seasonalKind }),
	integer64("period", func(r *forecastRow) any { return r.period }),
	num("box_cox_lambda", func(r *forecastRow) any { return r.boxCoxLambda }),
	integer64("seasonal_differences", func(r *forecastRow) any { return r.seasonalDifferences }),
	integer64("differences", func(r *forecastRow) any { return r.differences }),
	integer64("ar_order", func(r *forecastRow) any { return r.arOrder }),
	num("ar_constant", func(r *forecastRow) any { return r.arConstant }),
	doubles("ar_coefficients", func(r *forecastRow) any { return r.arCoefficients }),
	num("residual_variance", func(r *forecastRow) any { return r.residualVariance }),
	integer64("observations", func(r *forecastRow) any { return r.observations }),
	num("aic", func(r *forecastRow) any { return r.aic }),
	num("ljung_box_p_value", func(r *forecastRow) any { return r.ljungBox }),
	num("mase", func(r *forecastRow) any { return r.mase }),
	num("interval_coverage", func(r *forecastRow) any { return r.intervalCoverage }),
	integer64("ma_order", func(r *forecastRow) any { return r.maOrder }),
	integer64("seasonal_ar_order", func(r *forecastRow) any { return r.seasonalAROrder }),
	integer64("seasonal_ma_order", func(r *forecastRow) any { return r.seasonalMAOrder }),
	integer64("seasonal_period", func(r *forecastRow) any { return r.seasonalPeriod }),
	doubles("ma_coefficients", func(r *forecastRow) any { return r.maCoefficients }),
	doubles("seasonal_ar_coefficients", func(r *forecastRow) any { return r.seasonalARCoefficients }),
	doubles("seasonal_ma_coefficients", func(r *forecastRow) any { return r.seasonalMACoefficients }),
	num("log_likelihood", func(r *forecastRow) any { return r.logLikelihood }),
	num("aicc", func(r *forecastRow) any { return r.aicc }),
	varchar("model_fit", func(r *forecastRow) any { return r.modelFit }),
)

// timeAt is the time of position i of the judged series (on the regular
// grid when Regularize filled it, the i-th observation otherwise), and
// beyond its end, the last time plus whole steps.
func timeAt(at []int64, reg stats.Regular, i int) int64 {
	if len(reg.Values) != len(at) {
		return at[0] + int64(i)*reg.Step
	}
	if i < len(at) {
		return at[i]
	}
	return at[len(at)-1] + int64(i-len(at)+1)*reg.Step
}

// forecastSQL is the query behind forecast (models false) and
// forecast_models (models true); literals are the options as SQL, in
// plumb_forecast's order. Groups are forecast a batch at a time
// (batchedCTEs), so forecast completes under memory_limit as diagnose does.
func forecastSQL(q seriesQuery, literals []string, models bool) string {
	by := q.byList("")
	status := q.duplicateAtCheck("plumb_f.status")
	if models {
		perGroup := fmt.Sprintf(`SELECT %[1]s, %[3]s AS status, plumb_f.reason AS reason,
                   plumb_f.mean_cause AS mean_cause, plumb_f.seasonal_kind AS seasonal_kind, plumb_f.period AS period,
                   plumb_f.box_cox_lambda AS box_cox_lambda, plumb_f.seasonal_differences AS seasonal_differences,
                   plumb_f.differences AS differences, plumb_f.ar_order AS ar_order, plumb_f.ar_constant AS ar_constant,
                   plumb_f.ar_coefficients AS ar_coefficients, plumb_f.residual_variance AS residual_variance,
                   plumb_f.observations AS observations, plumb_f.aic AS aic, plumb_f.ljung_box_p_value AS ljung_box_p_value,
                   plumb_f.mase AS mase, plumb_f.interval_coverage AS interval_coverage,
                   plumb_f.ma_order AS ma_order, plumb_f.seasonal_ar_order AS seasonal_ar_order,
                   plumb_f.seasonal_ma_order AS seasonal_ma_order, plumb_f.seasonal_period AS seasonal_period,
                   plumb_f.ma_coefficients AS ma_coefficients, plumb_f.seasonal_ar_coefficients AS seasonal_ar_coefficients,
                   plumb_f.seasonal_ma_coefficients AS seasonal_ma_coefficients, plumb_f.log_likelihood AS log_likelihood,
                   plumb_f.aicc AS aicc, plumb_f.model_fit AS model_fit
            FROM (SELECT %[1]s, plumb_forecast(plumb_points, %[2]s) AS plumb_f FROM plumb_series)`,
			by, strings.Join(literals, ", "), status)
		return q.batchedCTEs(perGroup, gatherBytesPerRow) + fmt.Sprintf("\nFROM plumb_done\nORDER BY %s", by)
	}
	perGroup := fmt.Sprintf(`SELECT %[1]s, plumb_first_at, %[3]s AS status, plumb_f.offsets AS plumb_offsets,
                   plumb_f.forecast AS plumb_forecasts, plumb_f.lower AS plumb_lower, plumb_f.upper AS plumb_upper,
                   plumb_f.actual AS plumb_actual
            FROM (SELECT %[1]s, plumb_first_at, plumb_forecast(plumb_points, %[2]s) AS plumb_f FROM plumb_series)`,
		by, strings.Join(literals, ", "), status)
	actual, actualOut := "", ""
	if literals[5] != "NULL" && literals[5] != "0" {
		actual, actualOut = ", unnest(plumb_actual) AS actual", ", actual"
	}
	return q.batchedCTEs(perGroup, gatherBytesPerRow) + fmt.Sprintf(`
SELECT %[1]s, plumb_advance(plumb_first_at, plumb_offset::BIGINT, 1) AS %[2]s, step, forecast, lower, upper%[3]s, status
FROM (
    SELECT %[1]s, plumb_first_at, status,
           unnest(plumb_offsets) AS plumb_offset, unnest(range(1, len(plumb_forecasts) + 1)) AS step,
           unnest(plumb_forecasts) AS forecast, unnest(plumb_lower) AS lower, unnest(plumb_upper) AS upper%[4]s
    FROM plumb_done
)
ORDER BY %[1]s, step`, by, quoteIdent(q.at), actualOut, actual)
}
