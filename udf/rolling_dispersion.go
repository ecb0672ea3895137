package udf

import (
	"database/sql/driver"
	_ "embed"
	"fmt"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
)

// The maths: stats.Rolling (stats/rolling.go).

//go:embed sql/rolling_dispersion.sql
var rollingDispersionMacros string

// rollingDispersionFunctions provides
//
//	rolling_dispersion(source, by := ..., at := ..., value := ..., width) (default in udf/sql/rolling_dispersion.sql)
//
// returning one row per source row: the group columns, at, the value, and
// over the trailing window of width values rolling_mean, rolling_sd,
// mean_ratio (rolling mean over the group's mean), sd_ratio (rolling
// standard deviation over the group's) and mean_deviation ((rolling mean -
// group mean) / group standard deviation). The first width-1 rows of each
// group have NULL there.
func rollingDispersionFunctions(t *types) []*function {
	return []*function{{
		name:   "plumb_rolling",
		params: []duckdb.TypeInfo{t.doubles(), t.bigint()},
		result: rollingLayout.info(t),
		eval: func(args []driver.Value) (any, error) {
			r, err := rolling(args)
			if err != nil {
				return nil, err
			}
			return rollingLayout.record(&r), nil
		},
	}, {
		name:   "plumb_rolling_dispersion_sql",
		params: []duckdb.TypeInfo{t.varchar(), t.anyType(), t.varchar(), t.varchar(), t.bigint()},
		result: t.varchar(),
		eval: func(args []driver.Value) (any, error) {
			q, err := readSeriesQuery("rolling_dispersion", args[:4])
			if err != nil {
				return nil, err
			}
			width, err := integer(args[4], "width")
			if err != nil {
				return nil, err
			}
			if width < 2 {
				return nil, fmt.Errorf("width must be at least 2, got %d", width)
			}
			perGroup := fmt.Sprintf(`SELECT %[1]s, plumb_at, plumb_raw, plumb_rolling(plumb_value, %[2]d) AS plumb_r
            FROM plumb_series`, q.byList(""), width)
			return q.batchedCTEs(perGroup, rowBytes(7)) + fmt.Sprintf(`
SELECT %[1]s, unnest(plumb_at) AS %[2]s, unnest(plumb_raw) AS %[3]s,
       unnest(plumb_r.mean) AS rolling_mean, unnest(plumb_r.sd) AS rolling_sd,
       unnest(plumb_r.mean_ratio) AS mean_ratio, unnest(plumb_r.sd_ratio) AS sd_ratio,
       unnest(plumb_r.mean_deviation) AS mean_deviation
FROM plumb_done`, q.byList(""), quoteIdent(q.at), quoteIdent(q.value)), nil
		},
	}}
}

type rollingResult = stats.RollingResult

// rollingLayout is plumb_rolling's STRUCT, which the query unnests.
var rollingLayout = newLayout(
	doubles("mean", func(r *rollingResult) any { return doubleList(r.Mean) }),
	doubles("sd", func(r *rollingResult) any { return doubleList(r.SD) }),
	doubles("mean_ratio", func(r *rollingResult) any { return doubleList(r.MeanRatio) }),
	doubles("sd_ratio", func(r *rollingResult) any { return doubleList(r.SDRatio) }),
	doubles("mean_deviation", func(r *rollingResult) any { return doubleList(r.MeanDeviation) }),
)
