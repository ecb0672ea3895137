package udf

import (
	"database/sql/driver"
	"math"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
)

// conditionFunctions wraps the stability, seasonality, white-noise and
// transform code of package stats:
//
//	stability(series, segments := NULL)                -> STRUCT
//	seasonality(series, period := NULL)                -> STRUCT
//	white_noise(series, lags := 10, fitted := 0)       -> STRUCT
//	rolling_spread(series, width)                      -> DOUBLE[] (rolling standard deviation)
//	rolling_mean(series, width)                        -> DOUBLE[]
//	box_cox(series, exponent)                          -> DOUBLE[], NULL when a value is ≤ 0 (exponent is λ; lambda is reserved in SQL)
//	inverse_box_cox(series, exponent)                  -> DOUBLE[]
//	box_cox_lambda(series, period := NULL)             -> DOUBLE, Guerrero's λ, NULL when undefined
func conditionFunctions(t *types) []*function {
	return []*function{
		{
			name:     "plumb_stability",
			parallel: true,
			reuse:    true,
			params:   []duckdb.TypeInfo{t.doubles(), t.bigint()},
			result:   stabilityType(t),
			nullable: true,
			eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
				segments, err := intOr(args[1], "segments", 0)
				if err != nil {
					return nil, err
				}
				r, err := stats.Stability(x, stats.StabilityOptions{Segments: segments})
				if err != nil {
					return nil, err
				}
				return stabilityStruct(r), nil
			}),
		},
		{
			name:     "plumb_seasonality",
			parallel: true,
			reuse:    true,
			params:   []duckdb.TypeInfo{t.doubles(), t.bigint()},
			result:   seasonalityType(t),
			nullable: true,
			eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
				period, err := periodArg(args[1])
				if err != nil {
					return nil, err
				}
				r, err := stats.Seasonality(x, stats.SeasonalityOptions{Period: period})
				if err != nil {
					return nil, err
				}
				return seasonalityStruct(r), nil
			}),
		},
		{
			name:     "plumb_white_noise",
			params:   []duckdb.TypeInfo{t.doubles(), t.bigint(), t.bigint()},
			result:   t.structOf(field{"statistic", t.double()}, field{"p_value", t.double()}, field{"lags", t.bigint()}, field{"df", t.bigint()}, field{"observations", t.bigint()}, field{"status", t.varchar()}),
			nullable: true,
			eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
				lags, fitted, err := whiteNoiseArgs(args[1], args[2])
				if err != nil {
					return nil, err
				}
				r, err := stats.LjungBox(x, lags, fitted)
				if err != nil {
					return nil, err
				}
				ok := r.Status == stats.StatusOK
				return map[string]any{
					"statistic": value(r.Statistic, ok), "p_value": value(r.PValue, ok),
					"lags": int64(r.Lags), "df": int64(r.DF), "observations": int64(r.Observations), "status": string(r.Status),
				}, nil
			}),
		},
		rollingFunction(t, "plumb_rolling_spread", func(r stats.RollingResult) []float64 { return r.SD }),
		rollingFunction(t, "plumb_rolling_mean", func(r stats.RollingResult) []float64 { return r.Mean }),
		{
			name:   "plumb_box_cox",
			params: []duckdb.TypeInfo{t.doubles(), t.double()},
			result: t.doubles(),
			eval: func(args []driver.Value) (any, error) {
				x, err := floats(args[0])
				if err != nil {
					return nil, err
				}
				lambda, _ := floatOr(args[1], "lambda", 0)
				y, status := stats.BoxCox(x, lambda)
				if status != stats.StatusOK {
					return nil, nil // documented: NULL when a value is ≤ 0 or missing
				}
				return doubleList(y), nil
			},
		},
		{
			name:   "plumb_inverse_box_cox",
			params: []duckdb.TypeInfo{t.doubles(), t.double()},
			result: t.doubles(),
			eval: func(args []driver.Value) (any, error) {
				y, err := floats(args[0])
				if err != nil {
					return nil, err
				}
				lambda, _ := floatOr(args[1], "lambda", 0)
				x, _ := stats.InverseBoxCox(y, lambda)
				return doubleList(x), nil // values outside the transform's range are NULL
			},
		},
		{
			name:     "plumb_box_cox_lambda",
			params:   []duckdb.TypeInfo{t.doubles(), t.bigint()},
			result:   t.double(),
			nullable: true,
			eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
				period, err := periodArgMeaning(args[1], "for none")
				if err != nil {
					return nil, err
				}
				lambda, status := stats.GuerreroLambda(x, period)
				if status != stats.StatusOK {
					return nil, nil
				}
				return lambda, nil
			}),
		},
	}
}

