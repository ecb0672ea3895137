package udf

import (
	"database/sql/driver"
	_ "embed"
	"fmt"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/defaults"
	"github.com/plumb-sql/plumb/stats/unitroot"
)

// The maths: unitroot.ZivotAndrews (stats/unitroot/zivot_andrews*.go).

//go:embed sql/zivot_andrews.sql
var zivotAndrewsMacros string

// zivotAndrewsFunctions wraps the Zivot-Andrews test:
//
//	zivot_andrews(series, kind, lags, lag_rule, trimming) -> STRUCT (defaults in udf/sql/zivot_andrews.sql)
//	    unitroot.ZivotAndrews: a unit root against a trend-stationary series
//	    whose level, slope or both (kind: level, slope, level_and_slope)
//	    break once; break_at is the 1-based position of the first
//	    observation after the break. Fields as unit_root's: what was tested,
//	    the evidence, how it was computed.
func zivotAndrewsFunctions(t *types) []*function {
	d := t.double()
	return []*function{{
		name:     "plumb_zivot_andrews",
		parallel: true,
		reuse:    true,
		params:   []duckdb.TypeInfo{t.doubles(), t.varchar(), t.bigint(), t.varchar(), d},
		result:   zivotAndrewsLayout.info(t),
		nullable: true,
		eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
			o := unitroot.ZivotAndrewsOptions{Break: unitroot.BreakKind(defaults.BreakKind), LagRule: unitroot.LagRule(defaults.LagRule)}
			var err error
			if args[1] != nil {
				s, err := text(args[1], "kind")
				if err != nil {
					return nil, err
				}
				o.Break = unitroot.BreakKind(s)
			}
			if o.MaxLag, err = optionalInt(args[2], "lags"); err != nil {
				return nil, err
			}
			if o.MaxLag != nil && *o.MaxLag < 0 {
				return nil, fmt.Errorf("lags must not be negative, got %d", *o.MaxLag)
			}
			if args[3] != nil {
				s, err := text(args[3], "lag_rule")
				if err != nil {
					return nil, err
				}
				o.LagRule = unitroot.LagRule(s)
			}
			if o.Trim, err = trimmingArg(args[4]); err != nil {
				return nil, err
			}
			r, err := unitroot.ZivotAndrews(x, o)
			if err != nil {
				return nil, err
			}
			return zivotAndrewsLayout.record(&r), nil
		}),
	}}
}

type zivotAndrewsResult = unitroot.ZivotAndrewsResult

// zivotAndrewsLayout is zivot_andrews' STRUCT, ordered as unit_root's:
// what was tested, the evidence, how it was computed. NULL numbers unless
// the status is ok.
var zivotAndrewsLayout = func() *layout[zivotAndrewsResult] {
	ok := func(r *zivotAndrewsResult) bool { return r.Status == stats.StatusOK }
	n := func(name string, f func(*zivotAndrewsResult) float64) column[zivotAndrewsResult] {
		return num(name, func(r *zivotAndrewsResult) any { return value(f(r), ok(r)) })
	}
	return newLayout(
		varchar("kind", func(r *zivotAndrewsResult) any { return string(r.Break) }),
		n("statistic", func(r *zivotAndrewsResult) float64 { return r.Statistic }),
		n("p_value", func(r *zivotAndrewsResult) float64 { return r.PValue }),
		varchar("p_value_bound", func(r *zivotAndrewsResult) any {
			if ok(r) {
				return string(r.PValueBound)
			}
			return nil
		}),
		n("cutoff_01", func(r *zivotAndrewsResult) float64 { return r.CriticalValues[0] }),
		n("cutoff_05", func(r *zivotAndrewsResult) float64 { return r.CriticalValues[1] }),
		n("cutoff_10", func(r *zivotAndrewsResult) float64 { return r.CriticalValues[2] }),
		integer64("break_at", func(r *zivotAndrewsResult) any {
			if ok(r) {
				return int64(r.BreakIndex + 1)
			}
			return nil
		}),
		integer64("lags", func(r *zivotAndrewsResult) any { return count(r.Lags, ok(r)) }),
		integer64("observations", func(r *zivotAndrewsResult) any { return count(r.Observations, ok(r)) }),
		varchar("status", func(r *zivotAndrewsResult) any { return string(r.Status) }),
	)
}()
