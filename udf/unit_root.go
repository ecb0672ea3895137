package udf

import (
	"database/sql/driver"
	_ "embed"
	"fmt"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/defaults"
	"github.com/plumb-sql/plumb/stats"
)

// The maths: stats.ADF, stats.KPSS, stats.PhillipsPerron and stats.DFGLS (stats/adf.go, stats/kpss.go, stats/pp.go, stats/dfgls.go; p-values in stats/mackinnon.go, stats/kpss_limit.go, stats/dfgls_table.go).

//go:embed sql/unit_root.sql
var unitRootMacros string

// unitRootFunctions wraps stats.ADF, stats.KPSS, stats.PhillipsPerron and
// stats.DFGLS:
//
//	unit_root(series, method, deterministic, lags, lag_rule) (defaults in udf/sql/unit_root.sql)
//
// method is adf, kpss, pp or dfgls; deterministic none, constant or trend;
// lags is the maximum (or, with lag_rule 'fixed', the exact) number of
// lagged differences for adf and dfgls and the bandwidth for kpss and pp,
// NULL meaning each test's default; lag_rule is aic, bic, t_stat or fixed
// (adf and dfgls only).
func unitRootFunctions(t *types) []*function {
	result := t.structOf(
		field{"statistic", t.double()},
		field{"p_value", t.double()},
		field{"p_value_bound", t.varchar()},
		field{"lags", t.bigint()},
		field{"nobs", t.bigint()},
		field{"crit_1pct", t.double()},
		field{"crit_5pct", t.double()},
		field{"crit_10pct", t.double()},
		field{"method", t.varchar()},
		field{"deterministic", t.varchar()},
		field{"null_hypothesis", t.varchar()},
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
			method, deterministic, rule := defaults.UnitRootMethod, defaults.Deterministic, defaults.LagRule
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
		"statistic":       num(r.Statistic),
		"p_value":         num(r.PValue),
		"p_value_bound":   bound,
		"lags":            count(r.Lags),
		"nobs":            count(r.NObs),
		"crit_1pct":       num(r.CriticalValues[0]),
		"crit_5pct":       num(r.CriticalValues[1]),
		"crit_10pct":      num(r.CriticalValues[2]),
		"method":          r.Method,
		"deterministic":   string(r.Deterministic),
		"null_hypothesis": string(r.NullHypothesis),
		"status":          string(r.Status),
	}
}
