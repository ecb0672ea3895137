package pgserver

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgconn"

	"github.com/plumb-sql/plumb/udf"
)

// Attacks on plumb serve's statement allow-list, file policy and
// catalogue, each written as a client who wants to read another user's
// data, change what plumb's functions return to others, or break the
// server would write it. Crash-type attacks end by checking that the
// server still serves another user; leak-type attacks that the other user
// sees nothing.

// attackUsers are the users of the attack tests: ana and ben write, cy
// only reads.
var attackUsers = Config{Auth: "scram", Users: map[string]string{"ana": "s3cret", "ben": "pa55", "cy": "r3ad"},
	Roles: map[string]Role{"cy": RoleRead}}

func attackConfig(cfg Config) Config {
	cfg.Auth, cfg.Users, cfg.Roles = attackUsers.Auth, attackUsers.Users, attackUsers.Roles
	return cfg
}

func connectAs(t *testing.T, ts *testServer, user string) *pgx.Conn {
	t.Helper()
	c, err := pgx.Connect(context.Background(), ts.url(user, attackUsers.Users[user]))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { c.Close(context.Background()) })
	return c
}

// serverPaths are the server's own paths no message to a client may show.
func serverPaths(ts *testServer) []string {
	paths := []string{ts.srv.spill}
	if ts.srv.files.Data() != "" {
		paths = append(paths, ts.srv.files.Data())
	}
	if ts.data != "" {
		paths = append(paths, ts.data)
	}
	if ts.srv.cfg.DBPath != "" {
		paths = append(paths, ts.srv.cfg.DBPath)
	}
	if wd, err := os.Getwd(); err == nil {
		paths = append(paths, wd)
	}
	return paths
}

// mustRefuse runs sql (simple protocol) and wants SQLSTATE 42501 with a
// message containing names, and no server path in the message.
func mustRefuse(t *testing.T, ts *testServer, c *pgx.Conn, sql, names string) {
	t.Helper()
	_, err := c.Exec(context.Background(), sql, pgx.QueryExecModeSimpleProtocol)
	var pe *pgconn.PgError
	if !errors.As(err, &pe) {
		t.Errorf("%s: got %v, want a refusal", sql, err)
		return
	}
	if pe.Code != stateInsufficientPriv || !strings.Contains(pe.Message, names) {
		t.Errorf("%s: got %s %q, want 42501 naming %q", sql, pe.Code, pe.Message, names)
	}
	noServerPath(t, ts, sql, pe)
}

func noServerPath(t *testing.T, ts *testServer, sql string, pe *pgconn.PgError) {
	t.Helper()
	for _, p := range serverPaths(ts) {
		if strings.Contains(pe.Message, p) || strings.Contains(pe.Detail, p) {
			t.Errorf("%s: the message shows the server path %s: %q %q", sql, p, pe.Message, pe.Detail)
		}
	}
}

// servesUser checks that the server answers a fresh session of user.
func servesUser(t *testing.T, ts *testServer, user string) {
	t.Helper()
	c, err := pgx.Connect(context.Background(), ts.url(user, attackUsers.Users[user]))
	if err != nil {
		t.Fatalf("the server no longer accepts %s: %v", user, err)
	}
	defer c.Close(context.Background())
	var n int
	if err := c.QueryRow(context.Background(), "SELECT 41 + 1").Scan(&n); err != nil || n != 42 {
		t.Fatalf("the server no longer serves %s: %d %v", user, n, err)
	}
}

