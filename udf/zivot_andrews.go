package udf

import (
	"database/sql/driver"
	_ "embed"
	"fmt"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/defaults"
	"github.com/plumb-sql/plumb/stats"
)

// The maths: stats.ZivotAndrews (stats/zivot_andrews*.go).

//go:embed sql/zivot_andrews.sql
var zivotAndrewsMacros string

// zivotAndrewsFunctions wraps the Zivot-Andrews test:
//
//	zivot_andrews(series, kind, lags, lag_rule, trimming) -> STRUCT (defaults in udf/sql/zivot_andrews.sql)
//	    stats.ZivotAndrews: a unit root against a break in the intercept,
//	    the trend or both (kind); break_at is the 1-based position of the
//	    first observation after the break.
func zivotAndrewsFunctions(t *types) []*function {
	d := t.double()
	return []*function{{
		name:     "plumb_zivot_andrews",
		parallel: true,
		reuse:    true,
		params:   []duckdb.TypeInfo{t.doubles(), t.varchar(), t.bigint(), t.varchar(), d},
		result: t.structOf(field{"statistic", d}, field{"p_value", d}, field{"p_value_bound", t.varchar()},
			field{"break_at", t.bigint()}, field{"lags", t.bigint()}, field{"nobs", t.bigint()},
			field{"crit_1pct", d}, field{"crit_5pct", d}, field{"crit_10pct", d},
			field{"kind", t.varchar()}, field{"status", t.varchar()}),
		nullable: true,
		eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
			o := stats.ZivotAndrewsOptions{Break: stats.BreakKind(defaults.BreakKind), LagRule: stats.LagRule(defaults.LagRule)}
			var err error
			if args[1] != nil {
				s, err := text(args[1], "kind")
				if err != nil {
					return nil, err
				}
				o.Break = stats.BreakKind(s)
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
				o.LagRule = stats.LagRule(s)
			}
			if o.Trim, err = floatOr(args[4], "trimming", stats.DefaultBreakTrim); err != nil {
				return nil, err
			}
			r, err := stats.ZivotAndrews(x, o)
			if err != nil {
				return nil, err
			}
			ok := r.Status == stats.StatusOK
			out := map[string]any{
				"statistic": value(r.Statistic, ok), "p_value": value(r.PValue, ok), "p_value_bound": nil,
				"break_at": nil, "lags": count(r.Lags, ok), "nobs": count(r.NObs, ok),
				"crit_1pct": value(r.CriticalValues[0], ok), "crit_5pct": value(r.CriticalValues[1], ok),
				"crit_10pct": value(r.CriticalValues[2], ok), "kind": string(r.Break), "status": string(r.Status)}
			if ok {
				out["p_value_bound"], out["break_at"] = string(r.PValueBound), int64(r.BreakIndex+1)
			}
			return out, nil
		}),
	}}
}
