package udf

import (
	"database/sql/driver"
	_ "embed"
	"fmt"
	"math"
	"slices"
	"sync/atomic"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/verdict"
)

// The maths: stats.Regularize and verdict.Stationarity (stats/gaps.go, stats/verdict/verdict*.go), stats.BenjaminiHochberg (stats/fdr.go); the SQL in diagnoseSQL, batches.go and series.go.

//go:embed sql/diagnose.sql
var diagnoseMacros string

// diagnoseFunctions provides the per-group work and the SQL of
//
//	diagnose(source, by := ..., at := ..., value := ..., period, alpha, fill, shard, shards)
//	    (the defaults in udf/sql/diagnose.sql, from package defaults)
//
// which returns one row per group: the group columns; n, first_at, last_at,
// gaps (time points missing from the group's usual step), missing (NULL
// values), status; the verdict of verdict.Stationarity with the tests behind
// it; the Ljung-Box p-value of the series after its recommended transform;
// Benjamini-Hochberg q-values across all groups for each test's p-value;
// and rank, 1 for the group furthest from stationary.
//
// With shard := k, shards := n it judges only the groups of shard k
// (combine_diagnoses.go) and returns their rows without q-values and rank, with shard
// and shards columns instead; combine_diagnoses ranks the union of the n
// parts.
func diagnoseFunctions(t *types) []*function {
	return []*function{{
		name:     "plumb_diagnose",
		parallel: true,
		reuse:    true, // the result is a STRUCT of numbers and text
		params:   []duckdb.TypeInfo{t.anyType(), t.bigint(), t.double(), t.varchar()},
		result:   diagnoseLayout.info(t),
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
func diagnoseGroup(at []int64, x []float64, order []int, opts verdict.StationarityOptions, fill stats.FillMethod) (any, error) {
	for i := 1; i < len(at); i++ {
		if at[i] == at[i-1] {
			d := diagnosed{
				verdict:   verdict.StationarityResult{Status: duplicateAt, BoxCoxLambda: math.NaN(), ShiftIndex: -1},
				duplicate: true,
			}
			return diagnoseLayout.record(&d), nil
		}
	}
	defer groupsDone.Add(1)
	reg, err := stats.Regularize(at, x, fill)
	if err != nil {
		return nil, err
	}
	if reg.TooSparse {
		v := verdict.UnjudgedVerdict(stats.StatusTooSparse)
		d := diagnosed{verdict: v, regular: reg, status: string(v.Status), shiftPoint: -1}
		return diagnoseLayout.record(&d), nil
	}
	v, err := verdict.Stationarity(reg.Values, opts)
	if err != nil {
		return nil, err
	}
	d := diagnosed{verdict: v, regular: reg, status: string(v.Status), shiftPoint: -1}
	failed := v.Status != stats.StatusOK && v.Status != stats.StatusSeasonUnknown
	if !failed {
		// The series after its recommended transform (the verdict's own,
		// applied to the series with its outliers set aside).
		if v.Differenced != nil {
			if lb, err := stats.LjungBox(v.Differenced, 0, 0); err == nil && lb.Status == stats.StatusOK {
				d.ljungBox = orNull(lb.PValue)
			}
		}
		if v.ShiftIndex >= 0 {
			d.shiftPoint = observationAt(at, reg, v.ShiftIndex, order)
		}
	}
	switch {
	case failed:
	case (reg.Gaps > 0 || reg.Missing > 0) && fill != stats.FillNone && fill != "":
		d.status = "gaps_filled"
	case reg.Gaps > 0 || reg.Irregular > 0:
		d.status = "gaps_ignored"
	}
	return diagnoseLayout.record(&d), nil
}

// diagnosed is one group's judgement as plumb_diagnose returns it.
type diagnosed struct {
	verdict verdict.StationarityResult
	regular stats.Regular
	// status is the verdict's, or gaps_filled or gaps_ignored.
	status string
	// ljungBox is the Ljung-Box p-value after the recipe (nil: none).
	ljungBox any
	// shiftPoint is where, in the list as aggregated, the first observation
	// after a level shift stands (-1: none); diagnoseSQL reads its time.
	shiftPoint int
	// duplicate: the group repeats a time, and nothing was judged.
	duplicate bool
}

// diagnoseLayout is plumb_diagnose's STRUCT, in the order of diagnose's
// columns (diagnoseFields): the verdict's fields (verdictLayout) with the
// group's own around them, then step and shift_point, which diagnoseSQL
// uses and does not show. A new column of diagnose's rows is one more
// entry here; sharded parts and combine_diagnoses carry it through.
var diagnoseLayout = func() *layout[diagnosed] {
	// fromVerdict is the verdict's column of that name; a group with a
	// repeated time has the verdict of nothing judged, without its
	// reason and seasonal strength.
	fromVerdict := func(name string) column[diagnosed] {
		c, ok := verdictLayout.column(name)
		if !ok {
			panic("udf: the verdict has no field " + name) // caught by every test that opens a database
		}
		return column[diagnosed]{name, c.kind, func(d *diagnosed) any {
			if d.duplicate && (name == "reason" || name == "seasonal_strength") {
				return nil
			}
			return c.get(&d.verdict)
		}}
	}
	// judged is v for a group whose times do not repeat, NULL otherwise.
	judged := func(f func(*diagnosed) any) func(*diagnosed) any {
		return func(d *diagnosed) any {
			if d.duplicate {
				return nil
			}
			return f(d)
		}
	}
	cols := []column[diagnosed]{
		varchar("status", func(d *diagnosed) any {
			if d.duplicate {
				return duplicateAt
			}
			return d.status
		}),
		fromVerdict("reason"),
		integer64("gaps", judged(func(d *diagnosed) any { return int64(d.regular.Gaps) })),
		integer64("missing", judged(func(d *diagnosed) any { return int64(d.regular.Missing) })),
		integer64("n_used", judged(func(d *diagnosed) any { return int64(len(d.regular.Values)) })),
	}
	for _, name := range []string{"mean_stable", "spread_stable", "seasonal", "stationary", "violations",
		"mean_cause", "shift_at", "shift_size", "trend_slope", "spread_cause", "seasonal_kind", "second_period",
		"zero_share", "demand_class", "outliers",
		"differences", "seasonal_differences", "box_cox_lambda", "period", "seasonal_strength",
		"cured", "left_violations", "over_differenced", "score",
		"adf_statistic", "adf_p_value", "adf_lags", "kpss_statistic", "kpss_p_value", "kpss_lags",
		"mean_p_value", "spread_p_value"} {
		cols = append(cols, fromVerdict(name))
	}
	cols = append(cols,
		num("ljung_box_p_value", func(d *diagnosed) any { return d.ljungBox }),
		integer64("step", judged(func(d *diagnosed) any { return int64(d.regular.Step) })),
		integer64("shift_point", judged(func(d *diagnosed) any {
			if d.shiftPoint >= 0 {
				return int64(d.shiftPoint)
			}
			return nil
		})),
	)
	return newLayout(cols...)
}()

// diagnoseHidden are the fields of plumb_diagnose's STRUCT that are not
// columns of diagnose.
var diagnoseHidden = map[string]bool{"step": true, "shift_point": true}

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
// first_at and last_at, in order (status first): diagnoseLayout's names but
// the hidden ones. shift_at is the exception among them: the query reads
// it from the group's points (diagnoseSQL).
var diagnoseFields = func() []string {
	var names []string
	for _, n := range diagnoseLayout.names {
		if !diagnoseHidden[n] {
			names = append(names, n)
		}
	}
	return names
}()

// diagnoseSQL judges every group a batch at a time (batchedCTEs), then
// ranks them (rankedSQL); with shards set it returns the groups of one shard
// with their raw p-values, for combine_diagnoses. A level shift's shift_at
// is the at value of the point plumb_diagnose names by its place in the
// aggregated list (shift_point), in the at column's own type; the verdict
// is computed in a subquery so that DuckDB calls plumb_diagnose once per
// group (TestDiagnoseShiftAt counts the calls).
func diagnoseSQL(q seriesQuery, period, alpha, fill string) string {
	by := q.byList("")
	perGroup := renderStage("judge_group", struct{ By, Period, Alpha, Fill string }{by, period, alpha, fill})
	picks := make([]string, len(diagnoseFields))
	for i, f := range diagnoseFields {
		picks[i] = fmt.Sprintf("plumb_d.%s AS %s", f, f)
		if f == "shift_at" {
			picks[i] = "plumb_shift_at AS shift_at"
		}
	}
	picks[0] = q.duplicateAtCheck("plumb_d.status") + " AS status"
	judged := renderStage("judged", struct {
		By    string
		Picks []string
	}{by, picks})
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
// joined back, which is cheaper than a window sort per test carrying every
// column (DEVELOPERS.md, "Performance notes"). A group without a score (not
// judged) has no rank.
func rankedSQL(orderTail string) string {
	return renderStage("rank.sql", struct {
		Tests     []string
		OrderTail string
	}{diagnoseTests, orderTail})
}