// TestConfigurationProceduresRefused: logging, profiling, checkpoint and
// cache procedures and pragmas, SET GLOBAL and the query log are refused;
// had enable_logging passed, ben's SQL text would be readable by ana and
// every statement of everyone would fail once the log file is unwritable.
func TestConfigurationProceduresRefused(t *testing.T) {
	ts := startServer(t, attackConfig(Config{}))
	ana, ben := connectAs(t, ts, "ana"), connectAs(t, ts, "ben")
	for _, q := range []struct{ sql, names string }{
		{"CALL enable_logging('QueryLog', storage := 'file', storage_path := '/proc/self/nowhere')", "enable_logging"},
		{"CALL enable_logging()", "enable_logging"},
		{"SELECT * FROM enable_logging()", "enable_logging"},
		{"CALL disable_logging()", "disable_logging"},
		{"CALL truncate_duckdb_logs()", "truncate_duckdb_logs"},
		{"CALL enable_profiling()", "enable_profiling"},
		{"PRAGMA enable_profiling", "enable_profiling"},
		{"PRAGMA disable_checkpoint_on_shutdown", "disable_checkpoint_on_shutdown"},
		{"PRAGMA disable_object_cache", "disable_object_cache"},
		{"PRAGMA threads = 1", "threads"},
		{"CHECKPOINT", "CHECKPOINT"},
		{"CALL force_checkpoint()", "force_checkpoint"},
		{"SET GLOBAL memory_limit = '100TB'", "GLOBAL"},
		{"SET memory_limit = '100TB'", "SET"},
		{"SELECT * FROM duckdb_logs", "duckdb_logs"},
		{"SELECT * FROM duckdb_logs_parsed('QueryLog')", "duckdb_logs_parsed"},
		{"SELECT * FROM duckdb_settings()", "duckdb_settings"},
		{"SELECT * FROM query('SELECT * FROM duckdb_logs')", "query"},
		{"SELECT * FROM json_execute_serialized_sql(json_serialize_sql('SELECT 1'))", "json_execute_serialized_sql"},
		{"PREPARE p AS SELECT * FROM duckdb_logs", "duckdb_logs"},
		{"PREPARE p AS SELECT 1", "PREPARE"},
		{"INSTALL httpfs", "INSTALL"},
		{"LOAD httpfs", "LOAD"},
	} {
		mustRefuse(t, ts, ana, q.sql, q.names)
	}
	var n int
	if err := ben.QueryRow(context.Background(), "SELECT count(*) FROM range(10)").Scan(&n); err != nil || n != 10 {
		t.Errorf("ben after ana's attempts: %d %v", n, err)
	}
	ben.Close(context.Background())
	ana.Close(context.Background())
	servesUser(t, ts, "ben")
}

// TestSpillFilesOutOfReach: ben's query spills to DuckDB's temporary
// directory; ana tries to list, read and overwrite the spill files by
// every path and function (overwriting one crashed the server when ben
// read his table). Everything is refused, and ben's rows come back whole.
func TestSpillFilesOutOfReach(t *testing.T) {
	ts := startServer(t, attackConfig(Config{MemoryLimit: "64MB"}))
	ctx := context.Background()
	ana, ben := connectAs(t, ts, "ana"), connectAs(t, ts, "ben")
	if _, err := ben.Exec(ctx, "CREATE TEMP TABLE bens AS SELECT range AS i, 'ben-secret-' || md5(range::VARCHAR) AS s FROM range(1500000)"); err != nil {
		t.Fatal(err)
	}
	spill := ts.srv.spill
	spilled, _ := filepath.Glob(filepath.Join(spill, "*"))
	if within(spill, ts.data) || within(ts.data, spill) {
		t.Fatalf("the spill directory %s and --data %s overlap", spill, ts.data)
	}
	rel, _ := filepath.Rel(ts.data, spill)
	target := filepath.Join(spill, "x.tmp")
	if len(spilled) > 0 {
		target = spilled[0]
	}
	relTarget, _ := filepath.Rel(ts.data, target)
	for _, q := range []string{
		"SELECT * FROM glob('" + spill + "/*')",
		"SELECT * FROM glob('" + rel + "/*')",
		"SELECT * FROM read_blob('" + spill + "/*')",
		"SELECT * FROM read_text('" + rel + "/*')",
		"SELECT * FROM read_blob('" + target + "')",
		"SELECT * FROM read_csv('" + relTarget + "')",
		"SELECT * FROM '" + relTarget + "'",
		"COPY (SELECT 'junk') TO '" + target + "'",
		"COPY (SELECT 'junk') TO '" + relTarget + "'",
		"SELECT * FROM read_blob('" + filepath.Join(ts.data, rel, "*") + "')",
	} {
		mustRefuse(t, ts, ana, q, "")
	}
	mustRefuse(t, ts, ana, "SELECT * FROM duckdb_temporary_files()", "duckdb_temporary_files")
	// A symbolic link inside --data that points at the spill directory
	// (an operator's mistake) does not open it: paths are checked after
	// their links are resolved.
	if err := os.Symlink(spill, filepath.Join(ts.data, "spill-link")); err == nil {
		mustRefuse(t, ts, ana, "SELECT * FROM read_blob('spill-link/*')", "outside the data directory")
		mustRefuse(t, ts, ana, "SELECT * FROM glob('spill-link/*')", "outside the data directory")
	}
	var n int64
	var secrets int64
	if err := ben.QueryRow(ctx, "SELECT count(*), count(*) FILTER (WHERE s LIKE 'ben-secret-%') FROM bens").Scan(&n, &secrets); err != nil || n != 1500000 || secrets != n {
		t.Errorf("ben's spilled table after ana's attempts: %d rows, %d intact, %v", n, secrets, err)
	}
	t.Logf("spill files while ben's table was held: %d", len(spilled))
	servesUser(t, ts, "ben")
}

