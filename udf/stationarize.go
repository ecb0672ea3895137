package udf

import (
	"database/sql/driver"
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
//	    one row per group: the group columns, last_at, status, and the
//	    recipe: box_cox_lambda (NULL for none), period, seasonal_differences,
//	    differences, head and tail (the anchors, see stats.Recipe: for each
//	    differencing pass in order, its lag's worth of values). Store it.
//	restore(source, recipes, by, at, value, anchor := 'last')
//	    source holds values on the transformed scale. With anchor 'last'
//	    they are forecasts continuing after each group's last_at; with
//	    'first' they are the stationarized series itself (as stationarize
//	    returns it, NULLs first). Returns the group columns, at and value in
//	    original units (NULL for a group with no recipe).
//
// stationarize and stationarize_recipes judge each group with the same
// rules as diagnose (without filling gaps), so they agree with it.
func stationarizeFunctions(t *types) []*function {
	recipeFields := []field{
		{"box_cox_lambda", t.double()}, {"period", t.bigint()},
		{"seasonal_differences", t.bigint()}, {"differences", t.bigint()},
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
		name:     "plumb_restore",
		params:   []duckdb.TypeInfo{t.doubles(), t.double(), t.bigint(), t.bigint(), t.bigint(), t.doubles(), t.doubles(), t.varchar()},
		result:   t.doubles(),
		nullable: true,
		eval: func(args []driver.Value) (any, error) {
			if args[0] == nil || args[4] == nil {
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
			q, err := readSeriesQuery("stationarize", args[:4])
			if err != nil {
				return nil, err
			}
			if _, err := stationarityOptions(args[4], args[5]); err != nil {
				return nil, err
			}
			recipes, _ := args[6].(bool)
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
		"seasonal_differences": nil, "differences": nil, "head": nil, "tail": nil}
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
	if recipe.BoxCox {
		out["box_cox_lambda"] = recipe.Lambda
	}
	if recipe.Period > 0 {
		out["period"] = int64(recipe.Period)
	}
	out["seasonal_differences"] = int64(recipe.SeasonalDifferences)
	out["differences"] = int64(recipe.Differences)
	out["head"] = flatten(recipe.Head)
	out["tail"] = flatten(recipe.Tail)
	return out, nil
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

// restoreGroup rebuilds a stats.Recipe from its stored columns and restores
// one group's values.
func restoreGroup(args []driver.Value) (any, error) {
	y, err := floats(args[0])
	if err != nil {
		return nil, err
	}
	r := stats.Recipe{}
	if args[1] != nil {
		r.BoxCox, r.Lambda = true, args[1].(float64)
	}
	if r.Period, err = intOr(args[2], "period", 0); err != nil {
		return nil, err
	}
	if r.SeasonalDifferences, err = intOr(args[3], "seasonal_differences", 0); err != nil {
		return nil, err
	}
	if r.Differences, err = intOr(args[4], "differences", 0); err != nil {
		return nil, err
	}
	lags := make([]int, 0, r.SeasonalDifferences+r.Differences)
	for i := 0; i < r.SeasonalDifferences; i++ {
		lags = append(lags, r.Period)
	}
	for i := 0; i < r.Differences; i++ {
		lags = append(lags, 1)
	}
	head, tail := []float64{}, []float64{}
	if args[5] != nil {
		if head, err = floats(args[5]); err != nil {
			return nil, err
		}
	}
	if args[6] != nil {
		if tail, err = floats(args[6]); err != nil {
			return nil, err
		}
	}
	if r.Head, err = unflatten(head, lags); err != nil {
		return nil, err
	}
	if r.Tail, err = unflatten(tail, lags); err != nil {
		return nil, err
	}
	anchor, _ := args[7].(string)
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
		perGroup := fmt.Sprintf(`SELECT %[1]s, plumb_at[len(plumb_at)] AS last_at, plumb_s.status AS status,
                   plumb_s.box_cox_lambda AS box_cox_lambda, plumb_s.period AS period,
                   plumb_s.seasonal_differences AS seasonal_differences, plumb_s.differences AS differences,
                   plumb_s.head AS head, plumb_s.tail AS tail
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

func restoreSQL(q seriesQuery, recipes, anchor string) string {
	join := make([]string, len(q.by))
	for i, b := range q.by {
		join[i] = fmt.Sprintf("plumb_r.%[1]s IS NOT DISTINCT FROM plumb_series.%[1]s", quoteIdent(b))
	}
	perGroup := fmt.Sprintf(`SELECT %[1]s, plumb_at,
                   coalesce(plumb_restore(plumb_value, plumb_r.box_cox_lambda, plumb_r.period, plumb_r.seasonal_differences,
                                          plumb_r.differences, plumb_r.head, plumb_r.tail, %[2]s),
                            list_resize([]::DOUBLE[], len(plumb_at))) AS plumb_restored
            FROM plumb_series LEFT JOIN %[3]s AS plumb_r ON %[4]s`,
		q.byList("plumb_series."), quoteLiteral(anchor), recipes, strings.Join(join, " AND "))
	return q.batchedCTEs(perGroup, rowBytes(2)) + fmt.Sprintf(`
SELECT %[1]s, unnest(plumb_at) AS %[2]s, unnest(plumb_restored) AS %[3]s
FROM plumb_done`, q.byList(""), quoteIdent(q.at), quoteIdent(q.value))
}

const stationarizeMacros = `
CREATE OR REPLACE TEMP MACRO stationarize(source, "by", "at", value, period := NULL, alpha := 0.05) AS TABLE
    FROM query(plumb_stationarize_sql(source, "by", "at", value, period::BIGINT, alpha::DOUBLE, false));
CREATE OR REPLACE TEMP MACRO stationarize_recipes(source, "by", "at", value, period := NULL, alpha := 0.05) AS TABLE
    FROM query(plumb_stationarize_sql(source, "by", "at", value, period::BIGINT, alpha::DOUBLE, true));
CREATE OR REPLACE TEMP MACRO restore(source, recipes, "by", "at", value, anchor := 'last') AS TABLE
    FROM query(plumb_restore_sql(source, recipes, "by", "at", value, anchor));
`
