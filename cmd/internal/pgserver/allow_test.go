package pgserver

import (
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/cmd/internal/sandbox"
)

// testGate is a write user's allow-list over data, with a catalogue that
// knows the allowed table functions and some refused ones by name.
func testGate(data string) *gate {
	files, err := sandbox.New(data, "/srv/spill")
	if err != nil {
		panic(err)
	}
	names := &catalogNames{table: map[string]bool{}, functions: map[string]bool{"format": true, "list_filter": true}}
	for n := range tableFunctions {
		names.table[n] = true
	}
	for n := range sourceArguments {
		names.table[n] = true
	}
	for _, n := range []string{"query", "query_table", "duckdb_logs", "enable_logging", "disable_logging", "checkpoint",
		"duckdb_settings", "duckdb_temporary_files", "json_execute_serialized_sql", "summary"} {
		names.table[n] = true
	}
	return &gate{files: files, role: RoleWrite, catalog: names}
}

// TestAllowList: what the token checks refuse, each as an attacker would
// write it, and what they let through. Refusals carry SQLSTATE 42501 and
// name what was refused.
func TestAllowList(t *testing.T) {
	write := testGate("/srv/data")
	read := testGate("/srv/data")
	read.role = RoleRead
	readOnly := testGate("/srv/data")
	readOnly.readOnly = true
	for _, test := range []struct {
		g     *gate
		sql   string
		names string // "" if allowed, else a word the refusal must contain
	}{
		{write, "SELECT * FROM diagnose('shops.parquet', by := 'shop', at := 'day', value := 'units')", ""},
		{write, "SELECT * FROM range(3), generate_series(1, 2)", ""},
		{write, "FROM read_csv('in/x.csv', header := true)", ""},
		{write, "SELECT query FROM logs", ""}, // a column called query is not the function
		{write, "CALL enable_logging()", "enable_logging"},
		{write, "CALL disable_logging()", "disable_logging"},
		{write, "FROM enable_logging()", "enable_logging"},
		{write, "SELECT * FROM duckdb_logs", "duckdb_logs"},
		{write, "SELECT * FROM t, duckdb_logs", "duckdb_logs"},
		{write, `SELECT * FROM system.main."duckdb_logs"`, "duckdb_logs"},
		{write, "SELECT * FROM (SELECT * FROM query('FROM duckdb_logs'))", "query"},
		{write, "FROM query_table('t')", "query_table"},
		{write, "FROM duckdb_settings()", "duckdb_settings"},
		{write, "FROM duckdb_temporary_files()", "duckdb_temporary_files"},
		{write, "PRAGMA disable_checkpoint_on_shutdown", "disable_checkpoint_on_shutdown"},
		{write, "PRAGMA disable_object_cache", "disable_object_cache"},
		{write, "PRAGMA enable_profiling", "enable_profiling"},
		{write, "PRAGMA memory_limit = '100GB'", "memory_limit"},
		{write, "PRAGMA table_info('t')", ""},
		{write, "SET GLOBAL memory_limit = '100GB'", "GLOBAL"},
		{write, "CHECKPOINT", "CHECKPOINT"},
		{write, "FORCE CHECKPOINT", "FORCE"},
		{write, "ATTACH ':memory:' AS a_db", "ATTACH"},
		{write, "DETACH a_db", "DETACH"},
		{write, "USE a_db", "USE"},
		{write, "LOAD httpfs", "LOAD"},
		{write, "INSTALL httpfs", "INSTALL"},
		{write, "CREATE MACRO plumb_diagnose_sql(a, b, c, d, e, f, g, h, i) AS 'SELECT 1 AS hijacked'", "plumb_diagnose_sql"},
		{write, "CREATE OR REPLACE TEMP MACRO diagnose(a) AS TABLE SELECT 1", "diagnose"},
		{write, "CREATE MACRO format(a, b) AS 'hijacked'", "format"},
		{write, "CREATE FUNCTION list_filter(a, b) AS a", "list_filter"},
		{write, "CREATE TABLE plumb_points AS SELECT 1", "plumb_points"},
		{write, "CREATE VIEW main.pgcompat_x AS SELECT 1", "pgcompat_x"},
		{write, "ALTER TABLE t RENAME TO plumb_series", "plumb_series"},
		{write, "DROP MACRO IF EXISTS forecast", "forecast"},
		{write, "DROP TABLE a, unit_root", "unit_root"},
		{write, "CREATE SECRET s (TYPE s3, KEY_ID 'x')", "SECRET"},
		{write, "CREATE TABLE format AS SELECT 1", ""}, // a table does not shadow a function
		{write, "CREATE MACRO my_scale(x) AS x * 2", ""},
		{write, "COPY t TO 'out.csv'", ""},
		{read, "COPY t TO 'out.csv'", "read"},
		{read, "COPY (SELECT 1) TO STDOUT", ""},
		{readOnly, "COPY t TO 'out.csv'", "read-only"},
		{readOnly, "EXPORT DATABASE 'backup'", "read-only"},
		{write, "FROM '../README.md'", `"../README.md" is outside the data directory`},
		{write, "FROM '/srv/spill/duckdb_temp_storage-0.tmp'", "outside"},
		{write, "FROM read_blob('/srv/spill/*')", "outside"},
		{write, "FROM glob('../*')", "outside"},
		{write, "FROM read_text(['a.txt', '/etc/passwd'])", "outside"},
		{write, "FROM read_text('a' || '.txt')", "literal"},
		{write, "FROM read_text(E'/etc/passwd')", "literal"},
		{write, `FROM "/etc/passwd.csv"`, "outside"},
		{write, "COPY (SELECT 1) TO '/tmp/x.csv'", "outside"},
		{write, "COPY t FROM 'http://example.com/x.csv'", "outside"},
		{write, "FROM diagnose('(FROM duckdb_logs)', by := 'a', at := 'b', value := 'c')", "duckdb_logs"},
		{write, "FROM diagnose('(FROM ''../secret.csv'')', by := 'a', at := 'b', value := 'c')", "outside"},
		{write, "FROM forecast('../x.parquet', by := 'a', at := 'b', value := 'c')", "outside"},
		{write, "FROM combine_diagnoses('/etc/parts/*.parquet')", "outside"},
		{write, "FROM diagnose(lower('X.CSV'), by := 'a', at := 'b', value := 'c')", "literal"},
		{write, "SELECT trim(BOTH 'x' FROM 'xyx'), 'a' IS DISTINCT FROM 'b'", ""},
		{write, "FROM diagnose(sales, by := 'a', at := 'b', value := 'c')", ""},
		{write, "CREATE MACRO rd(p) AS TABLE FROM diagnose(p, by := 'a', at := 'b', value := 'c')", "literal"},
		{write, "CREATE MACRO rd(p) AS TABLE FROM read_blob(p)", "literal"},
		{write, `FROM diagnose('"t", duckdb_logs', by := 'a', at := 'b', value := 'c')`, "one table"},
		{write, `FROM diagnose('"main"."t"', by := 'a', at := 'b', value := 'c')`, ""},
		{write, "COPY duckdb_logs TO 'x.csv'", "duckdb_logs"},
		{write, "DESCRIBE duckdb_logs", "duckdb_logs"},
		{write, "SUMMARIZE duckdb_logs", "duckdb_logs"},
		{write, "TABLE duckdb_logs", "duckdb_logs"},
		{write, "COPY '../x.csv' TO STDOUT", "outside"},
		{write, "SELECT 1; PRAGMA enable_profiling", "enable_profiling"},
		{write, "SELECT 1; ATTACH ':memory:' AS x", "ATTACH"},
		{read, "SELECT nextval('seq')", "nextval"},
		{write, "EXPLAIN PRAGMA enable_profiling", "enable_profiling"},
		{write, "EXPLAIN ANALYZE ATTACH ':memory:' AS x", "ATTACH"},
		{read, "EXPLAIN ANALYZE (FORMAT json) INSERT INTO t VALUES (1)", "INSERT"},
		{write, "EXPLAIN SELECT * FROM duckdb_logs", "duckdb_logs"},
		{write, "EXPLAIN ANALYZE SELECT 1", ""},
		{write, "SELECT nextval('seq')", ""},
	} {
		_, _, err := rewriteSQL(test.sql, test.g)
		switch {
		case test.names == "" && err != nil:
			t.Errorf("%s: refused (%v), want allowed", test.sql, err)
		case test.names != "" && err == nil:
			t.Errorf("%s: allowed, want refused naming %q", test.sql, test.names)
		case test.names != "":
			pe, ok := err.(pgError)
			if !ok || pe.code != stateInsufficientPriv || !strings.Contains(pe.msg, test.names) {
				t.Errorf("%s: refused with %v, want 42501 naming %q", test.sql, err, test.names)
			}
			if strings.Contains(err.Error(), "/srv/data") {
				t.Errorf("%s: the refusal shows the server path: %v", test.sql, err)
			}
		}
	}
}

// TestParseUsersRoles: the users file's optional role, and lines that stay
// as they were.
func TestParseUsersRoles(t *testing.T) {
	users, roles, err := ParseUsers("ana:s3cret\nread ben:pa:55\nwrite cy:x y, read dee:z")
	if err != nil {
		t.Fatal(err)
	}
	want := map[string][2]string{"ana": {"s3cret", "write"}, "ben": {"pa:55", "read"}, "cy": {"x y", "write"}, "dee": {"z", "read"}}
	for u, w := range want {
		if users[u] != w[0] || string(roles[u]) != w[1] {
			t.Errorf("%s: password %q role %q, want %q %q", u, users[u], roles[u], w[0], w[1])
		}
	}
	if _, _, err := ParseUsers("admin ana:x"); err == nil {
		t.Error("an unknown role was accepted")
	}
}
