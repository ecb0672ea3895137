package demo

import (
	"context"
	"database/sql"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/stats"
)

// TestDiagnoseAgreesWithScalarFunctions: every column diagnose reports for a
// demo group equals what the scalar stationarity function gives on
// list(value ORDER BY at) for that group.
func TestDiagnoseAgreesWithScalarFunctions(t *testing.T) {
	db := openDemo(t, t.TempDir())
	for _, test := range []struct{ table, by, at, value, period string }{
		{"shops", "shop, product", "day", "units", "7"},
		{"containers", "container", "hour", "temperature", "24"},
		{"shops", "shop, product", "day", "units", "NULL"},
	} {
		byList := "['" + strings.ReplaceAll(test.by, ", ", "', '") + "']"
		q := fmt.Sprintf(`
			WITH d AS (FROM diagnose('%[1]s', by := %[2]s, at := '%[3]s', value := '%[4]s', period := %[5]s)),
			s AS (SELECT %[6]s, stationarity(list(%[4]s ORDER BY %[3]s), period := %[5]s) AS v, list(%[3]s ORDER BY %[3]s) AS ats
			      FROM %[1]s GROUP BY %[6]s)
			SELECT count(*),
			       count(*) FILTER (WHERE d.score IS NOT DISTINCT FROM s.v.score
			           AND d.violations IS NOT DISTINCT FROM s.v.violations
			           AND d.differences IS NOT DISTINCT FROM s.v.differences
			           AND d.seasonal_differences IS NOT DISTINCT FROM s.v.seasonal_differences
			           AND d.box_cox_lambda IS NOT DISTINCT FROM s.v.box_cox_lambda
			           AND d.adf_statistic IS NOT DISTINCT FROM s.v.adf_statistic
			           AND d.adf_p_value IS NOT DISTINCT FROM s.v.adf_p_value
			           AND d.kpss_statistic IS NOT DISTINCT FROM s.v.kpss_statistic
			           AND d.mean_p_value IS NOT DISTINCT FROM s.v.mean_p_value
			           AND d.spread_p_value IS NOT DISTINCT FROM s.v.spread_p_value
			           AND d.period IS NOT DISTINCT FROM s.v.period
			           AND d.seasonal_strength IS NOT DISTINCT FROM s.v.seasonal_strength
			           AND d.stationary IS NOT DISTINCT FROM s.v.stationary
			           AND d.mean_cause IS NOT DISTINCT FROM s.v.mean_cause
			           AND d.shift_size IS NOT DISTINCT FROM s.v.shift_size
			           AND d.trend_slope IS NOT DISTINCT FROM s.v.trend_slope
			           AND d.spread_cause IS NOT DISTINCT FROM s.v.spread_cause
			           AND d.seasonal_kind IS NOT DISTINCT FROM s.v.seasonal_kind
			           AND d.second_period IS NOT DISTINCT FROM s.v.second_period
			           AND d.zero_share IS NOT DISTINCT FROM s.v.zero_share
			           AND d.demand_class IS NOT DISTINCT FROM s.v.demand_class
			           AND d.outliers IS NOT DISTINCT FROM s.v.outliers
			           AND d.cured IS NOT DISTINCT FROM s.v.cured
			           AND d.left_violations IS NOT DISTINCT FROM s.v.left_violations
			           AND d.over_differenced IS NOT DISTINCT FROM s.v.over_differenced
			           AND d.reason IS NOT DISTINCT FROM s.v.reason
			           -- shift_at: the at value in diagnose, the 1-based position in stationarity
			           AND d.shift_at IS NOT DISTINCT FROM s.ats[s.v.shift_at])
			       , count(*) FILTER (WHERE d.shift_at IS NOT NULL)
			FROM d JOIN s USING (%[6]s)`, test.table, byList, test.at, test.value, test.period, test.by)
		var n, same, shifted int
		if err := db.QueryRow(q).Scan(&n, &same, &shifted); err != nil {
			t.Fatalf("%s: %v", test.table, err)
		}
		if n == 0 || same != n || shifted == 0 {
			t.Errorf("%s period %s: %d of %d groups agree (%d with a level shift)", test.table, test.period, same, n, shifted)
		}
	}
}

// TestDiagnoseQValues: each q-value column equals stats.BenjaminiHochberg
// applied to the p-value column it adjusts, computed here in Go.
func TestDiagnoseQValues(t *testing.T) {
	db := openDemo(t, t.TempDir())
	for _, test := range []string{"adf", "kpss", "mean", "spread", "ljung_box"} {
		rows, err := db.Query(fmt.Sprintf(`SELECT %[1]s_p_value, %[1]s_q_value FROM diagnose('shops', by := ['shop', 'product'], at := 'day', value := 'units')`, test))
		if err != nil {
			t.Fatal(err)
		}
		var p, q []float64
		for rows.Next() {
			var pv, qv sql.NullFloat64
			if err := rows.Scan(&pv, &qv); err != nil {
				t.Fatal(err)
			}
			p = append(p, nullToNaN(pv))
			q = append(q, nullToNaN(qv))
		}
		rows.Close()
		want := stats.BenjaminiHochberg(p)
		for i := range q {
			if math.IsNaN(want[i]) != math.IsNaN(q[i]) || math.Abs(want[i]-q[i]) > 1e-12 {
				t.Errorf("%s row %d: q %v, want %v (p %v)", test, i, q[i], want[i], p[i])
			}
		}
	}
}

