package pgserver

import (
	"context"
	"database/sql"
	"fmt"
	"time"

	"github.com/jackc/pgx/v5/pgproto3"
)

// A portal executed with a row limit (Execute's MaxRows, which JDBC sets
// from its fetch size) keeps its result open between Execute messages: it
// sends at most that many rows, then PortalSuspended, and the next Execute
// on the portal continues where it stopped. As in PostgreSQL, the Execute
// that reaches the limit suspends even when no row is left; the next one
// then completes with SELECT 0. duckdb-go materialises a result when the
// query runs, so an open cursor does not hold DuckDB up, and the session's
// other statements may run meanwhile.
//
// A cursor is closed by Close of its portal and by a Bind that replaces the
// portal. As in PostgreSQL, every portal ends with its transaction: at Sync
// outside a transaction block (the implicit transaction ends), at COMMIT or
// ROLLBACK, and when the session ends (dropPortals).

// cursor is a portal's result kept open between Execute messages.
type cursor struct {
	rows   *sql.Rows
	cancel context.CancelFunc
}

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
	if pt.cursor == nil {
		// The statement timeout bounds the query's run, not the time the
		// client takes to fetch its rows: database/sql closes the rows when
		// their context ends, so the timer is stopped once the query is in.
		ctx, cancel := context.WithCancel(context.Background())
		var timer *time.Timer
		if t := sess.srv.cfg.QueryTimeout; t > 0 {
			timer = time.AfterFunc(t, cancel)
		}
		sess.markBusy(cancel)
		rows, qerr := sess.db.QueryContext(ctx, pt.sql)
		sess.markIdle()
		if timer != nil && !timer.Stop() {
			qerr = context.DeadlineExceeded
		}
		if qerr != nil {
			cancel()
			if rows != nil {
				rows.Close()
			}
			if qerr == context.DeadlineExceeded {
				return 0, pgError{stateQueryCanceled, "canceling statement due to statement timeout"}
			}
			return 0, sess.wrap(ctx, qerr)
		}
		pt.cursor = &cursor{rows: rows, cancel: cancel}
	}
	var n int64
	var err error
	if send {
		n, err = sess.sendRows(pt.cursor.rows, pt.shape.columns, pt.formats, limit)
	} else {
		n, err = sess.eachRow(pt.cursor.rows, len(pt.shape.columns), limit, func([]any) {})
	}
	if err != nil {
		sess.closeCursor(pt)
	}
	return n, err
}

// closeCursor closes pt's open result, if it has one.
func (sess *session) closeCursor(pt *portal) {
	if pt == nil || pt.cursor == nil {
		return
	}
	pt.cursor.rows.Close()
	pt.cursor.cancel()
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
