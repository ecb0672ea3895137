package udf

import (
	"database/sql/driver"
	_ "embed"
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats/verdict"
)

// restore(source, recipes, by, at, value, anchor) (udf/sql/restore.sql): source holds
// values on the transformed scale. With anchor 'last' they are forecasts
// continuing after each group's last_at on its step (a forecast that
// starts anywhere else is an error naming the group); with 'first' they
// are the stationarized series itself (as stationarize returns it, NULLs
// first). Returns the group columns, at and value in original units (NULL
// for a group with no recipe).
//
// The maths: verdict.Recipe's Restore and RestoreForecast (stats/verdict/recipe.go).

//go:embed sql/restore.sql
var restoreMacros string

func restoreFunctions(t *types) []*function {
	d := t.double()
	return []*function{
		{
			// plumb_restore(values, box_cox_lambda, period, seasonal_means,
			// seasonal_differences, trend_intercept, trend_slope,
			// shift_position, shift_size, differences, head, tail, n, anchor)
			name: "plumb_restore",
			params: []duckdb.TypeInfo{t.doubles(), d, t.bigint(), t.doubles(), t.bigint(), d, d,
				t.bigint(), d, t.bigint(), t.doubles(), t.doubles(), t.bigint(), t.varchar()},
			result:   t.doubles(),
			nullable: true,
			eval: func(args []driver.Value) (any, error) {
				if args[0] == nil || args[9] == nil {
					return nil, nil // no values, or no recipe for the group
				}
				return restoreGroup(args)
			},
		}, {
			name:   "plumb_restore_sql",
			params: []duckdb.TypeInfo{t.varchar(), t.varchar(), t.anyType(), t.varchar(), t.varchar(), t.varchar()},
			result: t.varchar(),
			eval: func(args []driver.Value) (any, error) {
				q, err := readSeriesQuery("restore", []driver.Value{args[0], args[2], args[3], args[4]})
				if err != nil {
					return nil, err
				}
				recipes, err := text(args[1], "recipes")
				if err != nil {
					return nil, err
				}
				recipesSQL, err := sourceSQL(recipes)
				if err != nil {
					return nil, err
				}
				recipesSQL = checkedRecipes(q.by, recipesSQL, strings.TrimSpace(recipes))
				anchor, err := text(args[5], "anchor")
				if err != nil {
					return nil, err
				}
				if anchor != "last" && anchor != "first" {
					return nil, fmt.Errorf("anchor must be 'last' (forecasts) or 'first' (the stationarized series), got %q", anchor)
				}
				return restoreSQL(q, recipesSQL, anchor), nil
			},
		}}
}

// unflatten splits anchors stored flat back into one slice per pass.
func unflatten(flat []float64, lags []int) ([][]float64, error) {
	var out [][]float64
	for _, l := range lags {
		if len(flat) < l {
			return nil, fmt.Errorf("the recipe's anchors are shorter than its differencing needs")
		}
		out = append(out, flat[:l])
		flat = flat[l:]
	}
	if len(flat) != 0 {
		return nil, fmt.Errorf("the recipe has %d anchor values more than its differencing needs", len(flat))
	}
	return out, nil
}

// recipeFromColumns rebuilds a verdict.Recipe from its stored columns, in
// plumb_restore's argument order from box_cox_lambda (args[0]) to n
// (args[11]).
func recipeFromColumns(args []driver.Value) (verdict.Recipe, error) {
	r := verdict.Recipe{}
	var err error
	if args[0] != nil {
		r.BoxCox, r.Lambda = true, args[0].(float64)
	}
	if r.Period, err = intOr(args[1], "period", 0); err != nil {
		return r, err
	}
	if args[2] != nil {
		if r.SeasonalMeans, err = floats(args[2]); err != nil {
			return r, err
		}
	}
	if r.SeasonalDifferences, err = intOr(args[3], "seasonal_differences", 0); err != nil {
		return r, err
	}
	if args[4] != nil || args[5] != nil {
		a, err1 := floatOr(args[4], "trend_intercept", math.NaN())
		b, err2 := floatOr(args[5], "trend_slope", math.NaN())
		if err := errors.Join(err1, err2); err != nil {
			return r, err
		}
		r.Trend, r.TrendIntercept, r.TrendSlope = true, a, b
	}
	if args[6] != nil || args[7] != nil {
		pos, err1 := intOr(args[6], "shift_position", 0)
		size, err2 := floatOr(args[7], "shift_size", math.NaN())
		if err := errors.Join(err1, err2); err != nil {
			return r, err
		}
		r.Shift, r.ShiftIndex, r.ShiftSize = true, pos-1, size
	}
	if r.Differences, err = intOr(args[8], "differences", 0); err != nil {
		return r, err
	}
	lags := r.Lags()
	head, tail := []float64{}, []float64{}
	if args[9] != nil {
		if head, err = floats(args[9]); err != nil {
			return r, err
		}
	}
	if args[10] != nil {
		if tail, err = floats(args[10]); err != nil {
			return r, err
		}
	}
	if r.Head, err = unflatten(head, lags); err != nil {
		return r, err
	}
	if r.Tail, err = unflatten(tail, lags); err != nil {
		return r, err
	}
	if r.Length, err = intOr(args[11], "n", 0); err != nil {
		return r, err
	}
	return r, nil
}

