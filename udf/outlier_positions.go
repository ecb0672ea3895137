package udf

import (
	"database/sql/driver"
	_ "embed"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/verdict"
)

// The maths: verdict.Outliers (stats/verdict/outliers.go).

//go:embed sql/outlier_positions.sql
var outlierPositionsMacros string

// outlierPositionsFunctions wraps verdict.Outliers:
//
//	outlier_positions(series, period := NULL) -> BIGINT[], the 1-based
//	    positions of the isolated outliers the verdict sets aside
//
// A series with a missing value gives NULL.
func outlierPositionsFunctions(t *types) []*function {
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
			o := verdict.Outliers(x, verdict.OutlierOptions{Period: period})
			out := make([]any, len(o.Positions))
			for i, p := range o.Positions {
				out[i] = int64(p + 1)
			}
			return out, nil
		}),
	}}
}