// TestDatabaseFileOutOfReach: no client reads or writes the --db file or
// its write-ahead log, by absolute or relative path, wherever it lies; a
// --db inside --data is refused at start-up.
func TestDatabaseFileOutOfReach(t *testing.T) {
	dir := t.TempDir()
	data := filepath.Join(dir, "data")
	os.Mkdir(data, 0o755)
	dbPath := filepath.Join(dir, "served.duckdb")
	ts := startServer(t, attackConfig(Config{DataDir: data, DBPath: dbPath}))
	ana := connectAs(t, ts, "ana")
	if _, err := ana.Exec(context.Background(), "CREATE TABLE kept AS SELECT 1 AS x"); err != nil {
		t.Fatal(err)
	}
	for _, p := range []string{dbPath, dbPath + ".wal", "../served.duckdb", "../served.duckdb.wal"} {
		mustRefuse(t, ts, ana, "SELECT * FROM read_blob('"+p+"')", "")
		mustRefuse(t, ts, ana, "SELECT * FROM read_duckdb('"+p+"', table_name := 'kept')", "")
		mustRefuse(t, ts, ana, "COPY (SELECT 'junk') TO '"+p+"'", "")
		mustRefuse(t, ts, ana, "SELECT * FROM '"+p+"'", "")
	}
	servesUser(t, ts, "ben")

	inside := Config{Addr: "127.0.0.1:0", Auth: "trust", DataDir: data, DBPath: filepath.Join(data, "inside.duckdb")}
	if _, err := New(context.Background(), inside, ts.srv.log); err == nil || !strings.Contains(err.Error(), "inside --data") {
		t.Errorf("--db inside --data: %v, want a refusal at start-up", err)
	}
	if _, err := os.Stat(filepath.Join(data, "inside.duckdb")); err == nil {
		t.Error("the refused database file was created")
	}
}