func nullToNaN(v sql.NullFloat64) float64 {
	if !v.Valid {
		return math.NaN()
	}
	return v.Float64
}

// TestDiagnoseBadInput covers the list, each with a clear error or a
// per-group status, and checks that nothing stored is touched.
func TestDiagnoseBadInput(t *testing.T) {
	db := openDemo(t, t.TempDir())
	conn, err := db.Conn(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	run := func(q string) error {
		rows, err := conn.QueryContext(context.Background(), q)
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
		}
		return rows.Err()
	}
	for _, test := range []struct{ name, query, want string }{
		{"missing source", `FROM diagnose('no_such_table', by := 'shop', at := 'day', value := 'units')`, "does not exist"},
		{"missing by", `FROM diagnose('shops', by := 'store', at := 'day', value := 'units')`, `diagnose: the by column "store" is not in shops; its columns are: shop, product, day, units`},
		{"missing at", `FROM diagnose('shops', by := 'shop', at := 'date', value := 'units')`, `diagnose: the at column "date" is not in shops; its columns are: shop, product, day, units`},
		{"missing value", `FROM diagnose('shops', by := 'shop', at := 'day', value := 'sales')`, `diagnose: the value column "sales" is not in shops; its columns are: shop, product, day, units`},
		{"non-numeric value", `FROM diagnose('shops', by := ['shop', 'product'], at := 'day', value := 'product')`, `diagnose: the value column "product" of shops is VARCHAR, not a number`},
		{"duplicate at", `FROM diagnose('shops', by := 'shop', at := 'day', value := 'units')`, "repeats a value in group shop="},
		{"bad fill", `FROM diagnose('shops', by := ['shop', 'product'], at := 'day', value := 'units', fill := 'spline')`, `unknown fill method "spline"`},
		{"bad alpha", `FROM diagnose('shops', by := ['shop', 'product'], at := 'day', value := 'units', alpha := 0)`, "alpha must be between 0 and 1"},
		{"text at", `FROM diagnose('(SELECT ''a'' AS g, ''x'' || i AS t, i::DOUBLE AS v FROM range(30) r(i))', by := 'g', at := 't', value := 'v')`, "must be a DATE, a TIMESTAMP or an integer"},
	} {
		err := run(test.query)
		if err == nil || !strings.Contains(err.Error(), test.want) {
			t.Errorf("%s: error %v, want one saying %q", test.name, err, test.want)
		}
	}
	for _, test := range []struct{ name, setup, query, want string }{
		{"empty source", `CREATE TEMP TABLE empty AS FROM shops WHERE false`,
			`SELECT count(*)::VARCHAR FROM diagnose('empty', by := 'shop', at := 'day', value := 'units')`, "0"},
		{"one-row groups", `CREATE TEMP TABLE one AS SELECT 'a' AS g, 1 AS t, 2.0 AS v UNION ALL SELECT 'b', 1, 3.0`,
			`SELECT string_agg(status, ',' ORDER BY g) FROM diagnose('one', by := 'g', at := 't', value := 'v')`, "too_short,too_short"},
		{"NULL values", `CREATE TEMP TABLE nulls AS SELECT 'a' AS g, i AS t, CASE WHEN i = 50 THEN NULL ELSE sin(i) + i % 3 END AS v FROM range(200) r(i)`,
			`SELECT status || ' ' || missing FROM diagnose('nulls', by := 'g', at := 't', value := 'v')`, "non_finite 1"},
		{"NULL values filled", ``,
			`SELECT status || ' ' || missing FROM diagnose('nulls', by := 'g', at := 't', value := 'v', fill := 'linear')`, "gaps_filled 1"},
		{"gaps found", `CREATE TEMP TABLE gappy AS SELECT 'a' AS g, DATE '2025-01-01' + i::INTEGER AS t, sin(i) + i % 5 AS v FROM range(300) r(i) WHERE i NOT IN (10, 11, 200)`,
			`SELECT status || ' ' || gaps || ' ' || n_used FROM diagnose('gappy', by := 'g', at := 't', value := 'v')`, "gaps_ignored 3 297"},
		{"gaps filled", ``,
			`SELECT status || ' ' || gaps || ' ' || n_used FROM diagnose('gappy', by := 'g', at := 't', value := 'v', fill := 'previous')`, "gaps_filled 3 300"},
		{"injection-looking column", `CREATE TEMP TABLE odd AS SELECT 'k' AS "g""; DROP TABLE shops; --", i AS t, sin(i) + i % 4 AS v FROM range(100) r(i)`,
			`SELECT status FROM diagnose('odd', by := 'g"; DROP TABLE shops; --', at := 't', value := 'v')`, "ok"},
	} {
		if test.setup != "" {
			if err := run(test.setup); err != nil {
				t.Fatalf("%s: %v", test.name, err)
			}
		}
		var got sql.NullString
		if err := conn.QueryRowContext(context.Background(), test.query).Scan(&got); err != nil {
			t.Errorf("%s: %v", test.name, err)
			continue
		}
		if got.String != test.want {
			t.Errorf("%s: %q, want %q", test.name, got.String, test.want)
		}
	}
	var n int
	if err := conn.QueryRowContext(context.Background(), "SELECT count(*) FROM shops").Scan(&n); err != nil || n != 96*730 {
		t.Errorf("shops has %d rows after the bad queries (%v), want %d", n, err, 96*730)
	}
}
