package pgserver

import (
	"context"
	"fmt"
	"time"

	"github.com/jackc/pgx/v5/pgproto3"
)

// A portal executed with a row limit (Execute's MaxRows, which JDBC sets
// from its fetch size) keeps its result open between Execute messages: it
// sends at most that many rows, then PortalSuspended, and the next Execute
// on the portal continues where it stopped. As in PostgreSQL, the Execute
// that reaches the limit suspends even when no row is left; the next one
// then completes with SELECT 0. Cursors of DECLARE (own.go) work the same
// way.
//
// The result is kept in a TEMP table of the session's connection, written
// when the cursor opens with each row's position (row_number() OVER (),
// which DuckDB computes in the query's order) and read a page of positions
// at a time (rowids would not do: a transaction's own rows have rowids
// that change when it commits): duckdb-go
// materialises a query's whole result in memory, outside DuckDB's memory
// limit, whereas a table's blocks are DuckDB's to spill to its temporary
// directory. So a client may fetch a result larger than memory, and the
// session's other statements may run between fetches. The table goes when
// the cursor closes, and with the connection.
//
// A cursor is closed by Close of its portal and by a Bind that replaces the
// portal. As in PostgreSQL, every portal ends with its transaction: at Sync
// outside a transaction block (the implicit transaction ends), at COMMIT or
// ROLLBACK, and when the session ends (dropPortals).

// cursor is a portal's result kept open between Execute messages.
type cursor struct {
	table string // the TEMP table holding the result
	next  int64  // rows sent so far
}

// cursorTablePrefix starts the names of cursors' TEMP tables; pg_class
// leaves them out.
const cursorTablePrefix = "plumb_cursor_"

// fetch runs Execute with a row limit on pt.
func (sess *session) fetch(pt *portal, limit int64) (err error) {
	start := time.Now()
	var n int64
	defer func() { sess.logStatement("execute", pt.stmt.sql, start, n, err, "limit", limit) }()
	n, err = sess.fetchRows(pt, limit, true)
	if err != nil {
		return err
	}
	if limit > 0 && n == limit {
		sess.be.Send(&pgproto3.PortalSuspended{})
		return nil
	}
	sess.closeCursor(pt)
	sess.be.Send(&pgproto3.CommandComplete{CommandTag: []byte(fmt.Sprintf("SELECT %d", n))})
	return nil
}

// fetchRows opens pt's result if it is not open yet and sends (send) or
// skips up to limit rows of it (0: all).
func (sess *session) fetchRows(pt *portal, limit int64, send bool) (int64, error) {
	ctx := sess.begin()
	defer sess.end()
	if pt.cursor == nil {
		sess.cursors++
		table := fmt.Sprintf("%s%d", cursorTablePrefix, sess.cursors)
		create := "CREATE TEMP TABLE " + table + " AS SELECT row_number() OVER () AS plumb_row, * FROM (" + pt.sql + ") plumb_query"
		if _, err := sess.db.ExecContext(ctx, create); err != nil {
			return 0, sess.wrap(ctx, err)
		}
		pt.cursor = &cursor{table: table}
	}
	page := fmt.Sprintf("SELECT * EXCLUDE (plumb_row) FROM temp.main.%s WHERE plumb_row > %d", pt.cursor.table, pt.cursor.next)
	if limit > 0 {
		page += fmt.Sprintf(" AND plumb_row <= %d", pt.cursor.next+limit)
	}
	rows, err := sess.db.QueryContext(ctx, page+" ORDER BY plumb_row")
	if err != nil {
		sess.closeCursor(pt)
		return 0, sess.wrap(ctx, err)
	}
	defer rows.Close()
	var n int64
	if send {
		n, err = sess.sendRows(rows, pt.shape.columns, pt.formats, limit)
	} else {
		n, err = sess.eachRow(rows, len(pt.shape.columns), limit, func([]any) {})
	}
	pt.cursor.next += n
	if err != nil {
		rows.Close()
		sess.closeCursor(pt)
		return n, sess.wrap(ctx, err)
	}
	return n, nil
}

// closeCursor drops pt's result table, if it has one. In a failed
// transaction the DROP fails, and the table goes with the rollback.
func (sess *session) closeCursor(pt *portal) {
	if pt == nil || pt.cursor == nil {
		return
	}
	ctx, cancel := context.WithTimeout(context.Background(), 10*time.Second)
	defer cancel()
	sess.db.ExecContext(ctx, "DROP TABLE IF EXISTS temp.main."+pt.cursor.table)
	pt.cursor = nil
}

// dropPortals closes every portal's open result and forgets the portals,
// at the end of the session.
func (sess *session) dropPortals() {
	for name, pt := range sess.portals {
		sess.closeCursor(pt)
		delete(sess.portals, name)
	}
}

// endTransactionPortals closes the portals that end with a transaction:
// all but cursors declared WITH HOLD.
func (sess *session) endTransactionPortals() {
	for name, pt := range sess.portals {
		if pt.hold {
			continue
		}
		sess.closeCursor(pt)
		delete(sess.portals, name)
	}
}
