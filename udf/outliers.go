package udf

import (
	"database/sql/driver"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
)

// outlierFunctions wraps stats.Outliers and stats.Demand:
//
//	outlier_positions(series, period := NULL) -> BIGINT[], the 1-based
//	    positions of the isolated outliers the verdict sets aside
//	demand_profile(series) -> STRUCT(zero_share, average_interval,
//	    size_variation, demand_class)
//
// A series with a missing value gives NULL.
func outlierFunctions(t *types) []*function {
	return []*function{{
		name:     "plumb_outlier_positions",
		parallel: true,
		params:   []duckdb.TypeInfo{t.doubles(), t.bigint()},
		result:   t.list(t.bigint()),
		nullable: true,
		eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
			period, err := periodArgMeaning(args[1], "for none")
			if err != nil {
				return nil, err
			}
			if stats.CheckFinite(x) != stats.StatusOK {
				return nil, nil
			}
			o := stats.Outliers(x, stats.OutlierOptions{Period: period})
			out := make([]any, len(o.Positions))
			for i, p := range o.Positions {
				out[i] = int64(p + 1)
			}
			return out, nil
		}),
	}, {
		name:     "plumb_demand_profile",
		parallel: true,
		params:   []duckdb.TypeInfo{t.doubles()},
		result: t.structOf(field{"zero_share", t.double()}, field{"average_interval", t.double()},
			field{"size_variation", t.double()}, field{"demand_class", t.varchar()}),
		nullable: true,
		eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
			if stats.CheckFinite(x) != stats.StatusOK {
				return nil, nil
			}
			p := stats.Demand(x)
			return map[string]any{"zero_share": orNull(p.ZeroShare), "average_interval": orNull(p.AverageInterval),
				"size_variation": orNull(p.SizeVariation), "demand_class": textOrNull(string(p.Class))}, nil
		}),
	}}
}

const outlierMacros = `
CREATE OR REPLACE TEMP MACRO outlier_positions(series, period := NULL) AS
    plumb_outlier_positions(series::DOUBLE[], period::BIGINT);
CREATE OR REPLACE TEMP MACRO demand_profile(series) AS
    plumb_demand_profile(series::DOUBLE[]);
`
