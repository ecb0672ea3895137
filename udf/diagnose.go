package udf

import (
	"database/sql/driver"
	"fmt"
	"math"
	"slices"
	"strings"
	"sync/atomic"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
)

// diagnoseFunctions provides the per-group work and the SQL of
//
//	diagnose(source, by := ..., at := ..., value := ..., period := NULL, alpha := 0.05, fill := 'none',
//	         shard := NULL, shards := NULL)
//
// which returns one row per group: the group columns; n, first_at, last_at,
// gaps (time points missing from the group's usual step), missing (NULL
// values), status; the verdict of stats.Stationarity with the tests behind
// it; the Ljung-Box p-value of the series after its recommended transform;
// Benjamini-Hochberg q-values across all groups for each test's p-value;
// and rank, 1 for the group furthest from stationary.
//
// With shard := k, shards := n it judges only the groups of shard k
// (shard.go) and returns their rows without q-values and rank, with shard
// and shards columns instead; combine_diagnoses ranks the union of the n
// parts.
func diagnoseFunctions(t *types) []*function {
	fields := append(verdictFields(t),
		field{"n_used", t.bigint()}, field{"step", t.bigint()},
		field{"gaps", t.bigint()}, field{"missing", t.bigint()},
		field{"ljung_box_p_value", t.double()}, field{"shift_point", t.bigint()},
	)
	return []*function{{
		name:     "plumb_diagnose",
		parallel: true,
		reuse:    true, // the result is a STRUCT of numbers and text
		params:   []duckdb.TypeInfo{t.anyType(), t.bigint(), t.double(), t.varchar()},
		result:   t.structOf(fields...),
		nullable: true,
		eval: withPoints(func(p points, args []driver.Value) (any, error) {
			opts, err := stationarityOptions(args[1], args[2])
			if err != nil {
				return nil, err
			}
			fill, err := fillMethod(args[3])
			if err != nil {
				return nil, err
			}
			order := p.sortByTime()
			return diagnoseGroup(p.at, p.values, order, opts, fill)
		}),
	}, {
		// plumb_q_values(p DOUBLE[]) -> DOUBLE[]: Benjamini-Hochberg
		// q-values of a list of p-values, NULL for NULL.
		name:   "plumb_q_values",
		params: []duckdb.TypeInfo{t.doubles()},
		result: t.doubles(),
		eval: func(args []driver.Value) (any, error) {
			p, err := floats(args[0])
			if err != nil {
				return nil, err
			}
			return doubleList(stats.BenjaminiHochberg(p)), nil
		},
	}, {
		name:     "plumb_diagnose_sql",
		params:   []duckdb.TypeInfo{t.varchar(), t.anyType(), t.varchar(), t.varchar(), t.bigint(), t.double(), t.varchar(), t.bigint(), t.bigint()},
		result:   t.varchar(),
		nullable: true, // period, shard and shards may be NULL
		eval: func(args []driver.Value) (any, error) {
			q, err := readSeriesQuery("diagnose", args[:4])
			if err != nil {
				return nil, err
			}
			q.points = true
			if q.shard, q.shards, err = shardArgs(args[7], args[8]); err != nil {
				return nil, err
			}
			if _, err := stationarityOptions(args[4], args[5]); err != nil {
				return nil, err
			}
			fill, err := text(args[6], "fill")
			if err != nil {
				return nil, err
			}
			if _, err := stats.Regularize(nil, nil, stats.FillMethod(fill)); err != nil {
				return nil, err
			}
			return diagnoseSQL(q, sqlLiteral(args[4]), sqlLiteral(args[5]), quoteLiteral(fill)), nil
		},
	}}
}

// groupsDone counts the groups plumb_diagnose has judged in this process.
var groupsDone atomic.Int64

// GroupsDone returns how many groups diagnose has judged in this process
// so far; a command polls it to show progress on a long scan.
func GroupsDone() int64 { return groupsDone.Load() }

