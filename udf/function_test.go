package udf

import (
	"database/sql"
	"database/sql/driver"
	"fmt"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/udf/internal/vectors"
)

// TestChunkAccessLayout fails when an upgrade of duckdb-go moves the
// fields package vectors reads, so that the fallback never goes unnoticed.
func TestChunkAccessLayout(t *testing.T) {
	if !vectors.Available() {
		t.Fatal("duckdb-go's DataChunk or ChunkIteratorState changed: list arguments are boxed again (see udf/internal/vectors)")
	}
	if !vectors.ResultsAvailable() {
		t.Fatal("duckdb-go's Vector changed: list results are boxed again (see udf/internal/vectors)")
	}
}

// dump renders every row of q, one string per row.
func dump(t *testing.T, db *sql.DB, q string) []string {
	t.Helper()
	rows, err := db.Query(q)
	if err != nil {
		t.Fatalf("%s: %v", q, err)
	}
	defer rows.Close()
	cols, _ := rows.Columns()
	var out []string
	for rows.Next() {
		vals := make([]any, len(cols))
		ptrs := make([]any, len(cols))
		for i := range vals {
			ptrs[i] = &vals[i]
		}
		if err := rows.Scan(ptrs...); err != nil {
			t.Fatal(err)
		}
		out = append(out, fmt.Sprint(vals...))
	}
	if err := rows.Err(); err != nil {
		t.Fatalf("%s: %v", q, err)
	}
	return out
}

// TestDirectReadingMatchesIterator runs the same queries with list
// arguments read from DuckDB's vectors (executeDirect) and through
// duckdb-go's boxed iterator, and requires identical results: for every
// kind of at column, values with NULLs, rows stored out of time order,
// groups spread over several chunks, a literal list that DuckDB passes as a
// constant vector, and list results with NULL elements, NULL lists and
// empty lists.
func TestDirectReadingMatchesIterator(t *testing.T) {
	db := openTest(t)
	exec(t, db, `CREATE TEMP TABLE obs AS
		SELECT g, i::INTEGER AS i, i::SMALLINT AS si,
		       DATE '2024-01-01' + i::INTEGER AS d,
		       TIMESTAMP '2024-01-01' + INTERVAL 1 HOUR * i AS ts,
		       (TIMESTAMP '2024-01-01' + INTERVAL 1 HOUR * i)::TIMESTAMP_NS AS tns,
		       (TIMESTAMP '2024-01-01' + INTERVAL 1 HOUR * i)::TIMESTAMP_S AS tsec,
		       CASE WHEN (g + i) % 37 = 0 AND g % 4 = 0 THEN NULL
		            WHEN g % 2 = 0 THEN sin(i * 0.9) * 3 + hash(g, i) % 100 / 50.0
		            ELSE (hash(g, i) % 100) / 25.0 + i * 0.01 * (g % 5) END AS v
		FROM range(2500) AS gs(g), range(60) AS r(i)
		ORDER BY hash(g * 61 + i)`)
	queries := []string{
		`SELECT * FROM diagnose('obs', by := 'g', at := 'd', value := 'v') ORDER BY g`,
		`SELECT * FROM diagnose('obs', by := 'g', at := 'ts', value := 'v', fill := 'linear') ORDER BY g`,
		`SELECT * FROM diagnose('obs', by := 'g', at := 'tns', value := 'v') ORDER BY g`,
		`SELECT * FROM diagnose('obs', by := 'g', at := 'tsec', value := 'v', period := 7) ORDER BY g`,
		`SELECT * FROM diagnose('obs', by := 'g', at := 'i', value := 'v') ORDER BY g`,
		`SELECT * FROM diagnose('obs', by := 'g', at := 'si', value := 'v') ORDER BY g`,
		`SELECT g, unit_root(list(v ORDER BY i)), stability(list(v ORDER BY i)), seasonality(list(v ORDER BY i)),
		        stationarity(list(v ORDER BY i)), white_noise(list(v ORDER BY i)) FROM obs GROUP BY g ORDER BY g`,
		`SELECT difference([1, 4, 9, 16]), unit_root([1, 3, 2, 5, 4, 6, 5, 8, 7, 9, 8, 11, 10, 12]) FROM range(3000)`,
		// List results, written straight into DuckDB's vectors on the direct path.
		`SELECT g, difference(list(v ORDER BY i)), difference(list(v ORDER BY i), lag := 7, times := 2),
		        undifference(difference(list(v ORDER BY i)), [1.5])
		 FROM obs GROUP BY g ORDER BY g`,
		`SELECT g, box_cox(list(v ORDER BY i), 0.5), inverse_box_cox(list(v ORDER BY i), 0.5) FROM obs GROUP BY g ORDER BY g`,
		`SELECT i, difference(CASE WHEN i % 3 = 0 THEN NULL WHEN i % 3 = 1 THEN []::DOUBLE[] ELSE [i, i * 2, NULL, i * 4] END)
		 FROM range(3000) r(i) ORDER BY i`,
		// STRUCT results holding lists, text and numbers.
		`SELECT * FROM stationarize('obs', by := 'g', at := 'd', value := 'v') ORDER BY g, d`,
		`SELECT * FROM stationarize_recipes('obs', by := 'g', at := 'd', value := 'v') ORDER BY g`,
		`SELECT * FROM rolling_dispersion('obs', by := 'g', at := 'd', value := 'v', width := 5) ORDER BY g, d`,
	}
	for _, q := range queries {
		forceIterator = false
		direct := dump(t, db, q)
		forceIterator = true
		boxed := dump(t, db, q)
		forceIterator = false
		if len(direct) != len(boxed) || len(direct) == 0 {
			t.Fatalf("%s: %d rows read directly, %d through the iterator", q, len(direct), len(boxed))
		}
		for i := range direct {
			if direct[i] != boxed[i] {
				t.Fatalf("%s: row %d differs:\ndirect   %s\niterator %s", q, i, direct[i], boxed[i])
			}
		}
	}
}

// TestDirectReadingNullTime: a NULL time inside a list of points is an
// error on both paths, with the same message.
func TestDirectReadingNullTime(t *testing.T) {
	db := openTest(t)
	q := `SELECT plumb_diagnose([{'t': 1, 'v': 1.0}, {'t': NULL, 'v': 2.0}], NULL, 0.05, 'none')`
	for _, force := range []bool{false, true} {
		forceIterator = force
		msg := queryError(t, db, q)
		if !strings.Contains(msg, "the at column holds a NULL") {
			t.Errorf("forceIterator=%v: %s", force, msg)
		}
	}
	forceIterator = false
}

// TestEvalSafely: a panic inside a function becomes that query's error.
func TestEvalSafely(t *testing.T) {
	f := &function{name: "plumb_boom", eval: func([]driver.Value) (any, error) { panic("boom") }}
	if _, err := f.evalSafely(nil); err == nil || !strings.Contains(err.Error(), "boom") {
		t.Fatalf("got %v", err)
	}
}
