package udf

import (
	"context"
	"database/sql"
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/stats/longtests"
)

func TestParseBytes(t *testing.T) {
	for _, test := range []struct {
		text string
		want float64
	}{
		// As current_setting('memory_limit') shows them in DuckDB 1.5.6.
		{"3.7 GiB", 3.7 * (1 << 30)},
		{"953.6 MiB", 953.6 * (1 << 20)},
		{"488.2 KiB", 488.2 * (1 << 10)},
		{"16383.9 PiB", 16383.9 * (1 << 50)}, // SET memory_limit = '-1'
		{"512 bytes", 512},
		{"4GB", 4e9},
		{" 100 MB ", 100e6},
	} {
		got, err := parseBytes(test.text)
		if err != nil || math.Abs(got-test.want) > 1e-9*test.want {
			t.Errorf("parseBytes(%q) = %v, %v; want %v", test.text, got, err, test.want)
		}
	}
	for _, bad := range []string{"", "lots", "3.7 GiBs", "-1 GiB"} {
		if _, err := parseBytes(bad); err == nil {
			t.Errorf("parseBytes(%q): no error", bad)
		}
	}
}

func TestBatchRows(t *testing.T) {
	for _, test := range []struct {
		budget batchBudget
		want   int64
	}{
		// (2e9 - 40 MiB) * 0.6 / 64: no groups, no chunks
		{batchBudget{limit: 2e9, threads: 2, perRow: gatherBytesPerRow}, 18356784},
		// 1,000,000 groups of 365 rows on 2 threads: chunks of 2 × 2048 × 365 × 24 bytes;
		// (2e9 - 40 MiB - 35,880,960) * 0.6 / 64 = 18020400
		{batchBudget{limit: 2e9, threads: 2, groups: 1e6, rows: 365e6, perRow: gatherBytesPerRow, chunkPerRow: 24}, 18020400},
		// 8e9 would allow 74606784 rows: the cap
		{batchBudget{limit: 8e9, threads: 2, perRow: gatherBytesPerRow}, batchRowsCap},
		// 10 groups of 100 rows: the chunks hold the 10 groups only, 2 × 10 × 100 × 48 bytes;
		// (100 MiB - 40 MiB - 96,000) * 0.6 / (64 + 4 * 24) = 235569
		{batchBudget{limit: 100 << 20, threads: 2, groups: 10, rows: 1000, perRow: rowBytes(4), chunkPerRow: 48}, 235569},
		// the reserve and the chunks leave less than a tenth: a tenth, 6.4 MiB * 0.6 / 64
		{batchBudget{limit: 64 << 20, threads: 2, groups: 1e4, rows: 1e7, perRow: gatherBytesPerRow, chunkPerRow: 48}, 62914},
		{batchBudget{limit: 1, threads: 1, perRow: gatherBytesPerRow}, 1}, // at least one row
		{batchBudget{limit: 1e20, threads: 1, perRow: 1}, batchRowsCap},   // at most the cap
	} {
		if got := test.budget.batchRows(); got != test.want {
			t.Errorf("%+v: %d rows, want %d", test.budget, got, test.want)
		}
	}
}

// writePanel writes a panel of groups (store, sku) of 150 to 549 daily
// values each to path, its rows in the given order: random walks, weekly
// patterns and a growing spread, a NULL value every 997 rows, and three
// groups with a NULL in their key. Every number is a hash of the group and
// the day, so it is the same on every run.
func writePanel(t *testing.T, db *sql.DB, path string, groups int, order string) int {
	t.Helper()
	exec(t, db, fmt.Sprintf(`COPY (
		SELECT CASE WHEN g = 5 THEN NULL ELSE 'store-' || (g %% 37) END AS store,
		       CASE WHEN g IN (7, 1500) THEN NULL ELSE (g // 37)::INTEGER END AS sku,
		       DATE '2024-01-01' + t::INTEGER AS day,
		       CASE WHEN (g * 31 + t) %% 997 = 0 THEN NULL
		            WHEN g %% 3 = 0 THEN 50 + sum((hash(g, t) %% 1000)::DOUBLE / 1000 - 0.5) OVER (PARTITION BY g ORDER BY t)
		            WHEN g %% 3 = 1 THEN 50 + 3 * sin(t * 0.8976) + (hash(g, t) %% 1000)::DOUBLE / 250
		            ELSE 50 + (hash(g, t) %% 1000)::DOUBLE / 100 * (1 + t / 100) END AS units
		FROM range(%d) AS gs(g), range(550) AS ts(t)
		WHERE t < 150 + g %% 400
		ORDER BY %s
	) TO '%s' (FORMAT parquet)`, groups, order, path))
	var rows int
	if err := db.QueryRow(fmt.Sprintf("SELECT count(*) FROM '%s'", path)).Scan(&rows); err != nil {
		t.Fatal(err)
	}
	return rows
}

