package pgserver

import (
	"bytes"
	"context"
	"log/slog"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgproto3"
)

// lockedBuffer collects log lines written from several goroutines.
type lockedBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (l *lockedBuffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *lockedBuffer) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

// TestFailuresAtEveryStep: a statement that fails at Parse, Bind or
// Describe leaves a log line naming the step, and inside a transaction
// block the next ReadyForQuery says failed ('E'), as PostgreSQL's does
// (protocol documentation, "ReadyForQuery"), common practice.
func TestFailuresAtEveryStep(t *testing.T) {
	var logs lockedBuffer
	ts := startServerLogging(t, Config{Auth: "trust"}, slog.New(slog.NewTextHandler(&logs, nil)))
	c, err := rawStartup(ts.addr)
	if err != nil {
		t.Fatal(err)
	}
	defer c.Close()
	c.SetDeadline(time.Now().Add(20 * time.Second))
	fe := pgproto3.NewFrontend(c, c)
	check := func(what string, got []string, want ...string) {
		t.Helper()
		if strings.Join(got, "; ") != strings.Join(want, "; ") {
			t.Errorf("%s:\n got %s\nwant %s", what, strings.Join(got, "; "), strings.Join(want, "; "))
		}
	}
	check("begin", exchange(t, fe, &pgproto3.Query{String: "BEGIN"}), "complete BEGIN", "ready T")
	check("a Parse that fails", exchange(t, fe, &pgproto3.Parse{Query: "SELEC broken"}, &pgproto3.Sync{}), "error "+stateSyntax, "ready E")
	check("rollback", exchange(t, fe, &pgproto3.Query{String: "ROLLBACK"}), "complete ROLLBACK", "ready I")
	check("a Bind with a bad parameter",
		exchange(t, fe, &pgproto3.Parse{Name: "p", Query: "SELECT $1::INTEGER + 1", ParameterOIDs: []uint32{oidInt4}},
			&pgproto3.Bind{PreparedStatement: "p", Parameters: [][]byte{[]byte("4x")}}, &pgproto3.Sync{}),
		"error "+stateInvalidText, "ready I")
	check("a Describe of a statement that is not there",
		exchange(t, fe, &pgproto3.Describe{ObjectType: 'S', Name: "nope"}, &pgproto3.Sync{}), "error 26000", "ready I")
	check("an Execute that fails",
		exchange(t, fe, &pgproto3.Parse{Query: "SELECT 1 / 0::INTEGER > 'x'::INTEGER"}, &pgproto3.Bind{}, &pgproto3.Execute{}, &pgproto3.Sync{}),
		"error "+stateInvalidText, "ready I")
	time.Sleep(50 * time.Millisecond)
	text := logs.String()
	for _, want := range []string{`step=parse sql="SELEC broken"`, `step=bind sql="SELECT $1::INTEGER + 1"`, `step=describe`, `sql="SELECT 1 / 0::INTEGER > 'x'::INTEGER"`} {
		if !strings.Contains(text, want) {
			t.Errorf("the log lacks %q:\n%s", want, text)
		}
	}
	if n := strings.Count(text, "error="); n < 4 {
		t.Errorf("%d failed statements logged, want 4:\n%s", n, text)
	}
}

// TestTransactionStatements: a BEGIN inside a transaction warns and keeps
// it (PostgreSQL's NoticeResponse 25001); SAVEPOINT, RELEASE and ROLLBACK
// TO fail with 0A000 naming DuckDB's lack of savepoints.
func TestTransactionStatements(t *testing.T) {
	_, fe := rawFrontend(t, Config{Auth: "trust"})
	got := exchange(t, fe, &pgproto3.Query{String: "BEGIN; BEGIN"})
	if strings.Join(got, "; ") != "complete BEGIN; *pgproto3.NoticeResponse; complete BEGIN; ready T" {
		t.Errorf("nested BEGIN: %v", got)
	}
	for _, sql := range []string{"SAVEPOINT a", "RELEASE SAVEPOINT a", "ROLLBACK TO SAVEPOINT a"} {
		fe.Send(&pgproto3.Query{String: sql})
		fe.Flush()
		m, _ := fe.Receive()
		e, ok := m.(*pgproto3.ErrorResponse)
		if !ok || e.Code != stateFeatureNotSupport || !strings.Contains(e.Message, "DuckDB has none") {
			t.Errorf("%s: %#v", sql, m)
		}
		fe.Receive() // ReadyForQuery
	}
	if got := exchange(t, fe, &pgproto3.Query{String: "ROLLBACK"}); strings.Join(got, "; ") != "complete ROLLBACK; ready I" {
		t.Errorf("rollback: %v", got)
	}
	got = exchange(t, fe, &pgproto3.Query{String: "COMMIT"})
	if strings.Join(got, "; ") != "*pgproto3.NoticeResponse; complete COMMIT; ready I" {
		t.Errorf("COMMIT outside a transaction: %v", got)
	}
}

