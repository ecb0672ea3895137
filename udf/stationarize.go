package udf

import (
	"database/sql/driver"
	_ "embed"
	"fmt"
	"math"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/verdict"
)

// The maths: verdict.Stationarity and verdict.Recipe (stats/verdict/verdict.go, stats/verdict/recipe.go).

//go:embed sql/stationarize.sql
var stationarizeMacros string

// stationarizeFunctions provides two table functions that transform every
// group by its own recommended recipe:
//
//	stationarize(source, by, at, value, period, alpha)
//	    one row per source row: the group columns, at, the value and
//	    stationary_value, the value after the group's recipe; each group's
//	    first D·period + d rows have none (NULL).
//	stationarize_recipes(source, by, at, value, period, alpha)
//	    one row per group: the group columns, n, last_at, step, status, and
//	    the recipe (see verdict.Recipe): box_cox_lambda (NULL for none),
//	    period, seasonal_means (NULL for none), seasonal_differences,
//	    trend_intercept and trend_slope (NULL for none), shift_position,
//	    shift_at and shift_size (NULL for none), differences, and the
//	    anchors head and tail. Store it.
//
// restore (restore.go) brings values back to original units with the
// stored recipes.
//
// stationarize and stationarize_recipes judge each group with the same
// rules as diagnose (without filling gaps), so they agree with it.
func stationarizeFunctions(t *types) []*function {
	return []*function{{
		name:     "plumb_stationarize",
		parallel: true,
		params:   []duckdb.TypeInfo{t.doubles(), t.bigint(), t.double()},
		result:   stationarizeLayout.info(t),
		nullable: true,
		eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
			opts, err := stationarityOptions(args[1], args[2])
			if err != nil {
				return nil, err
			}
			return stationarizeGroup(x, opts)
		}),
	}, {
		name:     "plumb_stationarize_sql",
		params:   []duckdb.TypeInfo{t.varchar(), t.anyType(), t.varchar(), t.varchar(), t.bigint(), t.double(), t.boolean()},
		result:   t.varchar(),
		nullable: true,
		eval: func(args []driver.Value) (any, error) {
			recipes, _ := args[6].(bool)
			name := "stationarize"
			if recipes {
				name = "stationarize_recipes"
			}
			q, err := readSeriesQuery(name, args[:4])
			if err != nil {
				return nil, err
			}
			if _, err := stationarityOptions(args[4], args[5]); err != nil {
				return nil, err
			}
			return stationarizeSQL(q, sqlLiteral(args[4]), sqlLiteral(args[5]), recipes), nil
		},
	}}
}

// stationarizeGroup judges x, applies its recipe and lays out the result.
func stationarizeGroup(x []float64, opts verdict.StationarityOptions) (any, error) {
	v, err := verdict.Stationarity(x, opts)
	if err != nil {
		return nil, err
	}
	out := stationarized{status: string(v.Status)}
	if v.Status != stats.StatusOK && v.Status != stats.StatusSeasonUnknown {
		return stationarizeLayout.record(&out), nil
	}
	recipe := v.Recipe()
	y, status, err := recipe.Apply(x)
	if err != nil {
		return nil, err
	}
	if status != stats.StatusOK {
		out.status = string(status)
		return stationarizeLayout.record(&out), nil
	}
	padded := make([]float64, 0, len(x))
	for i := 0; i < recipe.Lost(); i++ {
		padded = append(padded, math.NaN())
	}
	out.values = doubleList(append(padded, y...))
	out.recipe = &recipe
	return stationarizeLayout.record(&out), nil
}

// stationarized is one group as plumb_stationarize returns it: the
// stationary values and the recipe (nil when none was applied).
type stationarized struct {
	values any
	status string
	recipe *verdict.Recipe
}