// textRows runs q and returns its rows in the order they come, each
// rendered by DuckDB as text (a DOUBLE as its shortest exact decimal), so
// that two equal texts are two equal rows.
func textRows(t *testing.T, db *sql.DB, q string) []string {
	t.Helper()
	rows, err := db.Query("SELECT CAST(COLUMNS(*) AS VARCHAR) FROM (" + q + ")")
	if err != nil {
		t.Fatalf("%s: %v", q, err)
	}
	defer rows.Close()
	cols, err := rows.Columns()
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for rows.Next() {
		cells := make([]sql.NullString, len(cols))
		ptrs := make([]any, len(cols))
		for i := range cells {
			ptrs[i] = &cells[i]
		}
		if err := rows.Scan(ptrs...); err != nil {
			t.Fatal(err)
		}
		parts := make([]string, len(cells))
		for i, c := range cells {
			parts[i] = "NULL"
			if c.Valid {
				parts[i] = c.String
			}
		}
		out = append(out, strings.Join(parts, " | "))
	}
	if err := rows.Err(); err != nil {
		t.Fatalf("%s: %v", q, err)
	}
	return out
}

// sameRows reports the first difference between two row lists.
func sameRows(t *testing.T, what string, got, want []string) {
	t.Helper()
	if len(got) != len(want) {
		t.Errorf("%s: %d rows, want %d", what, len(got), len(want))
		return
	}
	for i := range got {
		if got[i] != want[i] {
			t.Errorf("%s: row %d of %d differs:\n got  %s\n want %s", what, i+1, len(got), got[i], want[i])
			return
		}
	}
}

// batchCount is a query for the number of batches a table function cuts a
// source (a FROM item) into: diagnose when points is set, the functions
// that return rows (rowBytes(lists)) otherwise.
func batchCount(source string, by []string, at, value string, points bool, lists int) string {
	q := seriesQuery{function: "diagnose", source: source, by: by, at: at, value: value, points: points}
	perRow := gatherBytesPerRow
	if !points {
		perRow = rowBytes(lists)
	}
	return "WITH RECURSIVE " + q.planCTEs(perRow) + " SELECT count(DISTINCT plumb_batch) FROM plumb_plan"
}

// rowsDigest runs q and returns its number of rows and the sum of the
// hashes of its rows (DuckDB's hash of the row as a STRUCT, which hashes a
// DOUBLE by its bits): two results with the same rows in any order have the
// same digest, and a differing value changes it.
func rowsDigest(t *testing.T, db *sql.DB, q string) string {
	t.Helper()
	return queryString(t, db, "SELECT count(*) || ' rows, digest ' || sum(hash(plumb_r)::HUGEINT) FROM ("+q+") AS plumb_r")
}

// TestBatchesEqualUnlimited: under a memory_limit small enough to cut the
// groups into several batches, diagnose returns the same rows as without
// a limit, row for row in its own order (q-values and rank included), and
// every other table function the same set of rows. 8,000 groups, so that
// DuckDB's smallest workable limit (100MB) still needs several batches: a
// long test. TestSmallBatchesEqualOneBatch checks the same on 600 groups with
// the batch size set by plumb_batch_rows.
func TestBatchesEqualUnlimited(t *testing.T) {
	longtests.Require(t, "8,000 groups under memory_limit = '100MB', about 30 s")
	limited, err := Open(context.Background(), Options{Settings: map[string]string{"memory_limit": "100MB", "threads": "2"}})
	if err != nil {
		t.Fatal(err)
	}
	defer limited.Close()
	limited.SetMaxOpenConns(1)
	sameInBatches(t, limited, 8000)
}

// TestSmallBatchesEqualOneBatch: TestBatchesEqualUnlimited's checks on 600
// groups cut into batches of at most 25,000 rows by plumb_batch_rows.
func TestSmallBatchesEqualOneBatch(t *testing.T) {
	limited := openTest(t)
	limited.SetMaxOpenConns(1)
	exec(t, limited, "SET VARIABLE plumb_batch_rows = 25000")
	sameInBatches(t, limited, 600)
}

