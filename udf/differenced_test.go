package udf

import (
	"fmt"
	"strings"
	"testing"
)

func TestDifferencedMatchesWindowLag(t *testing.T) {
	db := openTest(t)
	dir := t.TempDir()
	exec(t, db, `CREATE TABLE sales AS
		SELECT 'store' || (i % 3) AS store, 'sku-' || (i % 2) AS sku,
		       DATE '2025-01-01' + (i // 6)::INTEGER AS day,
		       (100 + (hash(i) % 50))::INTEGER AS units
		FROM range(600) r(i)`)
	exec(t, db, fmt.Sprintf(`COPY (FROM sales WHERE day < DATE '2025-02-10' ORDER BY hash(units, day)) TO '%s/a.parquet'`, dir))
	exec(t, db, fmt.Sprintf(`COPY (FROM sales WHERE day >= DATE '2025-02-10' ORDER BY hash(units, day)) TO '%s/b.parquet'`, dir))
	for _, test := range []struct {
		lag, times int
		reference  string // the same quantity with window functions
	}{
		{1, 1, `units - lag(units, 1) OVER w`},
		{7, 1, `units - lag(units, 7) OVER w`},
		{1, 2, `units - 2 * lag(units, 1) OVER w + lag(units, 2) OVER w`},
		{3, 2, `units - 2 * lag(units, 3) OVER w + lag(units, 6) OVER w`},
	} {
		q := fmt.Sprintf(`
			WITH ours AS (
				FROM differenced('%[1]s/*.parquet', by := ['store', 'sku'], at := 'day', value := 'units', lag := %[2]d, times := %[3]d)
			), theirs AS (
				SELECT store, sku, day, units, (%[4]s)::DOUBLE AS want
				FROM read_parquet('%[1]s/*.parquet')
				WINDOW w AS (PARTITION BY store, sku ORDER BY day)
			)
			SELECT count(*) FILTER (WHERE o.differenced_value IS NOT DISTINCT FROM t.want AND o.units = t.units),
			       count(*), (SELECT count(*) FROM ours), count(o.differenced_value)
			FROM ours o FULL JOIN theirs t USING (store, sku, day)`, dir, test.lag, test.times, test.reference)
		var same, joined, ours, nonNull int
		if err := db.QueryRow(q).Scan(&same, &joined, &ours, &nonNull); err != nil {
			t.Fatalf("lag %d, times %d: %v", test.lag, test.times, err)
		}
		if same != 600 || joined != 600 || ours != 600 {
			t.Errorf("lag %d, times %d: %d of %d rows equal the window query (ours has %d rows), want 600 of 600",
				test.lag, test.times, same, joined, ours)
		}
		// Each of the 6 groups loses lag·times leading values to NULL.
		if want := 600 - 6*test.lag*test.times; nonNull != want {
			t.Errorf("lag %d, times %d: %d non-NULL differences, want %d", test.lag, test.times, nonNull, want)
		}
	}
}

func TestDifferencedSources(t *testing.T) {
	db := openTest(t)
	dir := t.TempDir()
	exec(t, db, `CREATE TEMP TABLE tmp_readings AS SELECT 'a' AS sensor, i AS t, i * i AS v FROM range(5) r(i)`)
	exec(t, db, `CREATE TABLE readings AS FROM tmp_readings`)
	exec(t, db, `CREATE VIEW readings_view AS FROM readings`)
	exec(t, db, fmt.Sprintf(`COPY readings TO '%s/r.csv'`, dir))
	for _, source := range []string{
		"tmp_readings", "readings", "main.readings", "readings_view", `"readings"`,
		dir + "/r.csv", "(SELECT * FROM readings WHERE t >= 0)",
	} {
		q := fmt.Sprintf(`SELECT list(differenced_value ORDER BY t) FROM differenced(%s, by := 'sensor', at := 't', value := 'v')`,
			"'"+strings.ReplaceAll(source, "'", "''")+"'")
		if got := queryString(t, db, q); got != "[NULL, 1.0, 3.0, 5.0, 7.0]" {
			t.Errorf("source %s: %s", source, got)
		}
	}
	// Inside CREATE TABLE AS and COPY.
	exec(t, db, `CREATE TABLE d AS FROM differenced('readings', by := 'sensor', at := 't', value := 'v')`)
	exec(t, db, fmt.Sprintf(`COPY (FROM differenced('readings', by := 'sensor', at := 't', value := 'v')) TO '%s/d.parquet'`, dir))
	if got := queryString(t, db, fmt.Sprintf(`SELECT (SELECT sum(differenced_value) FROM d) || ' ' || (SELECT sum(differenced_value) FROM '%s/d.parquet')`, dir)); got != "16.0 16.0" {
		t.Errorf("CTAS and COPY sums: %s, want 16.0 16.0", got)
	}
}