// withSeries adapts an evaluation over a series to DuckDB's arguments: a
// NULL series gives NULL.
func withSeries(f func(x []float64, args []driver.Value) (any, error)) func([]driver.Value) (any, error) {
	return func(args []driver.Value) (any, error) {
		if args[0] == nil {
			return nil, nil
		}
		x, err := floats(args[0])
		if err != nil {
			return nil, err
		}
		return f(x, args)
	}
}

func rollingFunction(t *types, name string, pick func(stats.RollingResult) []float64) *function {
	return &function{
		name:   name,
		params: []duckdb.TypeInfo{t.doubles(), t.bigint()},
		result: t.doubles(),
		eval: func(args []driver.Value) (any, error) {
			r, err := rolling(args)
			if err != nil {
				return nil, err
			}
			return listOrNull(pick(r)), nil
		},
	}
}

// rolling reads (series, width) arguments and computes the rolling statistics.
func rolling(args []driver.Value) (stats.RollingResult, error) {
	x, err := floats(args[0])
	if err != nil {
		return stats.RollingResult{}, err
	}
	width, err := integer(args[1], "width")
	if err != nil {
		return stats.RollingResult{}, err
	}
	return stats.Rolling(x, width)
}

func stabilityType(t *types) duckdb.TypeInfo {
	d := t.double()
	return t.structOf(
		field{"segments", t.bigint()}, field{"segment_length", t.bigint()},
		field{"mean_statistic", d}, field{"mean_p_value", d},
		field{"spread_statistic", d}, field{"spread_p_value", d},
		field{"brown_forsythe_f", d}, field{"brown_forsythe_p_value", d},
		field{"spread_ratio", d}, field{"mean_spread_correlation", d},
		field{"arch_statistic", d}, field{"arch_p_value", d}, field{"arch_lags", t.bigint()},
		field{"trend_slope", d}, field{"trend_t", d}, field{"trend_p_value", d},
		field{"mann_kendall_z", d}, field{"mann_kendall_p_value", d},
		field{"status", t.varchar()},
	)
}

func stabilityStruct(r stats.StabilityResult) map[string]any {
	ok := r.Status == stats.StatusOK
	return map[string]any{
		"segments": count(r.Segments, ok), "segment_length": count(r.SegmentLength, ok),
		"mean_statistic": value(r.MeanStatistic, ok), "mean_p_value": value(r.MeanPValue, ok),
		"spread_statistic": value(r.SpreadStatistic, ok), "spread_p_value": value(r.SpreadPValue, ok),
		"brown_forsythe_f": value(r.BrownForsytheF, ok), "brown_forsythe_p_value": value(r.BrownForsytheP, ok),
		"spread_ratio": value(r.SpreadRatio, ok), "mean_spread_correlation": value(r.MeanSpreadCorrelation, ok),
		"arch_statistic": value(r.ArchStatistic, ok), "arch_p_value": value(r.ArchPValue, ok), "arch_lags": count(r.ArchLags, ok),
		"trend_slope": value(r.TrendSlope, ok), "trend_t": value(r.TrendT, ok), "trend_p_value": value(r.TrendPValue, ok),
		"mann_kendall_z": value(r.MannKendallZ, ok), "mann_kendall_p_value": value(r.MannKendallPValue, ok),
		"status": string(r.Status),
	}
}

func seasonalityType(t *types) duckdb.TypeInfo {
	return t.structOf(
		field{"period", t.bigint()}, field{"detected", t.boolean()},
		field{"peak_autocorrelation", t.double()},
		field{"seasonal_strength", t.double()}, field{"trend_strength", t.double()},
		field{"seasonal", t.boolean()},
		field{"seasonal_unit_root", t.boolean()}, field{"ocsb_statistic", t.double()}, field{"ocsb_cutoff_05", t.double()},
		field{"status", t.varchar()},
	)
}

