package udf

import (
	"database/sql/driver"
	_ "embed"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/unitroot"
)

// mean_break(series) -> STRUCT: the sup-Wald test for one break in the mean
// of a stationary series, its date (break_at, the 1-based position of the
// first value after it) and size.
//
// The maths: unitroot.MeanBreak (stats/unitroot/meanbreak.go, stats/unitroot/meanbreak_table.go,
// stats/unitroot/longrun_prewhite.go).

//go:embed sql/mean_break.sql
var meanBreakMacros string

func meanBreakFunctions(t *types) []*function {
	return []*function{{
		name:     "plumb_mean_break",
		parallel: true,
		reuse:    true,
		params:   []duckdb.TypeInfo{t.doubles()},
		result:   meanBreakLayout.info(t),
		nullable: true,
		eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
			r := unitroot.MeanBreak(x)
			return meanBreakLayout.record(&r), nil
		}),
	}}
}

type meanBreakResult = unitroot.MeanBreakResult

// meanBreakLayout is mean_break's STRUCT: NULL numbers unless the status
// is ok.
var meanBreakLayout = func() *layout[meanBreakResult] {
	ok := func(r *meanBreakResult) bool { return r.Status == stats.StatusOK }
	n := func(name string, f func(*meanBreakResult) float64) column[meanBreakResult] {
		return num(name, func(r *meanBreakResult) any { return value(f(r), ok(r)) })
	}
	return newLayout(
		n("statistic", func(r *meanBreakResult) float64 { return r.Statistic }),
		n("p_value", func(r *meanBreakResult) float64 { return r.PValue }),
		varchar("p_value_bound", func(r *meanBreakResult) any {
			if ok(r) {
				return string(r.PValueBound)
			}
			return nil
		}),
		integer64("break_at", func(r *meanBreakResult) any {
			if ok(r) {
				return int64(r.Index + 1)
			}
			return nil
		}),
		n("before", func(r *meanBreakResult) float64 { return r.Before }),
		n("after", func(r *meanBreakResult) float64 { return r.After }),
		n("size", func(r *meanBreakResult) float64 { return r.Size }),
		n("size_sd", func(r *meanBreakResult) float64 { return r.SizeSD }),
		varchar("status", func(r *meanBreakResult) any { return string(r.Status) }),
	)
}()
