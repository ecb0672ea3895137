package udf

import (
	"database/sql/driver"
	_ "embed"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
)

// The maths: stats.Difference and stats.Undifference (stats/difference.go).

//go:embed sql/difference.sql
var differenceMacros string

// differenceFunctions wraps stats.Difference and stats.Undifference.
//
//	difference(series, lag, times)       -> DOUBLE[]
//	undifference(series, anchor, lag)    -> DOUBLE[] (defaults in udf/sql/difference.sql)
func differenceFunctions(t *types) []*function {
	return []*function{{
		name:   "plumb_difference",
		params: []duckdb.TypeInfo{t.doubles(), t.bigint(), t.bigint()},
		result: t.doubles(),
		eval: func(args []driver.Value) (any, error) {
			x, err := floats(args[0])
			if err != nil {
				return nil, err
			}
			lag, err := integer(args[1], "lag")
			if err != nil {
				return nil, err
			}
			times, err := integer(args[2], "times")
			if err != nil {
				return nil, err
			}
			d, err := stats.Difference(x, lag, times)
			if err != nil {
				return nil, err
			}
			return doubleList(d), nil
		},
	}, {
		name:   "plumb_undifference",
		params: []duckdb.TypeInfo{t.doubles(), t.doubles(), t.bigint()},
		result: t.doubles(),
		eval: func(args []driver.Value) (any, error) {
			d, err := floats(args[0])
			if err != nil {
				return nil, err
			}
			anchor, err := floats(args[1])
			if err != nil {
				return nil, err
			}
			lag, err := integer(args[2], "lag")
			if err != nil {
				return nil, err
			}
			y, err := stats.Undifference(d, anchor, lag)
			if err != nil {
				return nil, err
			}
			return doubleList(y), nil
		},
	}}
}