// stationarizeLayout is plumb_stationarize's STRUCT: the values, the status
// and the recipe's steps as stationarize_recipes stores them. Steps a
// recipe does not take are NULL.
var stationarizeLayout = func() *layout[stationarized] {
	step := func(f func(r *verdict.Recipe) any) func(*stationarized) any {
		return func(s *stationarized) any {
			if s.recipe == nil {
				return nil
			}
			return f(s.recipe)
		}
	}
	return newLayout(
		doubles("values", func(s *stationarized) any { return s.values }),
		varchar("status", func(s *stationarized) any { return s.status }),
		num("box_cox_lambda", step(func(r *verdict.Recipe) any {
			if r.BoxCox {
				return r.Lambda
			}
			return nil
		})),
		integer64("period", step(func(r *verdict.Recipe) any {
			if r.Period > 0 {
				return int64(r.Period)
			}
			return nil
		})),
		doubles("seasonal_means", step(func(r *verdict.Recipe) any {
			if r.SeasonalMeans != nil {
				return doubleList(r.SeasonalMeans)
			}
			return nil
		})),
		integer64("seasonal_differences", step(func(r *verdict.Recipe) any { return int64(r.SeasonalDifferences) })),
		num("trend_intercept", step(func(r *verdict.Recipe) any {
			if r.Trend {
				return r.TrendIntercept
			}
			return nil
		})),
		num("trend_slope", step(func(r *verdict.Recipe) any {
			if r.Trend {
				return r.TrendSlope
			}
			return nil
		})),
		integer64("shift_position", step(func(r *verdict.Recipe) any {
			if r.Shift {
				return int64(r.ShiftIndex + 1)
			}
			return nil
		})),
		num("shift_size", step(func(r *verdict.Recipe) any {
			if r.Shift {
				return r.ShiftSize
			}
			return nil
		})),
		integer64("differences", step(func(r *verdict.Recipe) any { return int64(r.Differences) })),
		doubles("head", step(func(r *verdict.Recipe) any { return flatten(r.Head) })),
		doubles("tail", step(func(r *verdict.Recipe) any { return flatten(r.Tail) })),
	)
}()

// flatten joins the recipe's anchors, one slice per pass, into one list.
func flatten(parts [][]float64) doubleList {
	out := doubleList{}
	for _, p := range parts {
		out = append(out, p...)
	}
	return out
}

func stationarizeSQL(q seriesQuery, period, alpha string, recipes bool) string {
	if recipes {
		// step is the usual step between consecutive times, in the at
		// column's own arithmetic (days for a DATE, an INTERVAL for a
		// TIMESTAMP, a number for a number): restore checks forecasts with it.
		perGroup := fmt.Sprintf(`SELECT %[1]s, len(plumb_at) AS n, plumb_at[len(plumb_at)] AS last_at,
                   list_mode([plumb_at[i + 1] - plumb_at[i] FOR i IN range(1, len(plumb_at))]) AS step,
                   plumb_s.status AS status,
                   plumb_s.box_cox_lambda AS box_cox_lambda, plumb_s.period AS period,
                   plumb_s.seasonal_means AS seasonal_means, plumb_s.seasonal_differences AS seasonal_differences,
                   plumb_s.trend_intercept AS trend_intercept, plumb_s.trend_slope AS trend_slope,
                   plumb_s.shift_position AS shift_position, plumb_at[plumb_s.shift_position] AS shift_at,
                   plumb_s.shift_size AS shift_size,
                   plumb_s.differences AS differences, plumb_s.head AS head, plumb_s.tail AS tail
            FROM (SELECT *, plumb_stationarize(plumb_value, %[2]s, %[3]s) AS plumb_s FROM plumb_series)`,
			q.byList(""), period, alpha)
		return q.batchedCTEs(perGroup, gatherBytesPerRow) + "\nFROM plumb_done"
	}
	perGroup := fmt.Sprintf(`SELECT %[1]s, plumb_at, plumb_raw,
                   coalesce(plumb_stationarize(plumb_value, %[2]s, %[3]s).values, list_resize([]::DOUBLE[], len(plumb_at))) AS plumb_stationary
            FROM plumb_series`, q.byList(""), period, alpha)
	return q.batchedCTEs(perGroup, rowBytes(3)) + fmt.Sprintf(`
SELECT %[1]s, unnest(plumb_at) AS %[2]s, unnest(plumb_raw) AS %[3]s, unnest(plumb_stationary) AS stationary_value
FROM plumb_done`, q.byList(""), quoteIdent(q.at), quoteIdent(q.value))
}