func seasonalityStruct(r stats.SeasonalityResult) map[string]any {
	ok := r.Status == stats.StatusOK
	var period any
	if r.Period > 0 {
		period = int64(r.Period)
	}
	out := map[string]any{
		"period": period, "detected": r.Detected,
		"peak_autocorrelation": orNull(r.PeakAutocorrelation),
		"seasonal_strength":    value(r.SeasonalStrength, ok), "trend_strength": value(r.TrendStrength, ok),
		"seasonal": r.Seasonal, "status": string(r.Status),
		"seasonal_unit_root": nil, "ocsb_statistic": nil, "ocsb_cutoff_05": nil,
	}
	if r.OCSB.Status == stats.StatusOK {
		out["seasonal_unit_root"] = r.OCSB.SeasonalUnitRoot
		out["ocsb_statistic"] = r.OCSB.Statistic
		out["ocsb_cutoff_05"] = r.OCSB.Critical5
	}
	return out
}

// stationarityFunctions wraps stats.Stationarity:
//
//	stationarity(series, period := NULL, alpha := 0.05) -> STRUCT
func stationarityFunctions(t *types) []*function {
	return []*function{{
		name:     "plumb_stationarity",
		parallel: true,
		reuse:    true,
		params:   []duckdb.TypeInfo{t.doubles(), t.bigint(), t.double()},
		result:   t.structOf(verdictFields(t)...),
		nullable: true,
		eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
			opts, err := stationarityOptions(args[1], args[2])
			if err != nil {
				return nil, err
			}
			r, err := stats.Stationarity(x, opts)
			if err != nil {
				return nil, err
			}
			return stationarityStruct(r), nil
		}),
	}}
}

// verdictFields is the layout of the stationarity STRUCT, shared by
// diagnose (which reports shift_at as a time, see diagnoseFields).
func verdictFields(t *types) []field {
	d := t.double()
	return []field{
		{"mean_stable", t.boolean()}, {"spread_stable", t.boolean()},
		{"seasonal", t.boolean()}, {"stationary", t.boolean()},
		{"violations", t.list(t.varchar())},
		{"mean_cause", t.varchar()}, {"shift_at", t.bigint()}, {"shift_size", d}, {"trend_slope", d},
		{"spread_cause", t.varchar()}, {"seasonal_kind", t.varchar()}, {"second_period", t.bigint()},
		{"zero_share", d}, {"demand_class", t.varchar()}, {"outliers", t.bigint()},
		{"differences", t.bigint()}, {"seasonal_differences", t.bigint()},
		{"box_cox_lambda", d}, {"period", t.bigint()},
		{"cured", t.boolean()}, {"left_violations", t.list(t.varchar())}, {"over_differenced", t.boolean()},
		{"reason", t.varchar()}, {"score", d},
		{"adf_statistic", d}, {"adf_p_value", d}, {"adf_lags", t.bigint()},
		{"kpss_statistic", d}, {"kpss_p_value", d}, {"kpss_lags", t.bigint()},
		{"mean_p_value", d}, {"spread_p_value", d}, {"seasonal_strength", d},
		{"status", t.varchar()},
	}
}

func stationarityOptions(period, alpha driver.Value) (stats.StationarityOptions, error) {
	p, err := verdictPeriodArg(period)
	if err != nil {
		return stats.StationarityOptions{}, err
	}
	a, err := floatOr(alpha, "alpha", 0.05)
	if err != nil {
		return stats.StationarityOptions{}, err
	}
	if err := CheckAlpha(a); err != nil {
		return stats.StationarityOptions{}, err
	}
	return stats.StationarityOptions{Period: p, Alpha: a}, nil
}

