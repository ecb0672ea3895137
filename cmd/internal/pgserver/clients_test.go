package pgserver

import (
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/cmd/internal/demodata"
	"github.com/plumb-sql/plumb/udf"
)

// needTool finds a client program; where it is absent the test skips with
// one line saying what to install, except in CI (CI=true), whose .ci/run
// installs it.
func needTool(t *testing.T, name, pkg string) string {
	t.Helper()
	path, err := exec.LookPath(name)
	if err != nil {
		missing(t, name, "apt-get install "+pkg)
	}
	return path
}

// missing skips a test that needs what, saying how to get it; in CI, whose
// .ci/run installs everything the tests need, it fails the test instead.
func missing(t *testing.T, what, how string) {
	t.Helper()
	if os.Getenv("CI") == "true" {
		t.Fatalf("needs %s, which .ci/run installs (%s)", what, how)
	}
	t.Skipf("needs %s: %s (.ci/run does this)", what, how)
}

// writeDemoShops writes a small demo scenario under dir and returns the path
// of its shop Parquet file (3 shops × 4 product lines × 200 days).
func writeDemoShops(t *testing.T, dir string) string {
	t.Helper()
	files, err := demodata.WriteFiles(context.Background(), dir, 1, demodata.Sizes{Shops: 3, Products: 4, Days: 200})
	if err != nil {
		t.Fatal(err)
	}
	return files["shops"].Data
}

// writeSeries writes a small Parquet file of grouped series under dir.
func writeSeries(t *testing.T, dir string) string {
	t.Helper()
	db, err := udf.Open(context.Background(), udf.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	path := filepath.Join(dir, "series.parquet")
	_, err = db.Exec(`COPY (SELECT 'g' || (i % 4) AS grp, DATE '2025-01-01' + (i // 4)::INTEGER AS day,
		CASE WHEN i % 4 = 0 THEN sum(random() - 0.5) OVER (ORDER BY i) ELSE sin(i) + random() END AS v
		FROM range(1200) r(i)) TO '` + path + `'`)
	if err != nil {
		t.Fatal(err)
	}
	return path
}

// TestPsql drives Debian's psql (postgresql-client): \dt, \d of a table
// and \d+ of a view, a diagnose query over the demo's shop Parquet under
// --data, and \copy of a query to a CSV file.
func TestPsql(t *testing.T) {
	psql := needTool(t, "psql", "postgresql-client")
	ts := startServer(t, Config{})
	file := writeDemoShops(t, ts.data)
	out := filepath.Join(t.TempDir(), "ranked.csv")
	cmd := exec.Command(psql, ts.url("ana", "s3cret"), "-X", "-v", "ON_ERROR_STOP=1",
		"-c", "CREATE TABLE kept AS SELECT 1 AS a",
		"-c", `\dt`,
		"-c", "CREATE VIEW kept_view AS SELECT a FROM kept",
		"-c", `\d kept`,
		"-c", `\d+ kept_view`,
		"-c", "SELECT shop, product, rank, violations FROM diagnose('"+file+"', by := ['shop', 'product'], at := 'day', value := 'units', period := 7) ORDER BY rank, shop, product",
		"-c", `\copy (SELECT shop, product, rank, round(score, 3) AS score FROM diagnose('`+file+`', by := ['shop', 'product'], at := 'day', value := 'units', period := 7) ORDER BY shop, product) to '`+out+`' with csv header`)
	cmd.Env = append(os.Environ(), "PGCONNECT_TIMEOUT=10")
	got, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("psql: %v\n%s", err, got)
	}
	text := string(got)
	for _, want := range []string{"kept", "| table |", `Table "main.kept"`, " a      | integer |", `View "main.kept_view"`,
		"View definition:", "(12 rows)", "COPY 12"} {
		if !strings.Contains(text, want) {
			t.Errorf("psql output lacks %q:\n%s", want, text)
		}
	}
	csv, err := os.ReadFile(out)
	if err != nil || !strings.HasPrefix(string(csv), "shop,product,rank,score\nLarchmere Central,") || strings.Count(string(csv), "\n") != 13 {
		t.Errorf("\\copy wrote %q (%v)", csv, err)
	}
}

// TestPsycopg2 runs parameterised queries from Debian's python3-psycopg2.
func TestPsycopg2(t *testing.T) {
	python := needTool(t, "/usr/bin/python3", "python3")
	if err := exec.Command(python, "-c", "import psycopg2").Run(); err != nil {
		missing(t, "the Python module psycopg2 for /usr/bin/python3", "apt-get install python3-psycopg2")
	}
	ts := startServer(t, Config{})
	file := writeSeries(t, ts.data)
	script := `
import sys, psycopg2
conn = psycopg2.connect(sys.argv[1])
cur = conn.cursor()
cur.execute("SELECT %s::INTEGER + 1, %s::VARCHAR || '!', %s::DOUBLE * 2", (41, "plumb", 1.25))
print(cur.fetchone())
cur.execute("SELECT grp, n FROM diagnose(%s, by := 'grp', at := 'day', value := 'v') WHERE grp = %s", (sys.argv[2], "g1"))
print(cur.fetchall())
cur.execute("CREATE TEMP TABLE t AS SELECT 1 AS a")
conn.commit()
cur.execute("SELECT count(*) FROM t")
print(cur.fetchone())
conn.close()
`
	got, err := exec.Command(python, "-c", script, strings.Replace(ts.url("ana", "s3cret"), "postgres://", "postgresql://", 1), file).CombinedOutput()
	if err != nil {
		t.Fatalf("psycopg2: %v\n%s", err, got)
	}
	want := "(42, 'plumb!', 2.5)\n[('g1', 300)]\n(1,)\n"
	if string(got) != want {
		t.Errorf("psycopg2 printed %q, want %q", got, want)
	}
}
