package udf

import (
	"database/sql/driver"
	_ "embed"
	"fmt"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
)

// The maths: stats.Outliers (stats/outliers.go).

//go:embed sql/outlier_positions.sql
var outlierPositionsMacros string

// outlierPositionsFunctions wraps stats.Outliers:
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
			period, err := intOr(args[1], "period", 0)
			if err != nil {
				return nil, err
			}
			if period < 0 || period == 1 {
				return nil, fmt.Errorf("period must be NULL (none) or at least 2, got %d", period)
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
	}}
}
