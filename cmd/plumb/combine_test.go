package main

import (
	"context"
	"database/sql"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/stats/longtests"
	"github.com/plumb-sql/plumb/udf"
)

// TestMain lets the test binary stand in for the plumb binary: with
// PLUMB_TEST_AS_PLUMB=1 in its environment it runs plumb's commands on its
// arguments, for the processes the Dask example starts.
func TestMain(m *testing.M) {
	if os.Getenv("PLUMB_TEST_AS_PLUMB") == "1" {
		main()
		os.Exit(0)
	}
	os.Exit(m.Run())
}

// shopPanel opens an in-memory database and writes to a temporary folder
// panel.parquet: groups (store, sku) of 100 to 299 daily values each, random
// walks, weekly patterns and noise, every number a hash of the group and
// the day. It returns the database, the folder and the file.
func shopPanel(t *testing.T, groups int) (*sql.DB, string, string) {
	t.Helper()
	dir := t.TempDir()
	db, err := udf.Open(context.Background(), udf.Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	path := filepath.Join(dir, "panel.parquet")
	q := fmt.Sprintf(`COPY (
		SELECT 'store-' || (g %% 41) AS store, g // 41 AS sku, DATE '2024-01-01' + t::INTEGER AS day,
		       CASE WHEN g %% 3 = 0 THEN 50 + sum((hash(g, t) %% 1000)::DOUBLE / 1000 - 0.5) OVER (PARTITION BY g ORDER BY t)
		            WHEN g %% 3 = 1 THEN 50 + 3 * sin(t * 0.8976) + (hash(g, t) %% 1000)::DOUBLE / 250
		            ELSE 50 + (hash(g, t) %% 1000)::DOUBLE / 100 END AS units
		FROM range(%d) AS gs(g), range(300) AS ts(t)
		WHERE t < 100 + g %% 200
	) TO '%s' (FORMAT parquet)`, groups, path)
	if _, err := db.Exec(q); err != nil {
		t.Fatal(err)
	}
	return db, dir, path
}

// orderedRows returns the rows of q in their order, each as DuckDB's text
// of the row as a STRUCT (NULLs and every digit of a DOUBLE included).
func orderedRows(t *testing.T, db *sql.DB, q string) []string {
	t.Helper()
	rows, err := db.Query("SELECT CAST(plumb_r AS VARCHAR) FROM (" + q + ") AS plumb_r")
	if err != nil {
		t.Fatalf("%s: %v", q, err)
	}
	defer rows.Close()
	var out []string
	for rows.Next() {
		var s string
		if err := rows.Scan(&s); err != nil {
			t.Fatal(err)
		}
		out = append(out, s)
	}
	if err := rows.Err(); err != nil {
		t.Fatal(err)
	}
	return out
}

func sameOrderedRows(t *testing.T, what string, got, want []string) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: %d rows, want %d", what, len(got), len(want))
	}
	for i := range got {
		if got[i] != want[i] {
			t.Fatalf("%s: row %d differs:\n got  %s\n want %s", what, i+1, got[i], want[i])
		}
	}
}