// sameInBatches writes a panel of groups in two layouts and
// requires every table function to return on limited, which cuts the
// groups into several batches, what one batch returns.
func sameInBatches(t *testing.T, limited *sql.DB, groups int) {
	t.Helper()
	dir := t.TempDir()
	free := openTest(t)
	// shuffled: rows in no useful order, so a batch cannot skip any part
	// of the file; sorted: rows in group order, so a batch reads only its
	// own row groups. Each layout has the same rows.
	shuffled := filepath.Join(dir, "shuffled.parquet")
	rows := writePanel(t, free, shuffled, groups, "hash(g), t")
	sorted := filepath.Join(dir, "sorted.parquet")
	writePanel(t, free, sorted, groups, "store, sku, day")
	recipes := filepath.Join(dir, "recipes.parquet")
	exec(t, free, fmt.Sprintf(`COPY (FROM stationarize_recipes('%s', by := ['store', 'sku'], at := 'day', value := 'units')) TO '%s'`, sorted, recipes))
	stationary := filepath.Join(dir, "stationary.parquet")
	exec(t, free, fmt.Sprintf(`COPY (SELECT store, sku, day, stationary_value AS units
		FROM stationarize('%s', by := ['store', 'sku'], at := 'day', value := 'units') ORDER BY store, sku, day) TO '%s'`, sorted, stationary))

	by := []string{"store", "sku"}
	batches := queryString(t, limited, batchCount("'"+shuffled+"'", by, "day", "units", true, 0))
	rowBatches := queryString(t, limited, batchCount("'"+sorted+"'", by, "day", "units", false, 3))
	t.Logf("%d rows in %d groups; diagnose takes %s batches, differenced %s", rows, groups, batches, rowBatches)
	if n, _ := strconv.Atoi(batches); n < 3 {
		t.Fatalf("the panel fits in %s batches; the test needs several", batches)
	}

	args := `by := ['store', 'sku'], at := 'day', value := 'units'`
	for _, file := range []string{shuffled, sorted} {
		q := fmt.Sprintf(`FROM diagnose('%s', %s)`, file, args)
		want := textRows(t, free, q)
		sameRows(t, "diagnose "+filepath.Base(file), textRows(t, limited, q), want)
		if len(want) != groups {
			t.Errorf("diagnose: %d groups, want %d", len(want), groups)
		}
	}
	for _, test := range []struct{ name, query string }{
		{"diagnose with period and fill", fmt.Sprintf(`FROM diagnose('%s', %s, period := 7, fill := 'linear')`, sorted, args)},
		{"differenced", fmt.Sprintf(`FROM differenced('%s', %s, lag := 7)`, sorted, args)},
		{"rolling_dispersion", fmt.Sprintf(`FROM rolling_dispersion('%s', %s)`, sorted, args)},
		{"stationarize", fmt.Sprintf(`FROM stationarize('%s', %s)`, sorted, args)},
		{"stationarize_recipes", fmt.Sprintf(`FROM stationarize_recipes('%s', %s)`, sorted, args)},
		{"restore", fmt.Sprintf(`FROM restore('%s', '%s', %s, anchor := 'first')`, stationary, recipes, args)},
	} {
		want := rowsDigest(t, free, test.query)
		if got := rowsDigest(t, limited, test.query); got != want {
			t.Errorf("%s in batches: %s; in one: %s", test.name, got, want)
		}
		if strings.HasPrefix(want, "0 rows") {
			t.Errorf("%s: no rows", test.name)
		}
	}
}

// TestUnsteadySourceFails: a source that gives other rows on each read (a
// random sample) fails with a message that says why, instead of mixing the
// rows of two reads.
func TestUnsteadySourceFails(t *testing.T) {
	db := openTest(t)
	exec(t, db, `CREATE TABLE s AS SELECT 'g' || (i % 8) AS g, i // 8 AS t, sin(i) + i % 5 AS v FROM range(8000) r(i)`)
	for _, function := range []string{"diagnose", "differenced", "stationarize"} {
		q := fmt.Sprintf(`FROM %s('(SELECT * FROM s USING SAMPLE 50%% (bernoulli))', by := 'g', at := 't', value := 'v')`, function)
		if msg := queryError(t, db, q); !strings.Contains(msg, "reads its source more than once") {
			t.Errorf("%s: %s", function, msg)
		}
	}
}

// TestBatchRowsVariable: SET VARIABLE plumb_batch_rows chooses the batch
// size; the rows stay the same.
func TestBatchRowsVariable(t *testing.T) {
	db := openTest(t)
	exec(t, db, `CREATE TABLE s AS SELECT 'g' || (i % 40) AS g, i // 40 AS t, sin(i) + (i % 7) * (i // 40) / 100 AS v FROM range(40000) r(i)`)
	q := `FROM diagnose('s', by := 'g', at := 't', value := 'v')`
	want := textRows(t, db, q)
	for _, test := range []struct {
		rows    string
		batches string
	}{
		{"NULL", "1"},  // unset: 40,000 rows fit one batch under DuckDB's default memory_limit
		{"1000", "40"}, // the 40 groups have 1,000 rows each
		{"5000", "8"},
		{"0", "40"}, // at least one row a batch: a group a batch
	} {
		exec(t, db, "SET VARIABLE plumb_batch_rows = "+test.rows)
		if got := queryString(t, db, batchCount(`"s"`, []string{"g"}, "t", "v", true, 0)); got != test.batches {
			t.Errorf("plumb_batch_rows = %s: %s batches, want %s", test.rows, got, test.batches)
		}
		sameRows(t, "plumb_batch_rows = "+test.rows, textRows(t, db, q), want)
	}
}
