package pgserver

import (
	"context"
	"fmt"
	"strings"
	"testing"

	"github.com/jackc/pgx/v5"
)

// TestSessionIsolation: two SCRAM users, ana and ben, in interleaved and
// successive sessions. Nothing of one session may reach another: TEMP
// tables, open or failed transactions, prepared statements, portals,
// cursors, client parameters and identity. Each case is logged as a row of
// the table the report shows.
func TestSessionIsolation(t *testing.T) {
	ts := startServer(t, Config{})
	ctx := context.Background()
	connect := func(user, password string) *pgx.Conn {
		t.Helper()
		c, err := pgx.Connect(ctx, ts.url(user, password))
		if err != nil {
			t.Fatal(err)
		}
		return c
	}
	ana := func() *pgx.Conn { return connect("ana", "s3cret") }
	ben := func() *pgx.Conn { return connect("ben", "pa55") }
	exec := func(c *pgx.Conn, sql string) error {
		_, err := c.Exec(ctx, sql, pgx.QueryExecModeSimpleProtocol)
		return err
	}
	scalar := func(c *pgx.Conn, sql string) (string, error) {
		var s string
		err := c.QueryRow(ctx, sql, pgx.QueryExecModeSimpleProtocol).Scan(&s)
		return s, err
	}
	// vanish drops a connection without Terminate, as a crashed client does.
	vanish := func(c *pgx.Conn) { c.PgConn().Conn().Close() }

	setup := ana()
	if err := exec(setup, "CREATE TABLE shared (who VARCHAR)"); err != nil {
		t.Fatal(err)
	}
	setup.Close(ctx)

	var rows []string
	check := func(name string, ok bool, detail string) {
		t.Helper()
		result := "ok"
		if !ok {
			result = "LEAK"
			t.Errorf("%s: %s", name, detail)
		}
		rows = append(rows, fmt.Sprintf("%-62s | %-4s | %s", name, result, detail))
	}

	for round := 0; round < 3; round++ { // sessions end one after another, so a pooled connection would be handed on
		a := ana()
		exec(a, "CREATE TEMP TABLE secret AS SELECT 'ana' AS who")
		exec(a, "BEGIN")
		exec(a, "INSERT INTO shared VALUES ('ana, uncommitted')")
		exec(a, "PREPARE ana_stmt AS SELECT 1")
		a.PgConn().Prepare(ctx, "ana_prepared", "SELECT 'ana prepared'", nil)
		exec(a, "DECLARE ana_cursor CURSOR FOR SELECT 1")
		exec(a, "SET application_name = 'ana-notebook'")
		if round%2 == 0 {
			vanish(a)
		} else {
			a.Close(ctx)
		}
		b := ben()
		_, err := scalar(b, "SELECT who FROM secret")
		check(fmt.Sprintf("round %d: ben cannot read ana's TEMP table", round), sqlStateOf(err) == stateUndefinedTable, fmt.Sprint(err))
		n, err := scalar(b, "SELECT count(*)::VARCHAR FROM shared WHERE who LIKE 'ana%'")
		check(fmt.Sprintf("round %d: ana's open transaction was rolled back", round), err == nil && n == "0", "rows "+n)
		if tag, err := b.PgConn().Exec(ctx, "ROLLBACK").ReadAll(); err == nil {
			check(fmt.Sprintf("round %d: ben has no transaction to roll back", round), b.PgConn().TxStatus() == 'I', fmt.Sprintf("%v, status %c", tag[0].CommandTag, b.PgConn().TxStatus()))
		}
		_, err = b.Prepare(ctx, "x", "EXECUTE ana_stmt")
		check(fmt.Sprintf("round %d: ana's PREPAREd statement is gone", round), err != nil, fmt.Sprint(err))
		res := b.PgConn().ExecPrepared(ctx, "ana_prepared", nil, nil, nil).Read()
		check(fmt.Sprintf("round %d: ana's protocol-level statement is gone", round), sqlStateOf(res.Err) == "26000", fmt.Sprint(res.Err))
		_, err = scalar(b, "FETCH 1 FROM ana_cursor")
		check(fmt.Sprintf("round %d: ana's cursor is gone", round), sqlStateOf(err) == stateInvalidCursor, fmt.Sprint(err))
		app, _ := scalar(b, "SHOW application_name")
		check(fmt.Sprintf("round %d: ana's client parameters are not ben's", round), app != "ana-notebook", "application_name "+app)
		who, err := scalar(b, "SELECT current_user")
		check(fmt.Sprintf("round %d: current_user is ben", round), err == nil && who == "ben", who)
		b.Close(ctx)
	}

	// A failed transaction left behind does not fail the next client.
	a := ana()
	exec(a, "BEGIN")
	exec(a, "SELECT * FROM no_such_table")
	status := a.PgConn().TxStatus()
	vanish(a)
	b := ben()
	one, err := scalar(b, "SELECT 1::VARCHAR")
	check("ana left a failed transaction (status "+string(status)+"): ben's first statement runs", err == nil && one == "1", fmt.Sprint(err))
	b.Close(ctx)

	// Interleaved sessions, each with a TEMP table of the same name and an
	// open transaction.
	a, b = ana(), ben()
	exec(a, "CREATE TEMP TABLE mine AS SELECT 'ana' AS who")
	exec(b, "CREATE TEMP TABLE mine AS SELECT 'ben' AS who")
	wa, _ := scalar(a, "SELECT who FROM mine")
	wb, _ := scalar(b, "SELECT who FROM mine")
	check("interleaved: each session reads its own TEMP table of one name", wa == "ana" && wb == "ben", wa+" / "+wb)
	exec(a, "BEGIN")
	exec(a, "INSERT INTO shared VALUES ('ana, pending')")
	n, _ := scalar(b, "SELECT count(*)::VARCHAR FROM shared WHERE who = 'ana, pending'")
	check("interleaved: ben does not see ana's uncommitted row", n == "0", "rows "+n)
	err = exec(b, "ROLLBACK")
	n2, _ := scalar(a, "SELECT count(*)::VARCHAR FROM shared WHERE who = 'ana, pending'")
	check("interleaved: ben's ROLLBACK does not touch ana's transaction", n2 == "1" && a.PgConn().TxStatus() == 'T', fmt.Sprintf("ana sees %s row, status %c (ben: %v)", n2, a.PgConn().TxStatus(), err))
	exec(a, "COMMIT")
	n, _ = scalar(b, "SELECT count(*)::VARCHAR FROM shared WHERE who = 'ana, pending'")
	check("interleaved: after ana's COMMIT ben sees the row", n == "1", "rows "+n)
	exec(a, "BEGIN")
	exec(a, "DECLARE c1 CURSOR FOR SELECT range FROM range(10)")
	exec(b, "BEGIN")
	_, err = scalar(b, "FETCH 1 FROM c1")
	check("interleaved: ben cannot fetch from ana's open cursor", sqlStateOf(err) == stateInvalidCursor, fmt.Sprint(err))
	exec(b, "ROLLBACK")
	first, err := scalar(a, "FETCH 1 FROM c1")
	check("interleaved: ana's cursor still works", err == nil && first == "0", first)
	a.Close(ctx)
	b.Close(ctx)

	t.Logf("isolation cases (%d):\n%-62s | %-4s | %s\n%s", len(rows), "case", "result", "detail", strings.Join(rows, "\n"))
}
