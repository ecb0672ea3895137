package udf

import (
	"database/sql/driver"
	_ "embed"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
)

// The Box-Cox family:
//
//	box_cox(series, exponent)              -> DOUBLE[], NULL when a value is ≤ 0 or missing
//	inverse_box_cox(series, exponent)      -> DOUBLE[], NULL where a value lies outside the transform's range
//	box_cox_lambda(series, period := NULL) -> DOUBLE, Guerrero's λ, NULL when undefined
//
// The exponent is λ (lambda is a reserved word in SQL).
//
// The maths: stats.BoxCox, stats.InverseBoxCox and stats.GuerreroLambda
// (stats/boxcox.go).

//go:embed sql/box_cox.sql
var boxCoxMacros string

func boxCoxFunctions(t *types) []*function {
	return []*function{
		{
			name:   "plumb_box_cox",
			params: []duckdb.TypeInfo{t.doubles(), t.double()},
			result: t.doubles(),
			eval: func(args []driver.Value) (any, error) {
				x, err := floats(args[0])
				if err != nil {
					return nil, err
				}
				lambda, _ := floatOr(args[1], "lambda", 0)
				y, status := stats.BoxCox(x, lambda)
				if status != stats.StatusOK {
					return nil, nil // documented: NULL when a value is ≤ 0 or missing
				}
				return doubleList(y), nil
			},
		},
		{
			name:   "plumb_inverse_box_cox",
			params: []duckdb.TypeInfo{t.doubles(), t.double()},
			result: t.doubles(),
			eval: func(args []driver.Value) (any, error) {
				y, err := floats(args[0])
				if err != nil {
					return nil, err
				}
				lambda, _ := floatOr(args[1], "lambda", 0)
				x, _ := stats.InverseBoxCox(y, lambda)
				return doubleList(x), nil // values outside the transform's range are NULL
			},
		},
		{
			name:     "plumb_box_cox_lambda",
			params:   []duckdb.TypeInfo{t.doubles(), t.bigint()},
			result:   t.double(),
			nullable: true,
			eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
				period, err := periodArgMeaning(args[1], "for none")
				if err != nil {
					return nil, err
				}
				lambda, status := stats.GuerreroLambda(x, period)
				if status != stats.StatusOK {
					return nil, nil
				}
				return lambda, nil
			}),
		},
	}
}
