package udf

import (
	"database/sql/driver"
	"fmt"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
)

// unitRootFunctions wraps stats.ADF, stats.KPSS, stats.PhillipsPerron and
// stats.DFGLS:
//
//	unit_root(series, method := 'adf', deterministic := 'level', lags := NULL, lag_rule := 'aic')
//
// method is adf, kpss, pp or dfgls; deterministic none, level or
// level_and_slope; lags is the maximum (or, with lag_rule 'given', the
// exact) number of lagged differences for adf and dfgls and the bandwidth
// for kpss and pp, NULL meaning each test's default; lag_rule is aic, bic,
// drop_insignificant or given (adf and dfgls only).
//
// The STRUCT reads in the order a reader asks: what was tested (method,
// deterministic terms, null hypothesis), the evidence (statistic, p-value,
// the cut-offs at 1%, 5% and 10%), then how it was computed (lags,
// observations, status).
func unitRootFunctions(t *types) []*function {
	result := t.structOf(
		field{"method", t.varchar()},
		field{"deterministic", t.varchar()},
		field{"null_hypothesis", t.varchar()},
		field{"statistic", t.double()},
		field{"p_value", t.double()},
		field{"p_value_bound", t.varchar()},
		field{"cutoff_01", t.double()},
		field{"cutoff_05", t.double()},
		field{"cutoff_10", t.double()},
		field{"lags", t.bigint()},
		field{"observations", t.bigint()},
		field{"status", t.varchar()},
	)
	return []*function{{
		name:     "plumb_unit_root",
		parallel: true,
		reuse:    true,
		params:   []duckdb.TypeInfo{t.doubles(), t.varchar(), t.varchar(), t.bigint(), t.varchar()},
		result:   result,
		nullable: true,
		eval: func(args []driver.Value) (any, error) {
			if args[0] == nil {
				return nil, nil
			}
			x, err := floats(args[0])
			if err != nil {
				return nil, err
			}
			method, deterministic, rule := "adf", string(stats.DeterministicLevel), string(stats.LagAIC)
			for i, dst := range map[int]*string{1: &method, 2: &deterministic, 4: &rule} {
				if args[i] != nil {
					if *dst, err = text(args[i], "option"); err != nil {
						return nil, err
					}
				}
			}
			var lags *int
			if args[3] != nil {
				l, err := integer(args[3], "lags")
				if err != nil {
					return nil, err
				}
				if l < 0 {
					return nil, fmt.Errorf("lags must not be negative, got %d", l)
				}
				lags = &l
			}
			r, err := unitRoot(x, method, stats.Deterministic(deterministic), lags, stats.LagRule(rule))
			if err != nil {
				return nil, err
			}
			return unitRootStruct(r), nil
		},
	}}
}

func unitRoot(x []float64, method string, d stats.Deterministic, lags *int, rule stats.LagRule) (stats.UnitRootResult, error) {
	switch method {
	case "adf":
		return stats.ADF(x, stats.ADFOptions{Deterministic: d, LagRule: rule, MaxLag: lags})
	case "kpss":
		return stats.KPSS(x, stats.KPSSOptions{Deterministic: d, Bandwidth: lags})
	case "pp":
		r, err := stats.PhillipsPerron(x, stats.PPOptions{Deterministic: d, Bandwidth: lags})
		return r.UnitRootResult, err
	case "dfgls":
		return stats.DFGLS(x, stats.DFGLSOptions{Deterministic: d, LagRule: rule, MaxLag: lags})
	}
	return stats.UnitRootResult{}, fmt.Errorf("unknown method %q: use adf, kpss, pp or dfgls", method)
}

// unitRootStruct lays a result out as the SQL STRUCT; a failed test has
// NULL numbers and says why in status.
func unitRootStruct(r stats.UnitRootResult) map[string]any {
	ok := r.Status == stats.StatusOK
	num := func(v float64) any {
		if !ok {
			return nil
		}
		return orNull(v)
	}
	count := func(v int) any {
		if !ok {
			return nil
		}
		return int64(v)
	}
	var bound any
	if ok {
		bound = string(r.PValueBound)
	}
	return map[string]any{
		"method":          r.Method,
		"deterministic":   string(r.Deterministic),
		"null_hypothesis": string(r.NullHypothesis),
		"statistic":       num(r.Statistic),
		"p_value":         num(r.PValue),
		"p_value_bound":   bound,
		"cutoff_01":       num(r.CriticalValues[0]),
		"cutoff_05":       num(r.CriticalValues[1]),
		"cutoff_10":       num(r.CriticalValues[2]),
		"lags":            count(r.Lags),
		"observations":    count(r.Observations),
		"status":          string(r.Status),
	}
}

const unitRootMacros = `
CREATE OR REPLACE TEMP MACRO unit_root(series, method := 'adf', deterministic := 'level', lags := NULL, lag_rule := 'aic') AS
    plumb_unit_root(series::DOUBLE[], method, deterministic, lags::BIGINT, lag_rule);
`