// diagnoseGroup judges one group: its points sorted by time, with order
// saying where each stood in the list as aggregated (nil: in order).
func diagnoseGroup(at []int64, x []float64, order []int, opts stats.StationarityOptions, fill stats.FillMethod) (any, error) {
	for i := 1; i < len(at); i++ {
		if at[i] == at[i-1] {
			out := stationarityStruct(stats.StationarityResult{Status: duplicateAt, BoxCoxLambda: math.NaN(), ShiftIndex: -1})
			out["seasonal_strength"], out["reason"] = nil, nil
			for _, k := range []string{"n_used", "step", "gaps", "missing", "ljung_box_p_value", "shift_point"} {
				out[k] = nil
			}
			return out, nil
		}
	}
	defer groupsDone.Add(1)
	reg, err := stats.Regularize(at, x, fill)
	if err != nil {
		return nil, err
	}
	v, err := stats.Stationarity(reg.Values, opts)
	if err != nil {
		return nil, err
	}
	out := stationarityStruct(v)
	out["n_used"] = int64(len(reg.Values))
	out["step"] = int64(reg.Step)
	out["gaps"] = int64(reg.Gaps)
	out["missing"] = int64(reg.Missing)
	out["ljung_box_p_value"], out["shift_point"] = nil, nil
	failed := v.Status != stats.StatusOK && v.Status != stats.StatusSeasonUnknown
	if !failed {
		// The series after its recommended transform (the verdict's own,
		// applied to the series with its outliers set aside).
		if v.Differenced != nil {
			if lb, err := stats.LjungBox(v.Differenced, 0, 0); err == nil && lb.Status == stats.StatusOK {
				out["ljung_box_p_value"] = orNull(lb.PValue)
			}
		}
		if v.ShiftIndex >= 0 {
			out["shift_point"] = int64(observationAt(at, reg, v.ShiftIndex, order))
		}
	}
	switch {
	case failed:
	case (reg.Gaps > 0 || reg.Missing > 0) && fill != stats.FillNone && fill != "":
		out["status"] = "gaps_filled"
	case reg.Gaps > 0 || reg.Irregular > 0:
		out["status"] = "gaps_ignored"
	}
	return out, nil
}

// observationAt returns where, in the list of points as aggregated, the
// first observation at or after position i of the judged series stands:
// position i is an observation's own index when nothing was filled, and a
// point of the regular grid from at[0] in steps of reg.Step otherwise.
func observationAt(at []int64, reg stats.Regular, i int, order []int) int {
	k, _ := slices.BinarySearch(at, timeAt(at, reg, i))
	k = min(k, len(at)-1)
	if order != nil {
		return order[k]
	}
	return k
}

// sqlLiteral renders a NULL, integer or float argument back as SQL.
func sqlLiteral(v driver.Value) string {
	switch x := v.(type) {
	case nil:
		return "NULL"
	case float64:
		return fmt.Sprintf("%v::DOUBLE", x)
	default:
		return fmt.Sprint(x)
	}
}

// diagnoseTests are the p-value columns that get Benjamini-Hochberg q-values.
var diagnoseTests = []string{"adf", "kpss", "mean", "spread", "ljung_box"}

// diagnoseFields are diagnose's columns after the group columns, n,
// first_at and last_at, in order; status must come first. Each is a field
// of plumb_diagnose's STRUCT, except shift_at, which the query reads from
// the group's points (diagnoseSQL). A new column of diagnose's rows is one
// more name here (and a field of the STRUCT); sharded parts and
// combine_diagnoses carry it through unchanged.
var diagnoseFields = []string{"status", "reason", "gaps", "missing", "n_used",
	"mean_stable", "spread_stable", "seasonal", "stationary", "violations",
	"mean_cause", "shift_at", "shift_size", "trend_slope", "spread_cause", "seasonal_kind", "second_period",
	"zero_share", "demand_class", "outliers",
	"differences", "seasonal_differences", "box_cox_lambda", "period", "seasonal_strength",
	"cured", "left_violations", "over_differenced", "score",
	"adf_statistic", "adf_p_value", "adf_lags", "kpss_statistic", "kpss_p_value", "kpss_lags",
	"mean_p_value", "spread_p_value", "ljung_box_p_value"}

