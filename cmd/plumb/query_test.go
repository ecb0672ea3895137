package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// run executes plumb with args and returns its standard output and error.
func run(t *testing.T, stdin string, args ...string) (string, error) {
	t.Helper()
	cmd := newRootCommand()
	var out bytes.Buffer
	cmd.SetOut(&out)
	cmd.SetErr(&out)
	cmd.SetIn(strings.NewReader(stdin))
	cmd.SetArgs(args)
	err := cmd.Execute()
	return out.String(), err
}

func TestQueryPrintsDifferences(t *testing.T) {
	for _, test := range []struct{ sql, want string }{
		{"SELECT difference([1,4,9,16]::DOUBLE[]) AS d", "[3, 5, 7]"},
		{"SELECT difference([1,4,9,16]::DOUBLE[], times := 2) AS d", "[2, 2]"},
		{"SELECT difference([1,2,3,4,5]::DOUBLE[], lag := 2) AS d", "[2, 2, 2]"},
	} {
		out, err := run(t, "", "query", test.sql)
		if err != nil {
			t.Fatalf("%s: %v", test.sql, err)
		}
		if !strings.Contains(out, "\n"+test.want+"\n") {
			t.Errorf("%s printed\n%s\nwant a row %s", test.sql, out, test.want)
		}
	}
}

func TestQueryFormatsAndSources(t *testing.T) {
	out, err := run(t, "", "query", "--format", "csv", "SELECT 1 AS a, 'x,y' AS b, NULL AS c")
	if err != nil || out != "a,b,c\n1,\"x,y\",\n" {
		t.Errorf("csv: %q %v", out, err)
	}
	out, err = run(t, "", "query", "--format", "json", "SELECT 1.5 AS a, [1, 2] AS b")
	if err != nil || out != "{\"a\":1.5,\"b\":[1,2]}\n" {
		t.Errorf("json: %q %v", out, err)
	}
	out, err = run(t, "CREATE TEMP TABLE t AS SELECT 41 AS x; SELECT x + 1 AS y FROM t;", "query", "--format", "csv")
	if err != nil || !strings.HasSuffix(out, "y\n42\n") {
		t.Errorf("stdin, two statements on one connection: %q %v", out, err)
	}
	file := filepath.Join(t.TempDir(), "q.sql")
	os.WriteFile(file, []byte("-- a comment; with a semicolon\nSELECT 'a;b' AS s"), 0o644)
	out, err = run(t, "", "query", "-f", file, "--format", "csv")
	if err != nil || out != "s\na;b\n" {
		t.Errorf("file: %q %v", out, err)
	}
	db := filepath.Join(t.TempDir(), "x.duckdb")
	if _, err := run(t, "", "query", "--db", db, "CREATE TABLE kept AS SELECT 7 AS v"); err != nil {
		t.Fatal(err)
	}
	out, err = run(t, "", "query", "--db", db, "--format", "csv", "SELECT v FROM kept")
	if err != nil || out != "v\n7\n" {
		t.Errorf("database file: %q %v", out, err)
	}
}

func TestQueryErrors(t *testing.T) {
	for _, test := range []struct {
		args []string
		want string
	}{
		{[]string{"query", "SELECT * FROM no_such_table"}, "no_such_table does not exist"},
		{[]string{"query", "SELECT 1; SELEC 2"}, "statement 2 of 2"},
		{[]string{"query", "--format", "xml", "SELECT 1"}, `unknown format "xml"`},
		{[]string{"query", "/* nothing */"}, "no SQL statement"},
		{[]string{"query", "-f", "/no/such/file.sql"}, "no such file"},
	} {
		_, err := run(t, "", test.args...)
		if err == nil || !strings.Contains(err.Error(), test.want) {
			t.Errorf("%v: error %v, want one saying %q", test.args, err, test.want)
		}
	}
}

// TestQueryNewDatabase: --db naming a file that does not exist creates it
// and says so when the script succeeds, and leaves no file behind when a
// statement fails (as plumb query --help's example once did).
func TestQueryNewDatabase(t *testing.T) {
	dir := t.TempDir()
	failed := filepath.Join(dir, "failed.duckdb")
	_, err := run(t, "", "query", "--db", failed, "CREATE TABLE a AS SELECT 1 AS x; FROM no_such_table")
	if err == nil || !strings.Contains(err.Error(), "failed.duckdb was not created, since the script failed") {
		t.Errorf("failing script: error %v", err)
	}
	if _, serr := os.Stat(failed); !os.IsNotExist(serr) {
		t.Errorf("failing script left %s behind (%v)", failed, serr)
	}
	made := filepath.Join(dir, "made.duckdb")
	out, err := run(t, "", "query", "--db", made, "CREATE TABLE a AS SELECT 1 AS x")
	if err != nil || !strings.Contains(out, "created the database "+made) {
		t.Errorf("new database: %q %v", out, err)
	}
	if _, serr := os.Stat(made); serr != nil {
		t.Error(serr)
	}
	// An existing file is kept whatever happens, and nothing is said.
	out, err = run(t, "", "query", "--db", made, "FROM no_such_table")
	if err == nil || strings.Contains(err.Error(), "not created") || strings.Contains(out, "created") {
		t.Errorf("existing database: %q %v", out, err)
	}
	if _, serr := os.Stat(made); serr != nil {
		t.Error(serr)
	}
}
