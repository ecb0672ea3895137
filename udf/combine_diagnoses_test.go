package udf

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// TestShardOfReference: shardOf gives the shards that
// testdata/reference/shard_keys.py computes from the definition in
// combine_diagnoses.go's doc comment, with plain Python 3 and no code of ours.
func TestShardOfReference(t *testing.T) {
	f, err := os.Open("../testdata/reference/shard_keys.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	records, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	for _, rec := range records[1:] {
		var key []*string
		if err := json.Unmarshal([]byte(rec[0]), &key); err != nil {
			t.Fatalf("%s: %v", rec[0], err)
		}
		n, _ := strconv.ParseUint(rec[1], 10, 64)
		want, _ := strconv.ParseUint(rec[2], 10, 64)
		if got := shardOf(key, n); got != want {
			t.Errorf("key %s, %d shards: shard %d, want %d", rec[0], n, got, want)
		}
	}
	if len(records) < 100 {
		t.Errorf("%d reference rows", len(records)-1)
	}
}

// TestShardOfTypedKeys: through SQL, a key column of another type hashes
// as its text, the same text on every DuckDB version for these types; the
// expected shards are rows of shard_keys.csv (shard_keys.py).
func TestShardOfTypedKeys(t *testing.T) {
	db := openTest(t)
	for _, test := range []struct {
		key  string // SQL list of the key's columns as diagnose casts them
		n    int
		want string
	}{
		{"[CAST(42 AS VARCHAR)]", 1000, "72"},                                 // ["42"]
		{"[CAST(42::TINYINT AS VARCHAR)]", 1000, "72"},                        // ["42"]
		{"[CAST(DATE '2025-01-01' AS VARCHAR)]", 7, "6"},                      // ["2025-01-01"]
		{"[CAST(TIMESTAMP '2025-01-01 06:30:00' AS VARCHAR)]", 1000, "888"},   // ["2025-01-01 06:30:00"]
		{"[CAST(true AS VARCHAR)]", 1000, "543"},                              // ["true"]
		{"[CAST(NULL::INTEGER AS VARCHAR), CAST('milk' AS VARCHAR)]", 7, "4"}, // [null, "milk"]
	} {
		if got := queryString(t, db, fmt.Sprintf("plumb_shard(%s, %d)", test.key, test.n)); got != test.want {
			t.Errorf("plumb_shard(%s, %d) = %s, want %s", test.key, test.n, got, test.want)
		}
	}
}

// TestShardsThenCombineEqualDiagnose: the groups of a panel diagnosed in
// four shards, written to four Parquet files and combined, give the rows a
// single diagnose gives, row for row (q-values and rank included), for one
// and for two group columns; and the shards split the groups.
func TestShardsThenCombineEqualDiagnose(t *testing.T) {
	db := openTest(t)
	dir := t.TempDir()
	panel := filepath.Join(dir, "panel.parquet")
	writePanel(t, db, panel, 1200, "hash(g), t")
	exec(t, db, fmt.Sprintf(`CREATE TEMP VIEW panel AS SELECT store || '/' || coalesce(sku::VARCHAR, '-') AS series, * FROM '%s'`, panel))
	for _, test := range []struct{ name, by string }{
		{"one group column", `'series'`},
		{"two group columns", `['store', 'sku']`},
	} {
		source := "panel"
		args := fmt.Sprintf(`by := %s, at := 'day', value := 'units', period := 7`, test.by)
		parts := filepath.Join(dir, strings.ReplaceAll(test.name, " ", "_"))
		if err := os.Mkdir(parts, 0o755); err != nil {
			t.Fatal(err)
		}
		var total int
		for k := range 4 {
			path := filepath.Join(parts, fmt.Sprintf("part-%d.parquet", k))
			exec(t, db, fmt.Sprintf(`COPY (FROM diagnose('%s', %s, shard := %d, shards := 4)) TO '%s'`, source, args, k, path))
			n, _ := strconv.Atoi(queryString(t, db, fmt.Sprintf(`SELECT count(*) FROM '%s' WHERE shard = %d AND shards = 4`, path, k)))
			t.Logf("%s: shard %d of 4 holds %d of 1200 groups", test.name, k, n)
			if n < 200 || n > 400 {
				t.Errorf("%s: shard %d holds %d of 1200 groups", test.name, k, n)
			}
			total += n
		}
		if total != 1200 {
			t.Errorf("%s: the shards hold %d groups, want 1200", test.name, total)
		}
		want := textRows(t, db, fmt.Sprintf(`FROM diagnose('%s', %s)`, source, args))
		got := textRows(t, db, fmt.Sprintf(`FROM combine_diagnoses('%s/*.parquet')`, parts))
		sameRows(t, test.name+": combine_diagnoses of a glob", got, want)
		exec(t, db, fmt.Sprintf(`CREATE OR REPLACE TEMP TABLE parts AS FROM '%s/*.parquet'`, parts))
		sameRows(t, test.name+": combine_diagnoses of a table", textRows(t, db, `FROM combine_diagnoses('parts')`), want)
		sameRows(t, test.name+": combine_diagnoses of a SELECT", textRows(t, db, `FROM combine_diagnoses('(FROM parts WHERE shard < 2 UNION ALL FROM parts WHERE shard >= 2)')`), want)
	}
}

func TestShardErrors(t *testing.T) {
	db := openTest(t)
	exec(t, db, `CREATE TABLE s AS SELECT 'g' || (i % 8) AS g, i // 8 AS t, sin(i) + i % 5 AS v FROM range(800) r(i)`)
	exec(t, db, `CREATE TABLE p2 AS FROM diagnose('s', by := 'g', at := 't', value := 'v', shard := 0, shards := 2)`)
	exec(t, db, `CREATE TABLE p3 AS FROM diagnose('s', by := 'g', at := 't', value := 'v', shard := 1, shards := 3)`)
	for _, test := range []struct{ query, want string }{
		{`FROM diagnose('s', by := 'g', at := 't', value := 'v', shard := 4, shards := 4)`, "shard must be between 0 and 3 (shards := 4), got 4"},
		{`FROM diagnose('s', by := 'g', at := 't', value := 'v', shard := -1, shards := 4)`, "shard must be between 0 and 3 (shards := 4), got -1"},
		{`FROM diagnose('s', by := 'g', at := 't', value := 'v', shard := 0, shards := 0)`, "shards must be at least 1, got 0"},
		{`FROM diagnose('s', by := 'g', at := 't', value := 'v', shard := 1)`, "give both shard and shards"},
		{`FROM diagnose('s', by := 'g', at := 't', value := 'v', shards := 3)`, "give both shard and shards"},
		{`FROM combine_diagnoses('(FROM diagnose(''s'', by := ''g'', at := ''t'', value := ''v''))')`, "8 rows have no shard or shards"},
		{`FROM combine_diagnoses('(FROM p2 UNION ALL FROM p3)')`, "the parts come from different numbers of shards (2 and 3)"},
		{`FROM combine_diagnoses('(FROM p2 UNION ALL FROM p2)')`, "groups appear more than once; is a part there twice?"},
		{`FROM combine_diagnoses('(SELECT * REPLACE (7 AS shard) FROM p2)')`, "a shard number lies outside 0 to 1"},
	} {
		if msg := queryError(t, db, test.query); !strings.Contains(msg, test.want) {
			t.Errorf("%s: %s\nwant it to say %q", test.query, msg, test.want)
		}
	}
}