// diagnoseSQL judges every group a batch at a time (batchedCTEs), then
// ranks them (rankedSQL); with shards set it returns the groups of one shard
// with their raw p-values, for combine_diagnoses. A level shift's shift_at
// is the at value of the point plumb_diagnose names by its place in the
// aggregated list (shift_point), in the at column's own type; the verdict
// is computed in a subquery so that DuckDB calls plumb_diagnose once per
// group (TestDiagnoseShiftAt counts the calls).
func diagnoseSQL(q seriesQuery, period, alpha, fill string) string {
	by := q.byList("")
	perGroup := fmt.Sprintf(`SELECT %[1]s, n, first_at, last_at, plumb_d,
                   CASE WHEN plumb_d.shift_point IS NOT NULL THEN plumb_points[plumb_d.shift_point + 1].t END AS plumb_shift_at
            FROM (SELECT %[1]s, plumb_points, plumb_rows AS n, plumb_first_at AS first_at, plumb_last_at AS last_at,
                         plumb_diagnose(plumb_points, %[2]s, %[3]s, %[4]s) AS plumb_d
                  FROM plumb_series)`, by, period, alpha, fill)
	picks := make([]string, len(diagnoseFields))
	for i, f := range diagnoseFields {
		picks[i] = fmt.Sprintf("plumb_d.%s AS %s", f, f)
		if f == "shift_at" {
			picks[i] = "plumb_shift_at AS shift_at"
		}
	}
	picks[0] = q.duplicateAtCheck("plumb_d.status") + " AS status"
	judged := fmt.Sprintf(`, plumb_judged AS (
    SELECT %s, n, first_at, last_at, %s
    FROM plumb_done
)`, by, strings.Join(picks, ", "))
	if q.shards > 0 {
		return q.batchedCTEs(perGroup, gatherBytesPerRow) + judged + fmt.Sprintf(`
SELECT *, %d AS shard, %d AS shards FROM plumb_judged ORDER BY %s`, q.shard, q.shards, by)
	}
	return q.batchedCTEs(perGroup, gatherBytesPerRow) + judged + rankedSQL(by)
}

// rankedSQL finishes diagnose and combine_diagnoses. It follows CTEs that
// end in plumb_judged, one row per group with the p-value columns of
// diagnoseTests and score, and adds a Benjamini-Hochberg q-value column per
// test and rank (1 for the highest score), ordered by rank and then by
// orderTail (the group columns).
//
// The q-values come from one list per test, in the groups' row order,
// adjusted in Go (plumb_q_values), unnested beside their positions and
// joined back: ten window sorts that carried every column took about 0.1 s
// at 10,000 groups, single-threaded. A group without a score (not judged)
// has no rank.
func rankedSQL(orderTail string) string {
	var lists, qs []string
	for _, test := range diagnoseTests {
		lists = append(lists, fmt.Sprintf("plumb_q_values(list(%[1]s_p_value ORDER BY plumb_row)) AS %[1]s", test))
		qs = append(qs, fmt.Sprintf("unnest(%[1]s) AS %[1]s_q_value", test))
	}
	return fmt.Sprintf(`, plumb_numbered AS MATERIALIZED (
    SELECT *, row_number() OVER () AS plumb_row FROM plumb_judged
), plumb_lists AS (
    SELECT count(*) AS plumb_count, %[1]s
    FROM plumb_numbered
), plumb_q AS (
    SELECT unnest(range(1, plumb_count + 1)) AS plumb_row, %[2]s
    FROM plumb_lists
)
SELECT * FROM (
    SELECT plumb_numbered.* EXCLUDE (plumb_row), plumb_q.* EXCLUDE (plumb_row),
           CASE WHEN score IS NOT NULL THEN rank() OVER (ORDER BY score DESC NULLS LAST) END AS rank
    FROM plumb_numbered JOIN plumb_q USING (plumb_row)
)
ORDER BY rank, %[3]s`, strings.Join(lists, ",\n           "), strings.Join(qs, ",\n       "), orderTail)
}

const diagnoseMacro = `
CREATE OR REPLACE TEMP MACRO diagnose(source, "by", "at", value, period := NULL, alpha := 0.05, fill := 'none',
                                      shard := NULL, shards := NULL) AS TABLE
    FROM query(plumb_diagnose_sql(source, "by", "at", value, period::BIGINT, alpha::DOUBLE, fill, shard::BIGINT, shards::BIGINT));
`
