package pgserver

import (
	"context"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgconn"
)

// testServer runs a server on a loopback port for one test.
type testServer struct {
	srv  *Server
	addr string
	data string
}

func startServer(t *testing.T, cfg Config) *testServer {
	t.Helper()
	return startServerLogging(t, cfg, nil)
}

// startServerLogging is startServer with the server's log going to log.
func startServerLogging(t *testing.T, cfg Config, log *slog.Logger) *testServer {
	t.Helper()
	if cfg.Addr == "" {
		cfg.Addr = "127.0.0.1:0"
	}
	if cfg.DataDir == "" {
		cfg.DataDir = t.TempDir()
	}
	if cfg.Auth == "" {
		cfg.Auth = "scram"
		cfg.Users = map[string]string{"ana": "s3cret", "ben": "pa55"}
	}
	cfg.FailedLoginDelay = 10 * time.Millisecond
	if cfg.Grace == 0 {
		cfg.Grace = 2 * time.Second
	}
	if log == nil {
		log = slog.New(slog.NewTextHandler(io.Discard, nil))
	}
	if os.Getenv("PLUMB_SERVER_LOG") != "" {
		log = slog.New(slog.NewTextHandler(os.Stderr, nil))
	}
	srv, err := New(context.Background(), cfg, log)
	if err != nil {
		t.Fatal(err)
	}
	ln, err := net.Listen("tcp", cfg.Addr)
	if err != nil {
		t.Fatal(err)
	}
	go srv.Serve(ln)
	t.Cleanup(func() { srv.Shutdown() })
	return &testServer{srv: srv, addr: ln.Addr().String(), data: cfg.DataDir}
}

func (ts *testServer) url(user, password string) string {
	host, port, _ := net.SplitHostPort(ts.addr)
	return fmt.Sprintf("postgres://%s:%s@%s:%s/plumb?sslmode=disable", user, password, host, port)
}

func (ts *testServer) connect(t *testing.T) *pgx.Conn {
	t.Helper()
	c, err := pgx.Connect(context.Background(), ts.url("ana", "s3cret"))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { c.Close(context.Background()) })
	return c
}

func sqlStateOf(err error) string {
	var pe *pgconn.PgError
	if errors.As(err, &pe) {
		return pe.Code
	}
	return ""
}