// TestPlumbFunctionsCannotBeShadowed: ana creates objects named as plumb's
// functions, as DuckDB's, or with plumb's prefix, in the shared catalogue
// and in her own; all are refused, and ben's diagnose, forecast and
// difference return what they returned before. A database file that
// already holds such a macro (made outside plumb serve) changes nothing
// either: plumb's SQL calls its functions by their qualified names.
func TestPlumbFunctionsCannotBeShadowed(t *testing.T) {
	dir := t.TempDir()
	data := filepath.Join(dir, "data")
	os.Mkdir(data, 0o755)
	dbPath := filepath.Join(dir, "shared.duckdb")
	{ // a database file someone prepared with a trap in it
		db, err := udf.Open(context.Background(), udf.Options{Path: dbPath})
		if err != nil {
			t.Fatal(err)
		}
		for _, q := range []string{
			"CREATE MACRO plumb_difference(a, b, c) AS [42.0]",
			"CREATE MACRO plumb_diagnose_sql(a, b, c, d, e, f, g, h, i) AS 'SELECT 1 AS hijacked'",
		} {
			if _, err := db.Exec(q); err != nil {
				t.Fatal(err)
			}
		}
		db.Close()
	}
	ts := startServer(t, attackConfig(Config{DataDir: data, DBPath: dbPath}))
	ctx := context.Background()
	ana, ben := connectAs(t, ts, "ana"), connectAs(t, ts, "ben")
	if _, err := ben.Exec(ctx, "CREATE TABLE series AS SELECT 'a' AS g, d AS t, sin(d / 3.0) + d / 50.0 AS v FROM range(80) r(d)"); err != nil {
		t.Fatal(err)
	}
	results := func() []string {
		var out []string
		for _, q := range []string{
			"SELECT difference([1.0, 2.0, 4.0])::VARCHAR",
			"SELECT string_agg(g || ':' || status || ':' || coalesce(round(adf_statistic, 6)::VARCHAR, '-'), ',') FROM diagnose('series', by := 'g', at := 't', value := 'v')",
			"SELECT string_agg(step || ':' || status || ':' || coalesce(round(forecast, 6)::VARCHAR, '-'), ',' ORDER BY step) FROM forecast('series', by := 'g', at := 't', value := 'v', horizon := 3)",
			"SELECT format('{}-{}', 1, 2)",
		} {
			var s string
			if err := ben.QueryRow(ctx, q).Scan(&s); err != nil {
				t.Fatalf("%s: %v", q, err)
			}
			out = append(out, s)
		}
		return out
	}
	before := results()
	if before[0] != "[1.0, 2.0]" {
		t.Errorf("difference with a plumb_difference macro in the database file: %s, want [1.0, 2.0]", before[0])
	}
	if strings.Contains(before[1], "hijacked") || !strings.HasPrefix(before[1], "a:") {
		t.Errorf("diagnose with a plumb_diagnose_sql macro in the database file: %s", before[1])
	}
	for _, q := range []struct{ sql, names string }{
		{"CREATE MACRO plumb_diagnose_sql(a, b, c, d, e, f, g, h, i) AS 'SELECT 1 AS hijacked'", "plumb_diagnose_sql"},
		{"CREATE OR REPLACE MACRO diagnose(source, \"by\", \"at\", value) AS TABLE SELECT 1 AS hijacked", "diagnose"},
		{"CREATE OR REPLACE TEMP MACRO diagnose(a) AS TABLE SELECT 1 AS hijacked", "diagnose"},
		{"CREATE MACRO plumb_forecast(a, b) AS NULL", "plumb_forecast"},
		{"CREATE MACRO format(a, b, c) AS 'hijacked'", "format"},
		{"CREATE MACRO list_filter(a, b) AS []", "list_filter"},
		{"CREATE TABLE plumb_series AS SELECT 1", "plumb_series"},
		{"CREATE VIEW forecast AS SELECT 1", "forecast"},
		{"ALTER TABLE series RENAME TO plumb_input", "plumb_input"},
		{"DROP MACRO plumb_diagnose_sql", "plumb_diagnose_sql"},
		{"DROP MACRO TABLE diagnose", "diagnose"},
	} {
		mustRefuse(t, ts, ana, q.sql, q.names)
	}
	if after := results(); fmt.Sprint(after) != fmt.Sprint(before) {
		t.Errorf("ben's results changed after ana's attempts:\nbefore %v\nafter  %v", before, after)
	}
	// What ana may create, she may: a macro of a name of her own.
	if _, err := ana.Exec(ctx, "CREATE MACRO ana_scale(x) AS x * 2"); err != nil {
		t.Errorf("a macro of a name of ana's own: %v", err)
	}
}