func stationarityStruct(r stats.StationarityResult) map[string]any {
	ok := r.Status == stats.StatusOK || r.Status == stats.StatusSeasonUnknown
	var period any
	if r.Period > 0 {
		period = int64(r.Period)
	}
	var lambda any
	if ok && !math.IsNaN(r.BoxCoxLambda) {
		lambda = r.BoxCoxLambda
	}
	adfOK := ok && r.ADF.Status == stats.StatusOK
	kpssOK := ok && r.KPSS.Status == stats.StatusOK
	out := map[string]any{
		"mean_stable": nil, "spread_stable": nil, "seasonal": nil, "stationary": nil, "violations": nil,
		"mean_cause": nil, "shift_at": nil, "shift_size": nil, "trend_slope": nil,
		"spread_cause": nil, "seasonal_kind": nil, "second_period": nil,
		"zero_share": orNull(r.Demand.ZeroShare), "demand_class": textOrNull(string(r.Demand.Class)), "outliers": nil,
		"differences": nil, "seasonal_differences": nil,
		"box_cox_lambda": lambda, "period": period,
		"cured": nil, "left_violations": nil, "over_differenced": nil,
		"reason": r.Reason, "score": value(r.Score, ok),
		"adf_statistic": value(r.ADF.Statistic, adfOK), "adf_p_value": value(r.ADF.PValue, adfOK), "adf_lags": count(r.ADF.Lags, adfOK),
		"kpss_statistic": value(r.KPSS.Statistic, kpssOK), "kpss_p_value": value(r.KPSS.PValue, kpssOK), "kpss_lags": count(r.KPSS.Lags, kpssOK),
		"mean_p_value": value(r.Stability.MeanPValue, ok), "spread_p_value": value(r.SpreadPValue, ok),
		"seasonal_strength": orNull(r.Seasonality.SeasonalStrength),
		"status":            string(r.Status),
	}
	if !ok {
		return out
	}
	out["mean_stable"], out["spread_stable"], out["seasonal"], out["stationary"] = r.MeanStable, r.SpreadStable, r.Seasonal, r.Stationary
	out["violations"] = textList(r.Violations)
	out["mean_cause"] = textOrNull(string(r.MeanCause))
	if r.ShiftIndex >= 0 {
		out["shift_at"], out["shift_size"] = int64(r.ShiftIndex+1), orNull(r.ShiftSize)
	}
	out["trend_slope"] = orNull(r.TrendSlope)
	out["spread_cause"] = textOrNull(string(r.SpreadCause))
	out["seasonal_kind"] = textOrNull(string(r.SeasonalKind))
	if r.SecondPeriod > 0 {
		out["second_period"] = int64(r.SecondPeriod)
	}
	out["outliers"] = int64(len(r.Outliers))
	out["differences"], out["seasonal_differences"] = int64(r.Differences), int64(r.SeasonalDifferences)
	out["cured"], out["left_violations"], out["over_differenced"] = r.Cured, textList(r.LeftViolations), r.OverDifferenced
	return out
}

// textList is a LIST(VARCHAR) value of violations.
func textList(v []stats.Violation) []any {
	out := make([]any, len(v))
	for i, x := range v {
		out[i] = string(x)
	}
	return out
}

// textOrNull returns s, or SQL NULL for the empty string.
func textOrNull(s string) any {
	if s == "" {
		return nil
	}
	return s
}

const conditionMacros = `
CREATE OR REPLACE TEMP MACRO stability(series, segments := NULL) AS
    plumb_stability(series::DOUBLE[], segments::BIGINT);
CREATE OR REPLACE TEMP MACRO seasonality(series, period := NULL) AS
    plumb_seasonality(series::DOUBLE[], period::BIGINT);
CREATE OR REPLACE TEMP MACRO white_noise(series, lags := 10, fitted := 0) AS
    plumb_white_noise(series::DOUBLE[], lags::BIGINT, fitted::BIGINT);
CREATE OR REPLACE TEMP MACRO rolling_spread(series, width) AS
    plumb_rolling_spread(series::DOUBLE[], width::BIGINT);
CREATE OR REPLACE TEMP MACRO rolling_mean(series, width) AS
    plumb_rolling_mean(series::DOUBLE[], width::BIGINT);
CREATE OR REPLACE TEMP MACRO box_cox(series, exponent) AS
    plumb_box_cox(series::DOUBLE[], exponent::DOUBLE);
CREATE OR REPLACE TEMP MACRO inverse_box_cox(series, exponent) AS
    plumb_inverse_box_cox(series::DOUBLE[], exponent::DOUBLE);
CREATE OR REPLACE TEMP MACRO box_cox_lambda(series, period := NULL) AS
    plumb_box_cox_lambda(series::DOUBLE[], period::BIGINT);
CREATE OR REPLACE TEMP MACRO stationarity(series, period := NULL, alpha := 0.05) AS
    plumb_stationarity(series::DOUBLE[], period::BIGINT, alpha::DOUBLE);
`
