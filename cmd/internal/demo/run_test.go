package demo

import (
	"bytes"
	"context"
	"database/sql"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/plumb-sql/plumb/cmd/internal/demodata"
	"github.com/plumb-sql/plumb/cmd/internal/output"
	"github.com/plumb-sql/plumb/udf"
)

func TestRunWritesFilesAndSummary(t *testing.T) {
	dir := t.TempDir()
	var out bytes.Buffer
	if err := Run(context.Background(), Config{Dir: dir, Seed: 1, Sizes: demodata.DefaultSizes}, &out); err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{"shops.parquet", "shops_truth.parquet", "containers.parquet", "containers_truth.parquet", "shops_differenced.parquet",
		"shops_diagnosis.parquet", "shops_stationary.parquet", "shops_recipes.parquet", "shops_report.html"} {
		if st, err := os.Stat(filepath.Join(dir, f)); err != nil || st.Size() == 0 {
			t.Errorf("%s: %v", f, err)
		}
	}
	for _, want := range []string{"shops: 96 series, one per shop and product, each 730 days of units;",
		"containers: 30 series, one per container, each 1440 hours of temperature;", "Files written:",
		"96                96                       96", "Try: go run ./cmd/plumb query \"" + TrySQL(filepath.Join(dir, "shops.parquet")) + "\"\n"} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("summary lacks %q:\n%s", want, out.String())
		}
	}
	tryQueryFits(t, dir)
}

// tryQueryFits: the query the demo suggests last runs on the files it
// wrote to dir and prints a table narrow enough for a terminal.
func tryQueryFits(t *testing.T, dir string) {
	t.Helper()
	db, err := udf.Open(context.Background(), udf.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	rows, err := db.Query(TrySQL(filepath.Join(dir, "shops.parquet")))
	if err != nil {
		t.Fatal(err)
	}
	res, err := output.Read(rows)
	rows.Close()
	if err != nil {
		t.Fatal(err)
	}
	var table bytes.Buffer
	if err := output.Write(&table, res, output.Table); err != nil {
		t.Fatal(err)
	}
	widest := 0
	for _, line := range strings.Split(table.String(), "\n") {
		widest = max(widest, utf8.RuneCountInString(line))
	}
	if strings.Count(table.String(), "\n") != 8 || widest > 100 {
		t.Errorf("the Try query printed %d lines, %d characters wide (want 5 rows within 100):\n%s", strings.Count(table.String(), "\n"), widest, table.String())
	}
	t.Logf("\n%s", table.String())
}

// TestUndifferenceRestoresEveryDemoGroup is the round trip on every demo
// series, through the SQL functions: differencing at lag 1 and at the
// seasonal lag, then undifferencing from the first values, gives back the
// series exactly (the values are whole units or hundredths, so sums are exact
// to well within 1e-9 relative).
func TestUndifferenceRestoresEveryDemoGroup(t *testing.T) {
	dir := t.TempDir()
	db := openDemo(t, dir)
	for _, test := range []struct {
		table, by, at, value string
		lag                  int
	}{
		{"shops", "shop, product", "day", "units", 1},
		{"shops", "shop, product", "day", "units", 7},
		{"containers", "container", "hour", "temperature", 1},
		{"containers", "container", "hour", "temperature", 24},
	} {
		var groups, restored int
		q := `SELECT count(*), count(*) FILTER (WHERE list_concat(x[1:$1], undifference(difference(x, lag := $1), x[1:$1], lag := $1)) = x
			OR list_max(list_transform(list_zip(list_concat(x[1:$1], undifference(difference(x, lag := $1), x[1:$1], lag := $1)), x),
				p -> abs(p[1] - p[2]) / greatest(1, abs(p[2])))) <= 1e-9)
			FROM (SELECT list(` + test.value + ` ORDER BY ` + test.at + `)::DOUBLE[] AS x FROM ` + test.table + ` GROUP BY ` + test.by + `)`
		if err := db.QueryRow(q, test.lag).Scan(&groups, &restored); err != nil {
			t.Fatal(err)
		}
		if groups == 0 || restored != groups {
			t.Errorf("%s at lag %d: %d of %d groups restored", test.table, test.lag, restored, groups)
		}
	}
}

// TestGenerateIsDeterministic: the same seed gives the same data.
func TestGenerateIsDeterministic(t *testing.T) {
	a, _ := demodata.Generate(42, demodata.DefaultSizes)
	b, _ := demodata.Generate(42, demodata.DefaultSizes)
	c, _ := demodata.Generate(43, demodata.DefaultSizes)
	same := func(x, y []demodata.Dataset) bool {
		for i := range x {
			for j := range x[i].Series {
				for k, v := range x[i].Series[j].Values {
					if v != y[i].Series[j].Values[k] {
						return false
					}
				}
			}
		}
		return true
	}
	if !same(a, b) {
		t.Error("seed 42 gave different data twice")
	}
	if same(a, c) {
		t.Error("seeds 42 and 43 gave the same data")
	}
}

// openDemo generates the default demo into dir and returns a database with
// its tables loaded.
func openDemo(t *testing.T, dir string) *sql.DB {
	t.Helper()
	sets, err := demodata.Generate(1, demodata.DefaultSizes)
	if err != nil {
		t.Fatal(err)
	}
	db, err := udf.Open(context.Background(), udf.Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	if _, err := demodata.Write(context.Background(), db, dir, sets); err != nil {
		t.Fatal(err)
	}
	return db
}