// TestAttachRefused: an attached database is every session's in DuckDB
// (ana's ATTACH stayed after she left, and ben read and detached it), so
// plumb serve refuses ATTACH, DETACH and USE; ben sees no database of
// ana's. read_duckdb reads a DuckDB file under --data within one query.
func TestAttachRefused(t *testing.T) {
	ts := startServer(t, attackConfig(Config{}))
	ctx := context.Background()
	ana := connectAs(t, ts, "ana")
	mustRefuse(t, ts, ana, "ATTACH ':memory:' AS a_db", "ATTACH")
	mustRefuse(t, ts, ana, "ATTACH 'mine.duckdb' AS a_file", "ATTACH")
	mustRefuse(t, ts, ana, "USE memory", "USE")
	mustRefuse(t, ts, ana, "DETACH memory", "DETACH")
	ana.Close(ctx)
	ben := connectAs(t, ts, "ben")
	var names []string
	rows, err := ben.Query(ctx, "SELECT database_name FROM duckdb_databases() WHERE NOT internal ORDER BY 1")
	if err != nil {
		t.Fatal(err)
	}
	for rows.Next() {
		var n string
		rows.Scan(&n)
		names = append(names, n)
	}
	if fmt.Sprint(names) != "[memory]" {
		t.Errorf("ben sees the databases %v, want only [memory]", names)
	}
	if _, err := ben.Exec(ctx, "COPY (SELECT 7 AS x) TO 'seven.parquet'"); err != nil {
		t.Fatal(err)
	}
	var x int
	if err := ben.QueryRow(ctx, "SELECT x FROM 'seven.parquet'").Scan(&x); err != nil || x != 7 {
		t.Errorf("reading a file under --data: %d %v", x, err)
	}
}

// TestReadRole: a user marked read in the users file queries (SELECT,
// plumb's table functions, COPY TO STDOUT) and cannot change the shared
// database or any file at all.
func TestReadRole(t *testing.T) {
	ts := startServer(t, attackConfig(Config{}))
	ctx := context.Background()
	ana, cy := connectAs(t, ts, "ana"), connectAs(t, ts, "cy")
	if _, err := ana.Exec(ctx, "CREATE TABLE shared AS SELECT 'a' AS g, d AS t, d * 1.0 AS v FROM range(30) r(d)"); err != nil {
		t.Fatal(err)
	}
	for _, q := range []struct{ sql, names string }{
		{"CREATE TABLE mine (x INT)", "CREATE"},
		{"CREATE TEMP TABLE mine (x INT)", "CREATE"},
		{"CREATE MACRO m(x) AS x", "CREATE"},
		{"INSERT INTO shared VALUES ('z', 99, 0)", "INSERT"},
		{"UPDATE shared SET v = 0", "UPDATE"},
		{"DELETE FROM shared", "DELETE"},
		{"DROP TABLE shared", "DROP"},
		{"ALTER TABLE shared RENAME TO gone", "ALTER"},
		{"COPY shared TO 'out.csv'", "read"},
		{"COPY shared FROM 'in.csv'", "COPY"},
		{"EXPORT DATABASE 'dump'", "EXPORT"},
		{"EXPLAIN ANALYZE DELETE FROM shared", "DELETE"},
		{"WITH x AS (SELECT 1) INSERT INTO shared SELECT 'y', 1, 1", "INSERT"},
	} {
		mustRefuse(t, ts, cy, q.sql, q.names)
	}
	if _, err := cy.PgConn().CopyFrom(ctx, strings.NewReader("q\t1\t1\n"), "COPY shared FROM STDIN"); sqlStateOf(err) != stateInsufficientPriv {
		t.Errorf("COPY FROM STDIN by a read user: %v, want 42501", err)
	}
	var n int
	if err := cy.QueryRow(ctx, "SELECT count(*) FROM shared").Scan(&n); err != nil || n != 30 {
		t.Errorf("the read user's SELECT: %d %v", n, err)
	}
	if err := cy.QueryRow(ctx, "SELECT count(*) FROM differenced('shared', by := 'g', at := 't', value := 'v')").Scan(&n); err != nil || n != 30 {
		t.Errorf("the read user's table function: %d %v", n, err)
	}
	var out strings.Builder
	if _, err := cy.PgConn().CopyTo(ctx, &out, "COPY (SELECT g FROM shared LIMIT 2) TO STDOUT"); err != nil || out.String() != "a\na\n" {
		t.Errorf("the read user's COPY TO STDOUT: %q %v", out.String(), err)
	}
	for _, f := range []string{"out.csv", "dump"} {
		if _, err := os.Stat(filepath.Join(ts.data, f)); err == nil {
			t.Errorf("the read user wrote %s", f)
		}
	}
	if err := ana.QueryRow(ctx, "SELECT count(*) FROM shared").Scan(&n); err != nil || n != 30 {
		t.Errorf("the shared table after the read user: %d rows %v", n, err)
	}
	if _, err := ana.Exec(ctx, "INSERT INTO shared VALUES ('b', 0, 0)"); err != nil {
		t.Errorf("a write user's INSERT: %v", err)
	}
}

