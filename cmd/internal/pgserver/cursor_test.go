package pgserver

import (
	"fmt"
	"strings"
	"testing"
	"time"

	"github.com/jackc/pgx/v5/pgproto3"
)

// rawFrontend starts a server with cfg and logs in by hand, for tests that
// speak the protocol message by message.
func rawFrontend(t *testing.T, cfg Config) (*testServer, *pgproto3.Frontend) {
	t.Helper()
	ts := startServer(t, cfg)
	c, err := rawStartup(ts.addr)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { c.Close() })
	c.SetDeadline(time.Now().Add(20 * time.Second))
	return ts, pgproto3.NewFrontend(c, c)
}

// exchange sends msgs, flushes, and returns what the server answers up to
// and including ReadyForQuery, one short line per message.
func exchange(t *testing.T, fe *pgproto3.Frontend, msgs ...pgproto3.FrontendMessage) []string {
	t.Helper()
	for _, m := range msgs {
		fe.Send(m)
	}
	if err := fe.Flush(); err != nil {
		t.Fatal(err)
	}
	var got []string
	for {
		m, err := fe.Receive()
		if err != nil {
			t.Fatalf("after %v: %v", got, err)
		}
		switch m := m.(type) {
		case *pgproto3.DataRow:
			got = append(got, "row "+string(m.Values[0]))
		case *pgproto3.CommandComplete:
			got = append(got, "complete "+string(m.CommandTag))
		case *pgproto3.PortalSuspended:
			got = append(got, "suspended")
		case *pgproto3.ErrorResponse:
			got = append(got, "error "+m.Code)
		case *pgproto3.ReadyForQuery:
			return append(got, "ready "+string(m.TxStatus))
		case *pgproto3.ParseComplete, *pgproto3.BindComplete, *pgproto3.RowDescription, *pgproto3.CloseComplete:
		default:
			got = append(got, fmt.Sprintf("%T", m))
		}
	}
}

// TestExecuteWithRowLimit: Execute with MaxRows sends that many rows and
// PortalSuspended, and the next Execute continues (the protocol's portal
// suspension, which JDBC's fetch size uses); inside a transaction the
// portal survives Sync and other statements; outside one it ends at Sync.
// Expected messages follow the PostgreSQL protocol documentation (Extended
// Query: "Execute ... PortalSuspended"), common practice.
func TestExecuteWithRowLimit(t *testing.T) {
	ts, fe := rawFrontend(t, Config{Auth: "trust"})
	five := &pgproto3.Parse{Query: "SELECT i FROM range(5) t(i) ORDER BY i"}
	check := func(what string, got []string, want ...string) {
		t.Helper()
		if strings.Join(got, "; ") != strings.Join(want, "; ") {
			t.Errorf("%s:\n got %s\nwant %s", what, strings.Join(got, "; "), strings.Join(want, "; "))
		}
	}

	check("three Executes of two rows",
		exchange(t, fe, five, &pgproto3.Bind{}, &pgproto3.Execute{MaxRows: 2}, &pgproto3.Execute{MaxRows: 2},
			&pgproto3.Execute{MaxRows: 2}, &pgproto3.Sync{}),
		"row 0", "row 1", "suspended", "row 2", "row 3", "suspended", "row 4", "complete SELECT 1", "ready I")

	check("a limit reached exactly suspends; the next Execute completes empty",
		exchange(t, fe, five, &pgproto3.Bind{}, &pgproto3.Execute{MaxRows: 5}, &pgproto3.Execute{MaxRows: 5}, &pgproto3.Sync{}),
		"row 0", "row 1", "row 2", "row 3", "row 4", "suspended", "complete SELECT 0", "ready I")

	check("outside a transaction the portal ends at Sync",
		exchange(t, fe, five, &pgproto3.Bind{}, &pgproto3.Execute{MaxRows: 1}, &pgproto3.Sync{}),
		"row 0", "suspended", "ready I")
	check("so it is gone after it", exchange(t, fe, &pgproto3.Execute{MaxRows: 1}, &pgproto3.Sync{}), "error 34000", "ready I")

	check("begin", exchange(t, fe, &pgproto3.Query{String: "BEGIN"}), "complete BEGIN", "ready T")
	check("inside a transaction, first part",
		exchange(t, fe, five, &pgproto3.Bind{DestinationPortal: "c"}, &pgproto3.Execute{Portal: "c", MaxRows: 3}, &pgproto3.Sync{}),
		"row 0", "row 1", "row 2", "suspended", "ready T")
	check("another statement meanwhile", exchange(t, fe, &pgproto3.Query{String: "SELECT 42"}), "row 42", "complete SELECT 1", "ready T")
	check("the rest, without a limit",
		exchange(t, fe, &pgproto3.Execute{Portal: "c"}, &pgproto3.Sync{}),
		"row 3", "row 4", "complete SELECT 2", "ready T")
	check("a fresh portal, closed half-read",
		exchange(t, fe, five, &pgproto3.Bind{DestinationPortal: "d"}, &pgproto3.Execute{Portal: "d", MaxRows: 2},
			&pgproto3.Close{ObjectType: 'P', Name: "d"}, &pgproto3.Execute{Portal: "d", MaxRows: 2}, &pgproto3.Sync{}),
		"row 0", "row 1", "suspended", "error 34000", "ready T")
	check("commit", exchange(t, fe, &pgproto3.Query{String: "COMMIT"}), "complete COMMIT", "ready I")
	check("a statement that returns no rows ignores the limit",
		exchange(t, fe, &pgproto3.Parse{Query: "CREATE TEMP TABLE t (x INTEGER)"}, &pgproto3.Bind{},
			&pgproto3.Execute{MaxRows: 1}, &pgproto3.Sync{}),
		"complete CREATE TABLE", "ready I")
	stillServes(t, ts)
}

