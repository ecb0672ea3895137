package udf

import (
	"database/sql/driver"
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
)

// stationarizeFunctions provides three table functions that transform every
// group by its own recommended recipe and bring values back:
//
//	stationarize(source, by, at, value, period := NULL, alpha := 0.05)
//	    one row per source row: the group columns, at, the value and
//	    stationary_value, the value after the group's recipe; each group's
//	    first D·period + d rows have none (NULL).
//	stationarize_recipes(source, by, at, value, period := NULL, alpha := 0.05)
//	    one row per group: the group columns, n, last_at, step, status, and
//	    the recipe (see stats.Recipe): box_cox_lambda (NULL for none),
//	    period, seasonal_means (NULL for none), seasonal_differences,
//	    trend_intercept and trend_slope (NULL for none), shift_position,
//	    shift_at and shift_size (NULL for none), differences, and the
//	    anchors head and tail. Store it.
//	restore(source, recipes, by, at, value, anchor := 'last')
//	    source holds values on the transformed scale. With anchor 'last'
//	    they are forecasts continuing after each group's last_at on its
//	    step (a forecast that starts anywhere else is an error naming the
//	    group); with 'first' they are the stationarized series itself (as
//	    stationarize returns it, NULLs first). Returns the group columns, at
//	    and value in original units (NULL for a group with no recipe).
//
// stationarize and stationarize_recipes judge each group with the same
// rules as diagnose (without filling gaps), so they agree with it.
func stationarizeFunctions(t *types) []*function {
	d := t.double()
	recipeFields := []field{
		{"box_cox_lambda", d}, {"period", t.bigint()},
		{"seasonal_means", t.doubles()}, {"seasonal_differences", t.bigint()},
		{"trend_intercept", d}, {"trend_slope", d},
		{"shift_position", t.bigint()}, {"shift_size", d},
		{"differences", t.bigint()},
		{"head", t.doubles()}, {"tail", t.doubles()},
	}
	return []*function{{
		name:     "plumb_stationarize",
		parallel: true,
		params:   []duckdb.TypeInfo{t.doubles(), t.bigint(), t.double()},
		result:   t.structOf(append([]field{{"values", t.doubles()}, {"status", t.varchar()}}, recipeFields...)...),
		nullable: true,
		eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
			opts, err := stationarityOptions(args[1], args[2])
			if err != nil {
				return nil, err
			}
			return stationarizeGroup(x, opts)
		}),
	}, {
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

// stationarizeGroup judges x, applies its recipe and lays out the result.
func stationarizeGroup(x []float64, opts stats.StationarityOptions) (any, error) {
	out := map[string]any{"values": nil, "status": nil, "box_cox_lambda": nil, "period": nil,
		"seasonal_means": nil, "seasonal_differences": nil, "trend_intercept": nil, "trend_slope": nil,
		"shift_position": nil, "shift_size": nil, "differences": nil, "head": nil, "tail": nil}
	v, err := stats.Stationarity(x, opts)
	if err != nil {
		return nil, err
	}
	out["status"] = string(v.Status)
	if v.Status != stats.StatusOK && v.Status != stats.StatusSeasonUnknown {
		return out, nil
	}
	recipe := v.Recipe()
	y, status, err := recipe.Apply(x)
	if err != nil {
		return nil, err
	}
	if status != stats.StatusOK {
		out["status"] = string(status)
		return out, nil
	}
	padded := make([]float64, 0, len(x))
	for i := 0; i < recipe.Lost(); i++ {
		padded = append(padded, math.NaN())
	}
	out["values"] = doubleList(append(padded, y...))
	for k, v := range recipeColumns(recipe) {
		out[k] = v
	}
	return out, nil
}

// recipeColumns lays out a recipe's steps as stationarize_recipes stores
// them (without the anchors).
func recipeColumns(r stats.Recipe) map[string]any {
	out := map[string]any{"box_cox_lambda": nil, "period": nil, "seasonal_means": nil,
		"trend_intercept": nil, "trend_slope": nil, "shift_position": nil, "shift_size": nil,
		"seasonal_differences": int64(r.SeasonalDifferences), "differences": int64(r.Differences),
		"head": flatten(r.Head), "tail": flatten(r.Tail)}
	if r.BoxCox {
		out["box_cox_lambda"] = r.Lambda
	}
	if r.Period > 0 {
		out["period"] = int64(r.Period)
	}
	if r.SeasonalMeans != nil {
		out["seasonal_means"] = doubleList(r.SeasonalMeans)
	}
	if r.Trend {
		out["trend_intercept"], out["trend_slope"] = r.TrendIntercept, r.TrendSlope
	}
	if r.Shift {
		out["shift_position"], out["shift_size"] = int64(r.ShiftIndex+1), r.ShiftSize
	}
	return out
}

// flatten joins the recipe's anchors, one slice per pass, into one list.
func flatten(parts [][]float64) doubleList {
	out := doubleList{}
	for _, p := range parts {
		out = append(out, p...)
	}
	return out
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

// recipeFromColumns rebuilds a stats.Recipe from its stored columns, in
// plumb_restore's argument order from box_cox_lambda (args[0]) to n
// (args[11]).
func recipeFromColumns(args []driver.Value) (stats.Recipe, error) {
	r := stats.Recipe{}
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

// restoreGroup rebuilds a stats.Recipe from its stored columns and restores
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

// recipeColumns are the columns of stationarize_recipes' rows that restore
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

const stationarizeMacros = `
CREATE OR REPLACE TEMP MACRO stationarize(source, "by", "at", value, period := NULL, alpha := 0.05) AS TABLE
    FROM query(plumb_stationarize_sql(source, "by", "at", value, period::BIGINT, alpha::DOUBLE, false));
CREATE OR REPLACE TEMP MACRO stationarize_recipes(source, "by", "at", value, period := NULL, alpha := 0.05) AS TABLE
    FROM query(plumb_stationarize_sql(source, "by", "at", value, period::BIGINT, alpha::DOUBLE, true));
CREATE OR REPLACE TEMP MACRO restore(source, recipes, "by", "at", value, anchor := 'last') AS TABLE
    FROM query(plumb_restore_sql(source, recipes, "by", "at", value, anchor));
`
