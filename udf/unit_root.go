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

// The maths: unitroot.ADF, unitroot.KPSS, unitroot.PhillipsPerron and unitroot.DFGLS (stats/unitroot/adf.go, stats/unitroot/kpss.go, stats/unitroot/pp.go, stats/unitroot/dfgls.go; p-values in stats/unitroot/mackinnon.go, stats/unitroot/kpss_limit.go, stats/unitroot/dfgls_table.go).

//go:embed sql/unit_root.sql
var unitRootMacros string

// unitRootFunctions wraps unitroot.ADF, unitroot.KPSS, unitroot.PhillipsPerron and
// unitroot.DFGLS:
//
//	unit_root(series, method, deterministic, lags, lag_rule) (defaults in udf/sql/unit_root.sql)
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
	return []*function{{
		name:     "plumb_unit_root",
		parallel: true,
		reuse:    true,
		params:   []duckdb.TypeInfo{t.doubles(), t.varchar(), t.varchar(), t.bigint(), t.varchar()},
		result:   unitRootLayout.info(t),
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
			r, err := unitRoot(x, method, unitroot.Deterministic(deterministic), lags, unitroot.LagRule(rule))
			if err != nil {
				return nil, err
			}
			return unitRootLayout.record(&r), nil
		},
	}}
}

func unitRoot(x []float64, method string, d unitroot.Deterministic, lags *int, rule unitroot.LagRule) (unitroot.UnitRootResult, error) {
	switch method {
	case "adf":
		return unitroot.ADF(x, unitroot.ADFOptions{Deterministic: d, LagRule: rule, MaxLag: lags})
	case "kpss":
		return unitroot.KPSS(x, unitroot.KPSSOptions{Deterministic: d, Bandwidth: lags})
	case "pp":
		r, err := unitroot.PhillipsPerron(x, unitroot.PPOptions{Deterministic: d, Bandwidth: lags})
		return r.UnitRootResult, err
	case "dfgls":
		return unitroot.DFGLS(x, unitroot.DFGLSOptions{Deterministic: d, LagRule: rule, MaxLag: lags})
	}
	return unitroot.UnitRootResult{}, fmt.Errorf("unknown method %q: use adf, kpss, pp or dfgls", method)
}

type unitRootResult = unitroot.UnitRootResult

// unitRootLayout is unit_root's STRUCT, in the order a reader asks: what
// was tested, the evidence, how it was computed. A failed test has NULL
// numbers and says why in status.
var unitRootLayout = func() *layout[unitRootResult] {
	ok := func(r *unitRootResult) bool { return r.Status == stats.StatusOK }
	n := func(name string, f func(*unitRootResult) float64) column[unitRootResult] {
		return num(name, func(r *unitRootResult) any { return value(f(r), ok(r)) })
	}
	return newLayout(
		varchar("method", func(r *unitRootResult) any { return r.Method }),
		varchar("deterministic", func(r *unitRootResult) any { return string(r.Deterministic) }),
		varchar("null_hypothesis", func(r *unitRootResult) any { return string(r.NullHypothesis) }),
		n("statistic", func(r *unitRootResult) float64 { return r.Statistic }),
		n("p_value", func(r *unitRootResult) float64 { return r.PValue }),
		varchar("p_value_bound", func(r *unitRootResult) any {
			if ok(r) {
				return string(r.PValueBound)
			}
			return nil
		}),
		n("cutoff_01", func(r *unitRootResult) float64 { return r.CriticalValues[0] }),
		n("cutoff_05", func(r *unitRootResult) float64 { return r.CriticalValues[1] }),
		n("cutoff_10", func(r *unitRootResult) float64 { return r.CriticalValues[2] }),
		integer64("lags", func(r *unitRootResult) any { return count(r.Lags, ok(r)) }),
		integer64("observations", func(r *unitRootResult) any { return count(r.Observations, ok(r)) }),
		varchar("status", func(r *unitRootResult) any { return string(r.Status) }),
	)
}()
