package udf

import (
	"database/sql/driver"
	_ "embed"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
)

// rolling_spread(series, width) -> DOUBLE[] and rolling_mean(series,
// width) -> DOUBLE[]: the trailing rolling standard deviation and mean; the
// first width − 1 values are NULL.
//
// The maths: stats.Rolling (stats/rolling.go).

//go:embed sql/rolling.sql
var rollingMacros string

func rollingFunctions(t *types) []*function {
	return []*function{
		rollingFunction(t, "plumb_rolling_spread", func(r stats.RollingResult) []float64 { return r.SD }),
		rollingFunction(t, "plumb_rolling_mean", func(r stats.RollingResult) []float64 { return r.Mean }),
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
