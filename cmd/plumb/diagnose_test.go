package main

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/cmd/internal/demodata"
	"github.com/plumb-sql/plumb/udf"
)

// demoFiles writes the demo Parquet files to a temporary folder.
func demoFiles(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	sizes := demodata.Sizes{Shops: 3, Products: 4, Days: 200, Containers: 2, Hours: 200}
	if _, err := demodata.WriteFiles(context.Background(), dir, 1, sizes); err != nil {
		t.Fatal(err)
	}
	return dir
}

func TestDiagnoseAndReportCommands(t *testing.T) {
	dir := demoFiles(t)
	shops := filepath.Join(dir, "shops.parquet")
	out, err := run(t, "", "diagnose", shops, "--by", "shop,product", "--at", "day", "--value", "units", "--top", "3",
		"--out", filepath.Join(dir, "ranked.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(out, "12 groups diagnosed; the 3 furthest from stationary") || !strings.Contains(out, "(3 rows)") ||
		!strings.Contains(out, "wrote 12 groups to "+filepath.Join(dir, "ranked.csv")+"\n") {
		t.Errorf("diagnose printed:\n%s", out)
	}
	csv, err := os.ReadFile(filepath.Join(dir, "ranked.csv"))
	if err != nil || strings.Count(string(csv), "\n") != 13 {
		t.Errorf("ranked.csv: %v, %d lines, want a header and 12 rows", err, strings.Count(string(csv), "\n"))
	}
	for _, ext := range []string{"parquet", "json"} {
		if _, err := run(t, "", "diagnose", shops, "--by", "shop,product", "--at", "day", "--value", "units", "--out", filepath.Join(dir, "ranked."+ext)); err != nil {
			t.Errorf("--out .%s: %v", ext, err)
		}
	}
	report := filepath.Join(dir, "r.html")
	out, err = run(t, "", "report", shops, "--by", "shop,product", "--at", "day", "--value", "units", "-o", report, "--top", "4")
	if err != nil || !strings.Contains(out, "report written to") {
		t.Fatalf("report: %v\n%s", err, out)
	}
	if st, err := os.Stat(report); err != nil || st.Size() < 10000 {
		t.Errorf("report file: %v", err)
	}
}

// TestCommandErrors: a missing file, a wrong column and an empty file each
// give one clear line and an error (main turns it into exit status 1).
func TestCommandErrors(t *testing.T) {
	dir := demoFiles(t)
	empty := filepath.Join(dir, "empty.parquet")
	db, _ := udf.Open(context.Background(), udf.Options{})
	if _, err := db.Exec("COPY (SELECT 'a' AS shop, DATE '2025-01-01' AS day, 1 AS units WHERE false) TO '" + empty + "'"); err != nil {
		t.Fatal(err)
	}
	db.Close()
	zero := filepath.Join(dir, "zero.parquet")
	os.WriteFile(zero, nil, 0o644)
	for _, command := range []string{"diagnose", "report"} {
		for _, test := range []struct {
			name, source, value, want string
		}{
			{"missing file", filepath.Join(dir, "nope.parquet"), "units", "No files found"},
			{"wrong column", filepath.Join(dir, "shops.parquet"), "sales", `diagnose: the value column "sales" is not in ` + filepath.Join(dir, "shops.parquet") + `; its columns are: shop, product, day, units`},
			{"text column", filepath.Join(dir, "shops.parquet"), "product", `diagnose: the value column "product" of ` + filepath.Join(dir, "shops.parquet") + ` is VARCHAR, not a number`},
			{"empty file", empty, "units", "has no rows"},
			{"zero-byte file", zero, "units", "cannot read"},
		} {
			args := []string{command, test.source, "--by", "shop", "--at", "day", "--value", test.value, "--quiet"}
			if command == "report" {
				args = append(args, "-o", filepath.Join(dir, "x.html"))
			}
			_, err := run(t, "", args...)
			if err == nil || !strings.Contains(err.Error(), test.want) || strings.Contains(err.Error(), "\n") {
				t.Errorf("%s, %s: error %v, want one line saying %q", command, test.name, err, test.want)
			}
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "x.html")); err == nil {
		t.Error("a failed report left its file behind")
	}
}

// TestCommandOptionChecks: the options SQL refuses are refused on the
// command line with SQL's own message (udf's checks), never replaced by a
// default: --alpha 0 does not become 0.05, --period -3 does not become
// "detect".
func TestCommandOptionChecks(t *testing.T) {
	dir := demoFiles(t)
	source := filepath.Join(dir, "shops.parquet")
	for _, test := range []struct {
		flags []string
		want  string
	}{
		{[]string{"--alpha", "0"}, "alpha must be between 0 and 1 (exclusive), got 0"},
		{[]string{"--alpha", "1.5"}, "alpha must be between 0 and 1 (exclusive), got 1.5"},
		{[]string{"--period", "-3"}, "period must be at least 2, 1 (not seasonal), or left out (NULL) to detect it; got -3"},
		{[]string{"--period", "0"}, "period must be at least 2, 1 (not seasonal), or left out (NULL) to detect it; got 0"},
	} {
		for _, command := range []string{"diagnose", "forecast"} {
			args := append([]string{command, source, "--by", "shop,product", "--at", "day", "--value", "units", "--quiet"}, test.flags...)
			if _, err := run(t, "", args...); err == nil || err.Error() != test.want {
				t.Errorf("%s %v: error %v, want %q", command, test.flags, err, test.want)
			}
		}
	}
}