// TestCopyFromStdin: pgx's CopyFrom (binary format) of typed rows, inside
// a transaction and on its own; a COPY that fails half-way leaves no row;
// --read-only refuses it.
func TestCopyFromStdin(t *testing.T) {
	ts := startServer(t, Config{})
	c := ts.connect(t)
	ctx := context.Background()
	if _, err := c.Exec(ctx, "CREATE TABLE loaded (i BIGINT, x DOUBLE, s VARCHAR, d DATE, ts TIMESTAMP, b BOOLEAN, u UUID, l DOUBLE[])"); err != nil {
		t.Fatal(err)
	}
	id := [16]byte{0x6b, 0xa7, 0xb8, 0x10, 0x9d, 0xad, 0x11, 0xd1, 0x80, 0xb4, 0, 0xc0, 0x4f, 0xd4, 0x30, 0xc8}
	var rows [][]any
	for i := 0; i < 2500; i++ {
		var s any = "row " + strings.Repeat("é", i%3)
		if i%10 == 0 {
			s = nil
		}
		rows = append(rows, []any{int64(i), float64(i) / 4, s, time.Date(2025, 1, 1+i%28, 0, 0, 0, 0, time.UTC),
			time.Date(2025, 1, 1, 0, 0, i%60, 0, time.UTC), i%2 == 0, id, []float64{float64(i), 0.5}})
	}
	n, err := c.CopyFrom(ctx, pgx.Identifier{"loaded"}, []string{"i", "x", "s", "d", "ts", "b", "u", "l"}, pgx.CopyFromRows(rows))
	if err != nil || n != 2500 {
		t.Fatalf("CopyFrom: %d %v", n, err)
	}
	var count, nulls int64
	var sum float64
	var u string
	var l []float64
	err = c.QueryRow(ctx, "SELECT count(*), count(*) - count(s), sum(x), any_value(u)::VARCHAR, max(l) FROM loaded").Scan(&count, &nulls, &sum, &u, &l)
	// sum of i/4 for i < 2500: 2499·2500/8 = 780937.5
	if err != nil || count != 2500 || nulls != 250 || sum != 780937.5 || u != "6ba7b810-9dad-11d1-80b4-00c04fd430c8" || len(l) != 2 {
		t.Errorf("loaded: %d rows, %d NULL, sum %v, %s, %v, %v", count, nulls, sum, u, l, err)
	}
	// Binary out, binary in: the two directions of the format agree.
	var buf bytes.Buffer
	if _, err := c.PgConn().CopyTo(ctx, &buf, "COPY (SELECT i, x, s, d, ts, b, u, l FROM loaded ORDER BY i) TO STDOUT (FORMAT BINARY)"); err != nil {
		t.Fatal(err)
	}
	if _, err := c.Exec(ctx, "CREATE TABLE reloaded AS SELECT * FROM loaded LIMIT 0"); err != nil {
		t.Fatal(err)
	}
	if _, err := c.PgConn().CopyFrom(ctx, &buf, "COPY reloaded FROM STDIN (FORMAT BINARY)"); err != nil {
		t.Fatalf("binary round trip: %v", err)
	}
	var differ int64
	if err := c.QueryRow(ctx, "SELECT count(*) FROM (FROM loaded EXCEPT ALL FROM reloaded)").Scan(&differ); err != nil || differ != 0 {
		t.Errorf("after a binary round trip %d rows differ (%v)", differ, err)
	}
	// Inside the client's transaction: rolled back with it.
	tx, _ := c.Begin(ctx)
	if _, err := tx.CopyFrom(ctx, pgx.Identifier{"loaded"}, []string{"i"}, pgx.CopyFromRows([][]any{{int64(-1)}})); err != nil {
		t.Fatal(err)
	}
	tx.Rollback(ctx)
	c.QueryRow(ctx, "SELECT count(*) FROM loaded WHERE i = -1").Scan(&count)
	if count != 0 {
		t.Errorf("a COPY inside a rolled-back transaction left %d rows", count)
	}
	// A bad row half-way (text format, via the simple protocol): nothing stays.
	conn := c.PgConn()
	_, err = conn.CopyFrom(ctx, strings.NewReader("1\t1.5\n2\tnot a number\n"), "COPY loaded (i, x) FROM STDIN")
	if err == nil {
		t.Error("a bad value was loaded")
	}
	c.QueryRow(ctx, "SELECT count(*) FROM loaded WHERE i IN (1, 2) AND x = 1.5").Scan(&count)
	if count != 0 {
		t.Errorf("a failed COPY left %d rows", count)
	}
	var one int
	if err := c.QueryRow(ctx, "SELECT 1").Scan(&one); err != nil {
		t.Errorf("after a failed COPY: %v", err)
	}

	ro := startServer(t, Config{ReadOnly: true})
	rc := ro.connect(t)
	_, err = rc.PgConn().CopyFrom(ctx, strings.NewReader("1\n"), "COPY t FROM STDIN")
	if code := sqlStateOf(err); code != stateReadOnlyTxn {
		t.Errorf("--read-only: %v (SQLSTATE %s)", err, code)
	}
}