// TestRowLimitTimeout: the statement timeout cuts short a query run for a
// row-limited Execute too, and the session goes on.
func TestRowLimitTimeout(t *testing.T) {
	_, fe := rawFrontend(t, Config{Auth: "trust", QueryTimeout: 500 * time.Millisecond})
	slow := "SELECT count(*) FROM range(1000000000) a, range(10) b WHERE a.range * b.range = -1"
	start := time.Now()
	got := exchange(t, fe, &pgproto3.Parse{Query: slow}, &pgproto3.Bind{}, &pgproto3.Execute{MaxRows: 1}, &pgproto3.Sync{})
	if strings.Join(got, "; ") != "error "+stateQueryCanceled+"; ready I" {
		t.Errorf("got %v", got)
	}
	if d := time.Since(start); d > 5*time.Second {
		t.Errorf("the timeout struck after %v, want about 0.5 s", d)
	}
	if got := exchange(t, fe, &pgproto3.Query{String: "SELECT 7"}); strings.Join(got, "; ") != "row 7; complete SELECT 1; ready I" {
		t.Errorf("after the timeout: %v", got)
	}
}

// TestDeclaredCursors: DECLARE, FETCH, MOVE and CLOSE as PostgreSQL's
// documentation (SQL Commands: DECLARE, FETCH) describes them, forward
// only: a cursor without HOLD needs a transaction and ends with it; one
// WITH HOLD survives COMMIT and goes on where it stopped; the table behind
// a cursor is not listed in pg_class.
func TestDeclaredCursors(t *testing.T) {
	_, fe := rawFrontend(t, Config{Auth: "trust"})
	check := func(what string, got []string, want ...string) {
		t.Helper()
		if strings.Join(got, "; ") != strings.Join(want, "; ") {
			t.Errorf("%s:\n got %s\nwant %s", what, strings.Join(got, "; "), strings.Join(want, "; "))
		}
	}
	q := func(sql string) []string { return exchange(t, fe, &pgproto3.Query{String: sql}) }
	check("without a transaction", q("DECLARE c CURSOR FOR SELECT 1"), "error "+stateNoActiveTxn, "ready I")
	check("declare", q("BEGIN; DECLARE c NO SCROLL CURSOR WITH HOLD FOR SELECT i FROM range(10) t(i) ORDER BY i DESC"),
		"complete BEGIN", "complete DECLARE CURSOR", "ready T")
	check("fetch 2", q("FETCH 2 FROM c"), "row 9", "row 8", "complete FETCH 2", "ready T")
	check("hidden from pg_class", q("SELECT count(*) FROM pg_class WHERE relname LIKE 'plumb_cursor%'"), "row 0", "complete SELECT 1", "ready T")
	check("commit keeps a held cursor", q("COMMIT"), "complete COMMIT", "ready I")
	check("fetch after commit", q("FETCH NEXT FROM c"), "row 7", "complete FETCH 1", "ready I")
	check("move", q("MOVE 3 IN c"), "complete MOVE 3", "ready I")
	check("fetch all", q("FETCH ALL FROM c"), "row 3", "row 2", "row 1", "row 0", "complete FETCH 4", "ready I")
	check("fetch past the end", q("FETCH 5 FROM c"), "complete FETCH 0", "ready I")
	check("close", q("CLOSE c"), "complete CLOSE CURSOR", "ready I")
	check("closed", q("FETCH 1 FROM c"), "error "+stateInvalidCursor, "ready I")
	check("scroll refused", q("BEGIN; DECLARE s SCROLL CURSOR FOR SELECT 1"), "complete BEGIN", "error "+stateFeatureNotSupport, "ready E")
	check("rollback", q("ROLLBACK"), "complete ROLLBACK", "ready I")
	check("a cursor without HOLD ends with its transaction",
		q("BEGIN; DECLARE d CURSOR FOR SELECT 1; COMMIT; FETCH 1 FROM d"),
		"complete BEGIN", "complete DECLARE CURSOR", "complete COMMIT", "error "+stateInvalidCursor, "ready I")
}