// TestShardCommandsThenCombine: plumb diagnose --shard K/3 three times,
// then plumb combine, writes the rows plumb diagnose writes; combine refuses
// parts that are missing, doubled or not parts at all.
func TestShardCommandsThenCombine(t *testing.T) {
	db, dir, panel := shopPanel(t, 500)
	parts := filepath.Join(dir, "parts")
	os.Mkdir(parts, 0o755)
	flags := []string{"--by", "store,sku", "--at", "day", "--value", "units", "--quiet"}
	for k := range 3 {
		part := filepath.Join(parts, fmt.Sprintf("part-%d.parquet", k))
		out, err := run(t, "", append([]string{"diagnose", panel, "--shard", fmt.Sprintf("%d/3", k), "--out", part}, flags...)...)
		if err != nil || !strings.Contains(out, fmt.Sprintf("shard %d of 3: ", k)) {
			t.Fatalf("shard %d: %v\n%s", k, err, out)
		}
	}
	single := filepath.Join(dir, "single.parquet")
	if _, err := run(t, "", append([]string{"diagnose", panel, "--out", single}, flags...)...); err != nil {
		t.Fatal(err)
	}
	combined := filepath.Join(dir, "combined.parquet")
	out, err := run(t, "", "combine", filepath.Join(parts, "*.parquet"), "--out", combined, "--top", "3")
	if err != nil || !strings.Contains(out, "500 groups diagnosed; the 3 furthest from stationary") {
		t.Fatalf("combine: %v\n%s", err, out)
	}
	sameOrderedRows(t, "combined against single", orderedRows(t, db, "FROM '"+combined+"'"), orderedRows(t, db, "FROM '"+single+"'"))

	os.Link(filepath.Join(parts, "part-1.parquet"), filepath.Join(parts, "part-1-again.parquet"))
	os.Link(single, filepath.Join(dir, "not-a-part.parquet"))
	for _, test := range []struct {
		args []string
		want string
	}{
		{[]string{"combine", filepath.Join(parts, "part-[02].parquet")}, "has no part for shard 1 of 0-2"},
		{[]string{"combine", filepath.Join(parts, "*.parquet")}, "shard 1 of 3 is there 2 times"},
		{[]string{"combine", filepath.Join(dir, "*.parquet")}, "is not a part written by plumb diagnose --shard"},
		{append([]string{"diagnose", panel, "--shard", "3/3", "--out", "x.parquet"}, flags...), "--shard 3/3: the shard must be between 0 and 2"},
		{append([]string{"diagnose", panel, "--shard", "1/0", "--out", "x.parquet"}, flags...), "the number of shards must be at least 1"},
		{append([]string{"diagnose", panel, "--shard", "1", "--out", "x.parquet"}, flags...), "write the shard as K/N"},
		{append([]string{"diagnose", panel, "--shard", "1/3", "--out", "x.csv"}, flags...), "name a .parquet file with --out"},
	} {
		if _, err := run(t, "", test.args...); err == nil || !strings.Contains(err.Error(), test.want) {
			t.Errorf("%s: %v, want an error saying %q", strings.Join(test.args, " "), err, test.want)
		}
	}
}

// TestDaskExample runs examples/distributed on a LocalCluster of two worker
// processes, four shards of 3,000 groups, and compares the combined result
// with one diagnose, row for row. CI installs python3-distributed.
func TestDaskExample(t *testing.T) {
	longtests.Require(t, "sharded diagnose on a Dask LocalCluster, about 15 s")
	const python = "/usr/bin/python3"
	if err := exec.Command(python, "-c", "import distributed").Run(); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("python3-distributed is missing: %v", err)
		}
		t.Skip("needs Debian's python3-distributed for /usr/bin/python3: apt-get install python3-distributed (.ci/run installs it)")
	}
	self, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	db, dir, panel := shopPanel(t, 3000)
	out := filepath.Join(dir, "ranked.parquet")
	cmd := exec.Command(python, "../../examples/distributed/diagnose_on_dask.py", "--local-workers", "2", "--plumb", self,
		"--source", panel, "--by", "store,sku", "--at", "day", "--value", "units", "--period", "7",
		"--shards", "4", "--parts", filepath.Join(dir, "parts"), "--out", out, "--top", "3")
	cmd.Env = append(os.Environ(), "PLUMB_TEST_AS_PLUMB=1")
	output, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("%v\n%s", err, output)
	}
	t.Logf("the example printed:\n%s", output)
	if !strings.Contains(string(output), "4 parts written") || !strings.Contains(string(output), "3000 groups diagnosed") {
		t.Errorf("the example printed:\n%s", output)
	}
	want := orderedRows(t, db, fmt.Sprintf(`FROM diagnose('%s', by := ['store', 'sku'], at := 'day', value := 'units', period := 7)`, panel))
	sameOrderedRows(t, "Dask's combined result against one diagnose", orderedRows(t, db, "FROM '"+out+"'"), want)
}