// restoreGroup rebuilds a verdict.Recipe from its stored columns and restores
// one group's values.
func restoreGroup(args []driver.Value) (any, error) {
	y, err := floats(args[0])
	if err != nil {
		return nil, err
	}
	r, err := recipeFromColumns(args[1:13])
	if err != nil {
		return nil, err
	}
	anchor, _ := args[13].(string)
	var out []float64
	if anchor == "first" {
		lost := r.Lost()
		if len(y) < lost {
			return nil, nil
		}
		for _, v := range y[:lost] {
			if !math.IsNaN(v) {
				return nil, fmt.Errorf("with anchor 'first' each group's first %d values must be NULL, as stationarize leaves them", lost)
			}
		}
		out, _, err = r.Restore(y[lost:])
	} else {
		out, _, err = r.RestoreForecast(y)
	}
	if err != nil {
		return nil, err
	}
	return listOrNull(out), nil
}

// restoreSQL joins each group's values to its stored recipe and restores
// them. With anchor 'last' the values are forecasts: they must start one
// step after the group's last_at and keep to its step, or the query fails
// naming the group (a forecast that starts later or inside the history
// would otherwise be restored as if it continued the series, silently
// wrong). With anchor 'first' a group must have as many values as the
// series its recipe came from.
func restoreSQL(q seriesQuery, recipes, anchor string) string {
	join := make([]string, len(q.by))
	for i, b := range q.by {
		join[i] = fmt.Sprintf("plumb_r.%[1]s IS NOT DISTINCT FROM plumb_series.%[1]s", quoteIdent(b))
	}
	label := q.groupLabelOf("plumb_series.")
	name := quoteLiteral("restore: ")
	check := fmt.Sprintf(`WHEN len(plumb_at) <> plumb_r.n THEN
                       error(%[1]s || 'group ' || %[2]s || ' has ' || len(plumb_at) || ' values, but its recipe was made from a series of ' || plumb_r.n)`, name, label)
	if anchor == "last" {
		check = fmt.Sprintf(`WHEN plumb_at[1] - plumb_r.last_at <> plumb_r.step THEN
                       error(%[1]s || 'the forecasts of group ' || %[2]s || ' start at ' || plumb_at[1]::VARCHAR || ', but must start one step after the last observation (' || plumb_r.last_at::VARCHAR || ' + ' || plumb_r.step::VARCHAR || ')')
                   WHEN len(plumb_at) > 1 AND (list_min(plumb_steps) <> plumb_r.step OR list_max(plumb_steps) <> plumb_r.step) THEN
                       error(%[1]s || 'the forecasts of group ' || %[2]s || ' do not follow its step of ' || plumb_r.step::VARCHAR || ': restore needs one forecast per step, without gaps')`, name, label)
	}
	perGroup := fmt.Sprintf(`SELECT %[1]s, plumb_at,
                   CASE
                   WHEN plumb_r.differences IS NULL THEN list_resize([]::DOUBLE[], len(plumb_at))
                   %[5]s
                   ELSE plumb_restore(plumb_value, plumb_r.box_cox_lambda, plumb_r.period, plumb_r.seasonal_means,
                                      plumb_r.seasonal_differences, plumb_r.trend_intercept, plumb_r.trend_slope,
                                      plumb_r.shift_position, plumb_r.shift_size, plumb_r.differences,
                                      plumb_r.head, plumb_r.tail, plumb_r.n, %[2]s)
                   END AS plumb_restored
            FROM (SELECT *, [plumb_at[i + 1] - plumb_at[i] FOR i IN range(1, len(plumb_at))] AS plumb_steps FROM plumb_series) AS plumb_series
            LEFT JOIN %[3]s AS plumb_r ON %[4]s`,
		q.byList("plumb_series."), quoteLiteral(anchor), recipes, strings.Join(join, " AND "), check)
	return q.batchedCTEs(perGroup, rowBytes(2)) + fmt.Sprintf(`
SELECT %[1]s, unnest(plumb_at) AS %[2]s, unnest(plumb_restored) AS %[3]s
FROM plumb_done`, q.byList(""), quoteIdent(q.at), quoteIdent(q.value))
}

// restoreReads are the columns of stationarize_recipes' rows that restore
// reads, beside the group columns.
var restoreReads = []string{"n", "last_at", "step", "box_cox_lambda", "period", "seasonal_means", "seasonal_differences",
	"trend_intercept", "trend_slope", "shift_position", "shift_size", "differences", "head", "tail"}

// checkedRecipes is restore's recipes source as a subquery that fails with
// plumb's message (columnsCheck) when it lacks a group column or a column of
// the recipe.
func checkedRecipes(by []string, recipes, label string) string {
	var wanted []wantedColumn
	var names []string
	for _, b := range by {
		wanted, names = append(wanted, wantedColumn{b, "by"}), append(names, b)
	}
	for _, c := range restoreReads {
		wanted, names = append(wanted, wantedColumn{c, "recipe"}), append(names, c)
	}
	return fmt.Sprintf("(%s\n    WHERE (%s))", guardedSelect(recipes, names), columnsCheck("restore", recipes, label, wanted, ""))
}