func TestPgxSimpleAndExtended(t *testing.T) {
	ts := startServer(t, Config{})
	c := ts.connect(t)
	ctx := context.Background()

	// Extended protocol (pgx's default), results decoded in binary by pgx.
	var (
		i        int32
		big      int64
		f        float64
		s        string
		b        bool
		d        time.Time
		ts1      time.Time
		list     []float64
		nothing  *string
		numeric  float64
		jsonText string
	)
	err := c.QueryRow(ctx, `SELECT 42::INTEGER, 9000000000::BIGINT, 2.5::DOUBLE, 'plumb', true, DATE '2025-03-04',
		TIMESTAMP '2025-03-04 05:06:07.5', [1.5, NULL, 3]::DOUBLE[], NULL::VARCHAR, 12.345::DECIMAL(10,3),
		{'k': 1, 'v': [1, 2]}`).Scan(&i, &big, &f, &s, &b, &d, &ts1, &list, &nothing, &numeric, &jsonText)
	if err == nil {
		// a NULL inside a float8[] cannot scan into []float64; pgx reports it
		t.Fatalf("expected pgx to refuse a NULL element in []float64")
	}
	err = c.QueryRow(ctx, `SELECT 42::INTEGER, 9000000000::BIGINT, 2.5::DOUBLE, 'plumb', true, DATE '2025-03-04',
		TIMESTAMP '2025-03-04 05:06:07.5', [1.5, 2, 3]::DOUBLE[], NULL::VARCHAR, 12.345::DECIMAL(10,3),
		{'k': 1, 'v': [1, 2]}::VARCHAR`).Scan(&i, &big, &f, &s, &b, &d, &ts1, &list, &nothing, &numeric, &jsonText)
	if err != nil {
		t.Fatal(err)
	}
	if i != 42 || big != 9000000000 || f != 2.5 || s != "plumb" || !b || d.Format("2006-01-02") != "2025-03-04" ||
		ts1.Format("2006-01-02 15:04:05.0") != "2025-03-04 05:06:07.5" || len(list) != 3 || list[2] != 3 || nothing != nil || numeric != 12.345 {
		t.Errorf("got %v %v %v %v %v %v %v %v %v %v", i, big, f, s, b, d, ts1, list, nothing, numeric)
	}
	// Binary parameters of several types.
	var got string
	err = c.QueryRow(ctx, `SELECT $1::BIGINT + 1 || ' ' || ($2::DOUBLE * 2) || ' ' || $3::VARCHAR || ' ' || $4::DATE || ' ' || $5::BOOLEAN`,
		int64(41), 1.25, "x", time.Date(2024, 2, 29, 0, 0, 0, 0, time.UTC), false).Scan(&got)
	if err != nil || got != "42 2.5 x 2024-02-29 false" {
		t.Errorf("parameters: %q %v", got, err)
	}
	// Simple protocol, several statements, a TEMP table kept by the session.
	if _, err := c.Exec(ctx, "CREATE TEMP TABLE tt AS SELECT range AS v FROM range(5); INSERT INTO tt VALUES (10)", pgx.QueryExecModeSimpleProtocol); err != nil {
		t.Fatal(err)
	}
	var sum int64
	if err := c.QueryRow(ctx, "SELECT sum(v) FROM tt", pgx.QueryExecModeSimpleProtocol).Scan(&sum); err != nil || sum != 20 {
		t.Errorf("sum %d %v", sum, err)
	}
	// plumb's functions through the proxy.
	var diffs []float64
	if err := c.QueryRow(ctx, "SELECT difference([1, 4, 9, 16])").Scan(&diffs); err != nil || fmt.Sprint(diffs) != "[3 5 7]" {
		t.Errorf("difference: %v %v", diffs, err)
	}
	// Errors carry SQLSTATEs and leave the session usable.
	for _, test := range []struct{ sql, code string }{
		{"SELEC 1", stateSyntax},
		{"SELECT * FROM no_such_table", stateUndefinedTable},
		{"SELECT no_such_column FROM tt", stateUndefinedColumn},
		{"SELECT 'abc'::INTEGER", stateInvalidText},
	} {
		_, err := c.Exec(ctx, test.sql)
		if code := sqlStateOf(err); code != test.code {
			t.Errorf("%s: SQLSTATE %q (%v), want %s", test.sql, code, err, test.code)
		}
	}
	// Transactions: the status follows BEGIN, an error and ROLLBACK.
	tx, err := c.Begin(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := tx.Exec(ctx, "INSERT INTO tt VALUES (100)"); err != nil {
		t.Fatal(err)
	}
	if err := tx.Rollback(ctx); err != nil {
		t.Fatal(err)
	}
	if err := c.QueryRow(ctx, "SELECT sum(v) FROM tt").Scan(&sum); err != nil || sum != 20 {
		t.Errorf("after rollback: %d %v", sum, err)
	}
	// Client parameters.
	if _, err := c.Exec(ctx, "SET application_name = 'notebook'"); err != nil {
		t.Fatal(err)
	}
	if err := c.QueryRow(ctx, "SHOW application_name").Scan(&got); err != nil || got != "notebook" {
		t.Errorf("SHOW application_name: %q %v", got, err)
	}
	if err := c.QueryRow(ctx, "SELECT version()").Scan(&got); err != nil || !strings.HasPrefix(got, "PostgreSQL 15.0 (plumb, DuckDB v1.") {
		t.Errorf("version(): %q %v", got, err)
	}
}

func TestCancelAndTimeout(t *testing.T) {
	ts := startServer(t, Config{QueryTimeout: 1500 * time.Millisecond})
	c := ts.connect(t)
	slow := "SELECT count(*) FROM range(1000000000) a, range(10) b WHERE a.range * b.range = -1"
	ctx, cancel := context.WithTimeout(context.Background(), 200*time.Millisecond)
	defer cancel()
	start := time.Now()
	_, err := c.Exec(ctx, slow)
	if err == nil {
		t.Fatal("the slow query finished")
	}
	if time.Since(start) > 1200*time.Millisecond {
		t.Errorf("the cancel took %v", time.Since(start))
	}
	// pgx closes a connection whose query it cancelled; a new one works.
	c2 := ts.connect(t)
	start = time.Now()
	_, err = c2.Exec(context.Background(), slow)
	if code := sqlStateOf(err); code != stateQueryCanceled || !strings.Contains(err.Error(), "statement timeout") {
		t.Errorf("timeout: %v (SQLSTATE %s)", err, code)
	}
	if d := time.Since(start); d < time.Second || d > 5*time.Second {
		t.Errorf("the timeout struck after %v, want about 1.5 s", d)
	}
	var one int
	if err := c2.QueryRow(context.Background(), "SELECT 1").Scan(&one); err != nil || one != 1 {
		t.Errorf("after the timeout: %v", err)
	}
}

func TestAuthentication(t *testing.T) {
	ts := startServer(t, Config{})
	ctx := context.Background()
	for _, test := range []struct{ user, password string }{
		{"ana", "wrong"},
		{"nobody", "s3cret"},
		{"ana", ""},
	} {
		_, err := pgx.Connect(ctx, ts.url(test.user, test.password))
		if code := sqlStateOf(err); code != stateInvalidPassword && code != stateInvalidAuthSpec {
			t.Errorf("%s/%q: %v (SQLSTATE %q), want 28P01 or 28000", test.user, test.password, err, code)
		}
	}
	c, err := pgx.Connect(ctx, ts.url("ben", "pa55"))
	if err != nil {
		t.Fatalf("ben: %v", err)
	}
	c.Close(ctx)
	// trust is refused off loopback.
	cfg := Config{Addr: "0.0.0.0:5555", Auth: "trust"}
	if err := cfg.Check(); err == nil || !strings.Contains(err.Error(), "loopback") {
		t.Errorf("trust on 0.0.0.0: %v", err)
	}
	cfg = Config{Addr: "127.0.0.1:5555", Auth: "scram"}
	if err := cfg.Check(); err == nil || !strings.Contains(err.Error(), "no users") {
		t.Errorf("scram without users: %v", err)
	}
}

func TestSandbox(t *testing.T) {
	ts := startServer(t, Config{})
	os.WriteFile(filepath.Join(ts.data, "ok.csv"), []byte("a,b\n1,2\n"), 0o644)
	c := ts.connect(t)
	ctx := context.Background()
	for _, q := range []string{
		"SELECT * FROM read_csv('/etc/passwd')",
		"COPY (SELECT 1) TO '/tmp/plumb_sandbox_test.csv'",
		"INSTALL httpfs",
		"LOAD httpfs",
		"SET enable_external_access = true",
		"SET lock_configuration = false",
		"ATTACH '/tmp/plumb_other.duckdb'",
		"SELECT * FROM read_csv('" + ts.data + "/../../etc/passwd')",
		// relative paths resolve against --data, and may not climb out of it
		"SELECT * FROM read_csv('../../../../../../etc/passwd')",
		"SELECT * FROM '../../../../../../etc/passwd.csv'",
		"COPY (SELECT 1) TO '../../../../../../tmp/plumb_sandbox_test.csv'",
	} {
		if _, err := c.Exec(ctx, q); err == nil {
			t.Errorf("%s: allowed", q)
		} else if code := sqlStateOf(err); code != stateInsufficientPriv && code != stateIO {
			t.Logf("%s: refused with SQLSTATE %s: %v", q, code, err)
		}
	}
	if _, err := os.Stat("/tmp/plumb_sandbox_test.csv"); err == nil {
		t.Error("a file was written outside the data directory")
	}
	var n int64
	if err := c.QueryRow(ctx, "SELECT count(*) FROM read_csv('"+filepath.Join(ts.data, "ok.csv")+"')").Scan(&n); err != nil || n != 1 {
		t.Errorf("reading under --data: %d %v", n, err)
	}
	if err := c.QueryRow(ctx, "SELECT count(*) FROM 'ok.csv'").Scan(&n); err != nil || n != 1 {
		t.Errorf("reading a path relative to --data: %d %v", n, err)
	}
	if _, err := c.Exec(ctx, "COPY (SELECT 2 AS y) TO 'relative_out.csv'"); err != nil {
		t.Errorf("writing a path relative to --data: %v", err)
	} else if _, err := os.Stat(filepath.Join(ts.data, "relative_out.csv")); err != nil {
		t.Errorf("COPY TO a relative path did not write under --data: %v", err)
	}
	if _, err := c.Exec(ctx, "COPY (SELECT 1 AS x) TO '"+filepath.Join(ts.data, "out.csv")+"'"); err != nil {
		t.Errorf("writing under --data: %v", err)
	}
}
