package udf

import (
	"database/sql/driver"
	_ "embed"
	"fmt"
	"strings"

	"github.com/duckdb/duckdb-go/v2"
)

// The maths: stats.Difference (stats/difference.go); the SQL in differencedSQL.

//go:embed sql/differenced.sql
var differencedMacros string

// differencedFunctions provides the SQL behind the differenced table macro:
//
//	differenced(source, by := ..., at := ..., value := ..., lag, times) (defaults in udf/sql/differenced.sql)
//
// returns one row per source row: the group columns, at, the original value
// and differenced_value, the value differenced times times at lag lag within
// its group in at order. The first lag·times rows of each group have no
// difference and get NULL, so the table keeps every original row and with it
// the anchor values that undifference needs.
func differencedFunctions(t *types) []*function {
	return []*function{{
		name:   "plumb_differenced_sql",
		params: []duckdb.TypeInfo{t.varchar(), t.anyType(), t.varchar(), t.varchar(), t.bigint(), t.bigint()},
		result: t.varchar(),
		eval: func(args []driver.Value) (any, error) {
			q, err := readSeriesQuery("differenced", args[:4])
			if err != nil {
				return nil, err
			}
			lag, err := integer(args[4], "lag")
			if err != nil {
				return nil, err
			}
			times, err := integer(args[5], "times")
			if err != nil {
				return nil, err
			}
			if lag < 1 || times < 1 {
				return nil, fmt.Errorf("lag and times must be at least 1, got lag := %d, times := %d", lag, times)
			}
			if lag > maxSpan || times > maxSpan || lag*times > maxSpan {
				return nil, fmt.Errorf("lag × times must be at most %d (longer than any series), got lag := %d, times := %d", maxSpan, lag, times)
			}
			return differencedSQL(q, lag, times), nil
		},
	}}
}

func differencedSQL(q seriesQuery, lag, times int) string {
	perGroup := fmt.Sprintf(`SELECT %[1]s, plumb_at, plumb_raw,
                   list_concat(list_resize([]::DOUBLE[], least(%[2]d, len(plumb_value))),
                               plumb_difference(plumb_value, %[3]d, %[4]d)) AS plumb_differenced
            FROM plumb_series`, q.byList(""), lag*times, lag, times)
	return q.batchedCTEs(perGroup, rowBytes(3)) + fmt.Sprintf(`
SELECT %[1]s,
       unnest(plumb_at) AS %[2]s,
       unnest(plumb_raw) AS %[3]s,
       unnest(plumb_differenced) AS differenced_value
FROM plumb_done`, q.byList(""), quoteIdent(q.at), quoteIdent(q.value))
}

// readSeriesQuery reads the four arguments every table function starts with:
// source, by, at and value.
func readSeriesQuery(function string, args []driver.Value) (seriesQuery, error) {
	q := seriesQuery{function: function}
	source, err := text(args[0], "source")
	if err != nil {
		return q, err
	}
	if q.source, err = sourceSQL(source); err != nil {
		return q, err
	}
	q.label = strings.TrimSpace(source)
	if q.by, err = columnNames(args[1], "by"); err != nil {
		return q, err
	}
	if q.at, err = columnName(args[2], "at"); err != nil {
		return q, err
	}
	if q.value, err = columnName(args[3], "value"); err != nil {
		return q, err
	}
	return q, nil
}
