package udf

import (
	"database/sql/driver"
	_ "embed"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/verdict"
)

// seasonality(series, period := NULL) -> STRUCT: the period (given or
// detected), the STL strengths and the OCSB seasonal unit-root test.
//
// The maths: verdict.Seasonality (stats/verdict/seasonality.go, stats/verdict/stl.go,
// stats/unitroot/ocsb.go).

//go:embed sql/seasonality.sql
var seasonalityMacros string

func seasonalityFunctions(t *types) []*function {
	return []*function{{
		name:     "plumb_seasonality",
		parallel: true,
		reuse:    true,
		params:   []duckdb.TypeInfo{t.doubles(), t.bigint()},
		result:   seasonalityLayout.info(t),
		nullable: true,
		eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
			period, err := periodArg(args[1])
			if err != nil {
				return nil, err
			}
			r, err := verdict.Seasonality(x, verdict.SeasonalityOptions{Period: period})
			if err != nil {
				return nil, err
			}
			return seasonalityLayout.record(&r), nil
		}),
	}}
}

type seasonalityResult = verdict.SeasonalityResult

// seasonalityLayout is seasonality's STRUCT: the strengths are NULL unless
// the status is ok, the OCSB fields unless the OCSB test ran.
var seasonalityLayout = func() *layout[seasonalityResult] {
	ok := func(r *seasonalityResult) bool { return r.Status == stats.StatusOK }
	ocsb := func(r *seasonalityResult) bool { return r.OCSB.Status == stats.StatusOK }
	return newLayout(
		integer64("period", func(r *seasonalityResult) any {
			if r.Period > 0 {
				return int64(r.Period)
			}
			return nil
		}),
		boolean("detected", func(r *seasonalityResult) any { return r.Detected }),
		num("peak_autocorrelation", func(r *seasonalityResult) any { return orNull(r.PeakAutocorrelation) }),
		num("seasonal_strength", func(r *seasonalityResult) any { return value(r.SeasonalStrength, ok(r)) }),
		num("trend_strength", func(r *seasonalityResult) any { return value(r.TrendStrength, ok(r)) }),
		boolean("seasonal", func(r *seasonalityResult) any { return r.Seasonal }),
		boolean("seasonal_unit_root", func(r *seasonalityResult) any {
			if ocsb(r) {
				return r.OCSB.SeasonalUnitRoot
			}
			return nil
		}),
		num("ocsb_statistic", func(r *seasonalityResult) any {
			if ocsb(r) {
				return r.OCSB.Statistic
			}
			return nil
		}),
		num("ocsb_cutoff_05", func(r *seasonalityResult) any {
			if ocsb(r) {
				return r.OCSB.Critical5
			}
			return nil
		}),
		varchar("status", func(r *seasonalityResult) any { return string(r.Status) }),
	)
}()