// TestReadOnlyRefusesFileWrites: with --read-only no client writes a file.
func TestReadOnlyRefusesFileWrites(t *testing.T) {
	dir := t.TempDir()
	data := filepath.Join(dir, "data")
	os.Mkdir(data, 0o755)
	dbPath := filepath.Join(dir, "ro.duckdb")
	db, err := udf.Open(context.Background(), udf.Options{Path: dbPath})
	if err != nil {
		t.Fatal(err)
	}
	db.Exec("CREATE TABLE t AS SELECT 1 AS x")
	db.Close()
	ts := startServer(t, attackConfig(Config{DataDir: data, DBPath: dbPath, ReadOnly: true}))
	ana := connectAs(t, ts, "ana")
	mustRefuse(t, ts, ana, "COPY t TO 'out.csv'", "read-only")
	mustRefuse(t, ts, ana, "COPY (SELECT 1) TO 'out.parquet' (FORMAT parquet)", "read-only")
	mustRefuse(t, ts, ana, "EXPORT DATABASE 'dump'", "read-only")
	entries, _ := os.ReadDir(data)
	if len(entries) != 0 {
		t.Errorf("files written under --data of a read-only server: %v", entries)
	}
	var out strings.Builder
	if _, err := ana.PgConn().CopyTo(context.Background(), &out, "COPY t TO STDOUT"); err != nil || out.String() != "1\n" {
		t.Errorf("COPY TO STDOUT on a read-only server: %q %v", out.String(), err)
	}
}

