package udf

import (
	"database/sql/driver"
	_ "embed"
	"math"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/defaults"
	"github.com/plumb-sql/plumb/stats/verdict"
)

// stationarity(series, period, alpha) -> STRUCT (udf/sql/stationarity.sql): the
// verdict on one series, the three conditions, their causes, the recipe
// that cures them and whether it does, a reason and a score.
//
// The maths: verdict.Stationarity (stats/verdict/verdict.go, stats/verdict/verdict_judge.go,
// stats/verdict/verdict_reason.go, stats/verdict/recipe.go).

//go:embed sql/stationarity.sql
var stationarityMacros string

func stationarityFunctions(t *types) []*function {
	return []*function{{
		name:     "plumb_stationarity",
		parallel: true,
		reuse:    true,
		params:   []duckdb.TypeInfo{t.doubles(), t.bigint(), t.double()},
		result:   verdictLayout.info(t),
		nullable: true,
		eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
			opts, err := stationarityOptions(args[1], args[2])
			if err != nil {
				return nil, err
			}
			r, err := verdict.Stationarity(x, opts)
			if err != nil {
				return nil, err
			}
			return verdictLayout.record(&r), nil
		}),
	}}
}

// stationarityOptions checks (period, alpha), the options every function
// that judges a series takes.
func stationarityOptions(period, alpha driver.Value) (verdict.StationarityOptions, error) {
	p, err := verdictPeriodArg(period)
	if err != nil {
		return verdict.StationarityOptions{}, err
	}
	a, err := floatOr(alpha, "alpha", defaults.Alpha)
	if err != nil {
		return verdict.StationarityOptions{}, err
	}
	if err := CheckAlpha(a); err != nil {
		return verdict.StationarityOptions{}, err
	}
	return verdict.StationarityOptions{Period: p, Alpha: a}, nil
}

type verdictRow = verdict.StationarityResult

// verdictLayout is the stationarity STRUCT, and the verdict's columns of
// diagnose (diagnoseLayout). When nothing was judged (a status other than
// ok and season_unknown) the conditions, causes and recipe are NULL; the
// tests' numbers are NULL unless their own status is ok.
var verdictLayout = func() *layout[verdictRow] {
	judged := func(r *verdictRow) bool {
		return r.Status == stats.StatusOK || r.Status == stats.StatusSeasonUnknown
	}
	adfOK := func(r *verdictRow) bool { return judged(r) && r.ADF.Status == stats.StatusOK }
	kpssOK := func(r *verdictRow) bool { return judged(r) && r.KPSS.Status == stats.StatusOK }
	// ifJudged is v when the series was judged, NULL otherwise.
	ifJudged := func(f func(*verdictRow) any) func(*verdictRow) any {
		return func(r *verdictRow) any {
			if !judged(r) {
				return nil
			}
			return f(r)
		}
	}
	positive := func(v int) any {
		if v > 0 {
			return int64(v)
		}
		return nil
	}
	return newLayout(
		boolean("mean_stable", ifJudged(func(r *verdictRow) any { return r.MeanStable })),
		boolean("spread_stable", ifJudged(func(r *verdictRow) any { return r.SpreadStable })),
		boolean("seasonal", ifJudged(func(r *verdictRow) any { return r.Seasonal })),
		boolean("stationary", ifJudged(func(r *verdictRow) any { return r.Stationary })),
		varchars("violations", ifJudged(func(r *verdictRow) any { return textList(r.Violations) })),
		varchar("mean_cause", ifJudged(func(r *verdictRow) any { return textOrNull(string(r.MeanCause)) })),
		integer64("shift_at", ifJudged(func(r *verdictRow) any {
			if r.ShiftIndex >= 0 {
				return int64(r.ShiftIndex + 1)
			}
			return nil
		})),
		num("shift_size", ifJudged(func(r *verdictRow) any {
			if r.ShiftIndex >= 0 {
				return orNull(r.ShiftSize)
			}
			return nil
		})),
		num("trend_slope", ifJudged(func(r *verdictRow) any { return orNull(r.TrendSlope) })),
		varchar("spread_cause", ifJudged(func(r *verdictRow) any { return textOrNull(string(r.SpreadCause)) })),
		varchar("seasonal_kind", ifJudged(func(r *verdictRow) any { return textOrNull(string(r.SeasonalKind)) })),
		integer64("second_period", ifJudged(func(r *verdictRow) any { return positive(r.SecondPeriod) })),
		num("zero_share", func(r *verdictRow) any { return orNull(r.Demand.ZeroShare) }),
		varchar("demand_class", func(r *verdictRow) any { return textOrNull(string(r.Demand.Class)) }),
		integer64("outliers", ifJudged(func(r *verdictRow) any { return int64(len(r.Outliers)) })),
		integer64("differences", ifJudged(func(r *verdictRow) any { return int64(r.Differences) })),
		integer64("seasonal_differences", ifJudged(func(r *verdictRow) any { return int64(r.SeasonalDifferences) })),
		num("box_cox_lambda", func(r *verdictRow) any {
			if judged(r) && !math.IsNaN(r.BoxCoxLambda) {
				return r.BoxCoxLambda
			}
			return nil
		}),
		integer64("period", func(r *verdictRow) any { return positive(r.Period) }),
		boolean("cured", ifJudged(func(r *verdictRow) any { return r.Cured })),
		varchars("left_violations", ifJudged(func(r *verdictRow) any { return textList(r.LeftViolations) })),
		boolean("over_differenced", ifJudged(func(r *verdictRow) any { return r.OverDifferenced })),
		varchar("reason", func(r *verdictRow) any { return r.Reason }),
		num("score", func(r *verdictRow) any { return value(r.Score, judged(r)) }),
		num("adf_statistic", func(r *verdictRow) any { return value(r.ADF.Statistic, adfOK(r)) }),
		num("adf_p_value", func(r *verdictRow) any { return value(r.ADF.PValue, adfOK(r)) }),
		integer64("adf_lags", func(r *verdictRow) any { return count(r.ADF.Lags, adfOK(r)) }),
		num("kpss_statistic", func(r *verdictRow) any { return value(r.KPSS.Statistic, kpssOK(r)) }),
		num("kpss_p_value", func(r *verdictRow) any { return value(r.KPSS.PValue, kpssOK(r)) }),
		integer64("kpss_lags", func(r *verdictRow) any { return count(r.KPSS.Lags, kpssOK(r)) }),
		num("mean_p_value", func(r *verdictRow) any { return value(r.Stability.MeanPValue, judged(r)) }),
		num("spread_p_value", func(r *verdictRow) any { return value(r.SpreadPValue, judged(r)) }),
		num("seasonal_strength", func(r *verdictRow) any { return orNull(r.Seasonality.SeasonalStrength) }),
		varchar("status", func(r *verdictRow) any { return string(r.Status) }),
	)
}()