// TestParametersEverywhere: pgx binds in binary where the server describes
// a type: arrays, UUIDs and dates; an untyped parameter goes where DuckDB
// infers nothing (a select item, a table function's argument) and takes the
// type the client declares.
func TestParametersEverywhere(t *testing.T) {
	ts := startServer(t, Config{})
	writeSeries(t, ts.data)
	c := ts.connect(t)
	ctx := context.Background()
	var diffs []float64
	if err := c.QueryRow(ctx, "SELECT difference($1::DOUBLE[])", []float64{1, 4, 9, 16}).Scan(&diffs); err != nil || len(diffs) != 3 || diffs[2] != 7 {
		t.Errorf("binary float8[]: %v %v", diffs, err)
	}
	var names []string
	if err := c.QueryRow(ctx, "SELECT list_reverse($1::VARCHAR[])", []string{"a", "b c", ""}).Scan(&names); err != nil || strings.Join(names, "|") != "|b c|a" {
		t.Errorf("binary text[]: %q %v", names, err)
	}
	id := [16]byte{0x6b, 0xa7, 0xb8, 0x10, 0x9d, 0xad, 0x11, 0xd1, 0x80, 0xb4, 0, 0xc0, 0x4f, 0xd4, 0x30, 0xc8}
	var back [16]byte
	var text string
	if err := c.QueryRow(ctx, "SELECT $1::UUID, $1::UUID::VARCHAR", id).Scan(&back, &text); err != nil || back != id || text != "6ba7b810-9dad-11d1-80b4-00c04fd430c8" {
		t.Errorf("uuid: %x %q %v", back, text, err)
	}
	// The result of a table function with bound arguments has no type
	// before Bind: pgx, which describes the statement at Parse, reads it as
	// text (drivers that describe the portal after Bind get its type).
	var n string
	if err := c.QueryRow(ctx, "SELECT count(*) FROM diagnose($1, by := $2, at := 'day', value := 'v')", "series.parquet", "grp").Scan(&n); err != nil || n != "4" {
		t.Errorf("parameters into diagnose, on a path relative to --data: %s %v", n, err)
	}
	var s string
	if err := c.QueryRow(ctx, "SELECT $1", "untyped").Scan(&s); err != nil || s != "untyped" {
		t.Errorf("SELECT $1: %q %v", s, err)
	}
	// Bound values are literals DuckDB reads as data, never as SQL.
	if err := c.QueryRow(ctx, "SELECT $1::VARCHAR", "'); DROP TABLE x; --").Scan(&s); err != nil || s != "'); DROP TABLE x; --" {
		t.Errorf("quoting: %q %v", s, err)
	}
}

// TestUnterminatedQuotes: statements cut off inside a quoted name or a
// string (the fuzzer's find: an unterminated "x once crashed the rule that
// reads quoted names) get DuckDB's syntax error, and the session goes on.
func TestUnterminatedQuotes(t *testing.T) {
	ts, fe := rawFrontend(t, Config{Auth: "trust"})
	for _, sql := range []string{`SELECT "`, `SELECT pg_catalog."`, `SELECT 'x`, `SELECT $$`, `COPY "t FROM STDIN`} {
		got := exchange(t, fe, &pgproto3.Query{String: sql})
		if len(got) != 2 || !strings.HasPrefix(got[0], "error ") || got[1] != "ready I" {
			t.Errorf("%s: %v", sql, got)
		}
	}
	stillServes(t, ts)
}