// TestSourcesResolveUnderData: every plumb table function that takes a
// source, as udf registers them, reads a relative file source under
// --data and refuses one outside it in plumb's words.
func TestSourcesResolveUnderData(t *testing.T) {
	ts := startServer(t, attackConfig(Config{}))
	ctx := context.Background()
	ana := connectAs(t, ts, "ana")
	for _, q := range []string{
		"COPY (SELECT 'a' AS g, d AS t, sin(d / 4.0) + d / 40.0 AS v FROM range(60) r(d)) TO 'series.parquet'",
		"COPY (FROM stationarize_recipes('series.parquet', by := 'g', at := 't', value := 'v')) TO 'recipes.parquet'",
		"COPY (FROM diagnose('series.parquet', by := 'g', at := 't', value := 'v', shard := 0, shards := 1)) TO 'part.parquet'",
		"COPY (SELECT 'a' AS g, 60 + d AS t, 0.0 AS v FROM range(3) r(d)) TO 'ahead.parquet'",
	} {
		if _, err := ana.Exec(ctx, q); err != nil {
			t.Fatalf("%s: %v", q, err)
		}
	}
	calls := map[string]string{ // %s is where the sources go
		"diagnose":             "diagnose(%s, by := 'g', at := 't', value := 'v')",
		"differenced":          "differenced(%s, by := 'g', at := 't', value := 'v')",
		"rolling_dispersion":   "rolling_dispersion(%s, by := 'g', at := 't', value := 'v', width := 5)",
		"stationarize":         "stationarize(%s, by := 'g', at := 't', value := 'v')",
		"stationarize_recipes": "stationarize_recipes(%s, by := 'g', at := 't', value := 'v')",
		"forecast":             "forecast(%s, by := 'g', at := 't', value := 'v', horizon := 2)",
		"forecast_models":      "forecast_models(%s, by := 'g', at := 't', value := 'v', horizon := 2)",
		"combine_diagnoses":    "combine_diagnoses(%s)",
		"restore":              "restore(%s, by := 'g', at := 't', value := 'v')",
	}
	files := map[string][]string{"combine_diagnoses": {"'part.parquet'"}, "restore": {"'ahead.parquet'", "'recipes.parquet'"}}
	var names []string
	for name := range udf.SourceArguments() {
		names = append(names, name)
	}
	sort.Strings(names)
	for _, name := range names {
		call, ok := calls[name]
		if !ok {
			t.Errorf("%s takes a source and has no case here: add one", name)
			continue
		}
		srcs := files[name]
		if srcs == nil {
			srcs = []string{"'series.parquet'"}
		}
		var n int
		if err := ana.QueryRow(ctx, "SELECT count(*) FROM "+fmt.Sprintf(call, strings.Join(srcs, ", "))).Scan(&n); err != nil || n == 0 {
			t.Errorf("%s with a relative source under --data: %d rows, %v", name, n, err)
		}
		outside := append([]string{"'../series.parquet'"}, srcs[1:]...)
		if len(srcs) > 1 { // the second source is checked too
			mustRefuse(t, ts, ana, "SELECT count(*) FROM "+fmt.Sprintf(call, srcs[0]+", '../series.parquet'"), "outside the data directory")
		}
		mustRefuse(t, ts, ana, "SELECT count(*) FROM "+fmt.Sprintf(call, strings.Join(outside, ", ")), `path "../series.parquet" is outside the data directory`)
		// bound as a parameter, too
		_, err := ana.Exec(ctx, "SELECT count(*) FROM "+fmt.Sprintf(call, strings.Join(append([]string{"$1"}, srcs[1:]...), ", ")), "/etc/x.parquet")
		if sqlStateOf(err) != stateInsufficientPriv {
			t.Errorf("%s with a bound source outside --data: %v, want 42501", name, err)
		}
	}
	// a parenthesised SELECT as the source is a statement of its own
	mustRefuse(t, ts, ana, "FROM diagnose('(FROM duckdb_logs)', by := 'g', at := 't', value := 'v')", "duckdb_logs")
	mustRefuse(t, ts, ana, "FROM diagnose('(FROM ''../x.csv'')', by := 'g', at := 't', value := 'v')", "outside the data directory")
	_, err := ana.Exec(ctx, "FROM diagnose($1, by := 'g', at := 't', value := 'v')", "(SELECT * FROM glob('/etc/*'))")
	if sqlStateOf(err) != stateInsufficientPriv {
		t.Errorf("a bound parenthesised source reading outside --data: %v, want 42501", err)
	}
	var n string // a table function's result has no type before its arguments are bound: pgx reads text
	if err := ana.QueryRow(ctx, "SELECT count(*) FROM diagnose($1, by := 'g', at := 't', value := 'v')", "(FROM 'series.parquet')").Scan(&n); err != nil || n != "1" {
		t.Errorf("a bound parenthesised source under --data: %s %v", n, err)
	}
}

// TestPathErrorsInPlumbsWords: a path outside --data says so, in the
// client's own words, and no error message shows a server path.
func TestPathErrorsInPlumbsWords(t *testing.T) {
	ts := startServer(t, attackConfig(Config{}))
	ctx := context.Background()
	ana := connectAs(t, ts, "ana")
	mustRefuse(t, ts, ana, "FROM '../README.md'", `path "../README.md" is outside the data directory`)
	mustRefuse(t, ts, ana, "SELECT * FROM read_csv('/etc/passwd')", `path "/etc/passwd" is outside the data directory`)
	for _, q := range []string{
		"FROM 'missing.csv'",
		"FROM read_parquet('missing/*.parquet')",
		"FROM diagnose('missing.parquet', by := 'g', at := 't', value := 'v')",
		"COPY (SELECT 1) TO 'no/such/dir/x.csv'",
		"FROM read_csv($1)",
	} {
		var err error
		if strings.Contains(q, "$1") {
			_, err = ana.Exec(ctx, q, "missing-bound.csv")
		} else {
			_, err = ana.Exec(ctx, q, pgx.QueryExecModeSimpleProtocol)
		}
		var pe *pgconn.PgError
		if !errors.As(err, &pe) {
			t.Errorf("%s: %v, want an error", q, err)
			continue
		}
		noServerPath(t, ts, q, pe)
	}
}

// within reports whether path is dir or lies under it.
func within(path, dir string) bool {
	rel, err := filepath.Rel(dir, path)
	return err == nil && rel != ".." && !strings.HasPrefix(rel, "../")
}
