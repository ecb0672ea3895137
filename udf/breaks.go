package udf

import (
	"database/sql/driver"
	"fmt"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
)

// breakFunctions wraps the two tests for one structural break:
//
//	zivot_andrews(series, kind := 'level', lags := NULL, lag_rule := 'aic', trimming := 0.15) -> STRUCT
//	    stats.ZivotAndrews: a unit root against a trend-stationary series
//	    whose level, slope or both (kind: level, slope, level_and_slope)
//	    break once; break_at is the 1-based position of the first
//	    observation after the break. Fields as unit_root's: what was tested,
//	    the evidence, how it was computed.
//	mean_break(series) -> STRUCT
//	    stats.MeanBreak: the sup-Wald test for one break in the mean of a
//	    stationary series, its date and size.
func breakFunctions(t *types) []*function {
	d := t.double()
	return []*function{{
		name:     "plumb_zivot_andrews",
		parallel: true,
		reuse:    true,
		params:   []duckdb.TypeInfo{t.doubles(), t.varchar(), t.bigint(), t.varchar(), d},
		result: t.structOf(field{"kind", t.varchar()},
			field{"statistic", d}, field{"p_value", d}, field{"p_value_bound", t.varchar()},
			field{"cutoff_01", d}, field{"cutoff_05", d}, field{"cutoff_10", d}, field{"break_at", t.bigint()},
			field{"lags", t.bigint()}, field{"observations", t.bigint()}, field{"status", t.varchar()}),
		nullable: true,
		eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
			o := stats.ZivotAndrewsOptions{Break: stats.BreakLevel, LagRule: stats.LagAIC}
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
			if o.Trim, err = trimmingArg(args[4]); err != nil {
				return nil, err
			}
			r, err := stats.ZivotAndrews(x, o)
			if err != nil {
				return nil, err
			}
			ok := r.Status == stats.StatusOK
			out := map[string]any{
				"statistic": value(r.Statistic, ok), "p_value": value(r.PValue, ok), "p_value_bound": nil,
				"break_at": nil, "lags": count(r.Lags, ok), "observations": count(r.Observations, ok),
				"cutoff_01": value(r.CriticalValues[0], ok), "cutoff_05": value(r.CriticalValues[1], ok),
				"cutoff_10": value(r.CriticalValues[2], ok), "kind": string(r.Break), "status": string(r.Status)}
			if ok {
				out["p_value_bound"], out["break_at"] = string(r.PValueBound), int64(r.BreakIndex+1)
			}
			return out, nil
		}),
	}, {
		name:     "plumb_mean_break",
		parallel: true,
		reuse:    true,
		params:   []duckdb.TypeInfo{t.doubles()},
		result: t.structOf(field{"statistic", d}, field{"p_value", d}, field{"p_value_bound", t.varchar()},
			field{"break_at", t.bigint()}, field{"before", d}, field{"after", d}, field{"size", d},
			field{"size_sd", d}, field{"status", t.varchar()}),
		nullable: true,
		eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
			r := stats.MeanBreak(x)
			ok := r.Status == stats.StatusOK
			out := map[string]any{
				"statistic": value(r.Statistic, ok), "p_value": value(r.PValue, ok), "p_value_bound": nil,
				"break_at": nil, "before": value(r.Before, ok), "after": value(r.After, ok),
				"size": value(r.Size, ok), "size_sd": value(r.SizeSD, ok), "status": string(r.Status)}
			if ok {
				out["p_value_bound"], out["break_at"] = string(r.PValueBound), int64(r.Index+1)
			}
			return out, nil
		}),
	}}
}

const breakMacros = `
CREATE OR REPLACE TEMP MACRO zivot_andrews(series, kind := 'level', lags := NULL, lag_rule := 'aic', trimming := 0.15) AS
    plumb_zivot_andrews(series::DOUBLE[], kind, lags::BIGINT, lag_rule, trimming::DOUBLE);
CREATE OR REPLACE TEMP MACRO mean_break(series) AS
    plumb_mean_break(series::DOUBLE[]);
`