func TestDifferencedBadInput(t *testing.T) {
	db := openTest(t)
	exec(t, db, `CREATE TABLE s AS SELECT i % 2 AS g, i // 2 AS t, i::DOUBLE AS v, 'x' || i AS label,
		DATE '2025-01-01' + i::INTEGER AS d FROM range(10) r(i)`)
	exec(t, db, `CREATE TABLE dup AS SELECT 'north' AS region, 1 AS t, 1.0 AS v UNION ALL SELECT 'north', 1, 2.0 UNION ALL SELECT 'south', 1, 3.0`)
	exec(t, db, `CREATE TABLE nullat AS SELECT 'a' AS g, NULL::INTEGER AS t, 1.0 AS v UNION ALL SELECT 'a', 2, 2.0`)
	for _, test := range []struct {
		name, query string
		want        []string // every piece must be in the message
	}{
		{"missing table", `FROM differenced('no_such_table', by := 'g', at := 't', value := 'v')`,
			[]string{"no_such_table", "does not exist"}},
		{"missing file", `FROM differenced('/nonexistent/dir/*.parquet', by := 'g', at := 't', value := 'v')`,
			[]string{"No files found", "/nonexistent/dir/*.parquet"}},
		{"missing column lists the columns there are", `FROM differenced('s', by := 'g', at := 't', value := 'units')`,
			[]string{`differenced: the value column "units" is not in s; its columns are: g, t, v, label, d`}},
		{"missing by column", `FROM differenced('s', by := ['g', 'shop'], at := 't', value := 'v')`,
			[]string{`differenced: the by column "shop" is not in s; its columns are: g, t, v, label, d`}},
		{"non-numeric text", `FROM differenced('s', by := 'g', at := 't', value := 'label')`,
			[]string{`differenced: the value column "label" of s is VARCHAR, not a number`}},
		{"non-numeric date", `FROM differenced('s', by := 'g', at := 't', value := 'd')`,
			[]string{`differenced: the value column "d" of s is DATE, not a number`}},
		{"lag zero", `FROM differenced('s', by := 'g', at := 't', value := 'v', lag := 0)`,
			[]string{"lag and times must be at least 1"}},
		{"times negative", `FROM differenced('s', by := 'g', at := 't', value := 'v', times := -2)`,
			[]string{"lag and times must be at least 1"}},
		{"duplicate at names the group", `FROM differenced('dup', by := 'region', at := 't', value := 'v')`,
			[]string{`column "t" repeats a value in group region=north`}},
		{"NULL at", `FROM differenced('nullat', by := 'g', at := 't', value := 'v')`,
			[]string{`column "t" is NULL in 1 rows of group g=a`}},
		{"unparseable source", `FROM differenced('sales; DROP TABLE s', by := 'g', at := 't', value := 'v')`,
			[]string{"is not a table or view name"}},
		{"empty by", `FROM differenced('s', by := [], at := 't', value := 'v')`,
			[]string{"by names no column"}},
	} {
		msg := queryError(t, db, test.query)
		for _, w := range test.want {
			if !strings.Contains(msg, w) {
				t.Errorf("%s: error %q does not say %q", test.name, msg, w)
			}
		}
	}
	if got := queryString(t, db, "SELECT count(*) FROM s"); got != "10" {
		t.Errorf("table s has %s rows after the bad queries, want 10", got)
	}
}

func TestDifferencedNullValuesAndEdges(t *testing.T) {
	db := openTest(t)
	exec(t, db, `CREATE TABLE n AS SELECT * FROM (VALUES ('a', 1, 1.0), ('a', 2, NULL), ('a', 3, 4.0), ('a', 4, 8.0), ('b', 1, 5.0)) v(g, t, v)`)
	// Documented: a NULL value makes the differences that use it NULL; a
	// group shorter than lag·times keeps its rows with NULL differences.
	if got := queryString(t, db, `SELECT list(differenced_value ORDER BY t) FROM differenced('n', by := 'g', at := 't', value := 'v') WHERE g = 'a'`); got != "[NULL, NULL, NULL, 4.0]" {
		t.Errorf("group with a NULL: %s", got)
	}
	if got := queryString(t, db, `SELECT list(differenced_value) FROM differenced('n', by := 'g', at := 't', value := 'v', lag := 2) WHERE g = 'b'`); got != "[NULL]" {
		t.Errorf("one-row group: %s", got)
	}
	// A column name with quotes is an identifier, never SQL.
	exec(t, db, `CREATE TABLE odd AS SELECT 'k' AS "we""ird", 1 AS "t; DROP TABLE n; --", 2.0 AS v UNION ALL SELECT 'k', 2, 5.0`)
	if got := queryString(t, db, `SELECT list(differenced_value) FROM differenced('odd', by := 'we"ird', at := 't; DROP TABLE n; --', value := 'v')`); got != "[NULL, 3.0]" {
		t.Errorf("odd names: %s", got)
	}
	if got := queryString(t, db, "SELECT count(*) FROM n"); got != "5" {
		t.Errorf("table n: %s rows", got)
	}
}
