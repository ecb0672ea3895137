package pgserver

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"strings"
	"time"

	"github.com/duckdb/duckdb-go/v2"
	"github.com/jackc/pgx/v5/pgproto3"

	"github.com/plumb-sql/plumb/cmd/internal/output"
	"github.com/plumb-sql/plumb/cmd/internal/statements"
)

// prepared is a parsed statement of the extended protocol.
type prepared struct {
	sql       string       // as the client sent it
	rewritten string       // after the compatibility rules, still with $n
	toks      []token      // of rewritten
	paths     map[int]bool // parameters that name files (rewrite.go)
	own       bool         // a statement plumb answers itself (own.go)
	shape     shape
	params    []uint32 // OIDs for ParameterDescription
	declared  []uint32 // OIDs the client gave in Parse, 0 where none
}

// portal is a bound statement ready to execute: its SQL with the
// parameters inlined, and its shape.
type portal struct {
	stmt     *prepared
	sql      string
	shape    shape
	formats  []int16
	cursor   *cursor // open between Execute messages with a row limit (cursor.go)
	hold     bool    // a cursor declared WITH HOLD outlives its transaction
	declared bool    // opened by DECLARE
	binary   bool    // DECLARE ... BINARY
	done     bool    // a declared cursor's rows are used up
}

// normalize maps statements PostgreSQL clients send to DuckDB's dialect:
// whole-statement answers first (psql's \d steps), then the token rules
// and the allow-list's token checks of g.
func normalize(sql string, g *gate) (string, map[int]bool, error) {
	sql = strings.TrimSpace(sql)
	if r := rewrite(sql); r != sql {
		return r, nil, nil
	}
	return rewriteSQL(sql, g)
}

// rewrite applies normalize with the session's allow-list.
func (sess *session) rewrite(sql string) (string, map[int]bool, error) {
	return normalize(sql, sess.gate)
}

// simpleQuery runs every statement of a Query message in order, stopping
// at the first error, then reports ready.
func (sess *session) simpleQuery(text string) {
	stmts := statements.Split(text)
	if len(stmts) == 0 {
		sess.be.Send(&pgproto3.EmptyQueryResponse{})
	}
	for _, s := range stmts {
		sql, _, err := sess.rewrite(s)
		if err != nil {
			sess.logStatement("execute", s, time.Now(), 0, err)
		} else {
			err = sess.run(s, sql, nil, nil, true)
		}
		if err != nil {
			sess.be.Send(sess.responseFor(err))
			break
		}
	}
	sess.be.Send(&pgproto3.ReadyForQuery{TxStatus: sess.txn})
	sess.be.Flush()
}

// run executes one rewritten statement, logs it (with the client's own
// text) and marks a transaction failed on an error. sh is its shape if
// known; describe says whether to send its row description (the simple
// protocol does; the extended one has Describe).
func (sess *session) run(original, sql string, sh *shape, formats []int16, describe bool) (err error) {
	start := time.Now()
	rows := int64(0)
	defer func() { sess.logStatement("execute", original, start, rows, err) }()
	if handled, n, err := sess.own(sql, formats, describe); handled {
		rows = n
		return err
	}
	ctx := sess.begin()
	defer sess.end()
	if sh == nil {
		described, err := sess.describeSQL(ctx, sql)
		if err != nil {
			return err
		}
		sh = &described
	}
	rows, err = sess.execute1(ctx, sql, *sh, formats, describe)
	return err
}

// logStatement writes one log line for a statement at a protocol step
// and, after an error inside a transaction block, marks it failed.
func (sess *session) logStatement(step, sql string, start time.Time, rows int64, err error, more ...any) {
	var attrs []any
	if step != "execute" {
		attrs = append(attrs, "step", step)
	}
	attrs = append(attrs, "sql", truncate(sql, 300), "duration", time.Since(start).String(), "rows", rows)
	attrs = append(attrs, more...)
	if err != nil {
		attrs = append(attrs, "error", firstLine(err.Error()))
		if sess.txn == 'T' {
			sess.txn = 'E'
		}
	}
	sess.log.Info("statement", attrs...)
}

// execute1 runs a described statement and streams its result.
func (sess *session) execute1(ctx context.Context, sql string, sh shape, formats []int16, describe bool) (int64, error) {
	if !sh.returnsRows() {
		res, err := sess.db.ExecContext(ctx, sql)
		if err != nil {
			return 0, sess.wrap(ctx, err)
		}
		n, _ := res.RowsAffected()
		sess.track(sql, sh.kind)
		sess.be.Send(&pgproto3.CommandComplete{CommandTag: []byte(commandTag(sql, sh.kind, n))})
		return n, nil
	}
	if describe {
		sess.be.Send(rowDescription(sh.columns, formats))
	}
	rows, err := sess.db.QueryContext(ctx, sql)
	if err != nil {
		return 0, sess.wrap(ctx, err)
	}
	defer rows.Close()
	n, err := sess.sendRows(rows, sh.columns, formats, 0)
	if err != nil {
		return n, sess.wrap(ctx, err)
	}
	sess.be.Send(&pgproto3.CommandComplete{CommandTag: []byte(fmt.Sprintf("SELECT %d", n))})
	return n, nil
}

// wrap explains a statement cut short by its timeout or a cancel request.
func (sess *session) wrap(ctx context.Context, err error) error {
	switch {
	case errors.Is(ctx.Err(), context.DeadlineExceeded):
		return pgError{stateQueryCanceled, "canceling statement due to statement timeout"}
	case errors.Is(ctx.Err(), context.Canceled):
		return pgError{stateQueryCanceled, "canceling statement due to user request"}
	}
	return err
}

// sendRows streams rows as DataRow messages, at most limit of them (0: all).
func (sess *session) sendRows(rows *sql.Rows, cols []column, formats []int16, limit int64) (int64, error) {
	return sess.eachRow(rows, len(cols), limit, func(vals []any) {
		data := make([][]byte, len(cols))
		for i, v := range vals {
			if formatOf(formats, i) == 1 {
				data[i] = encodeBinary(v, cols[i].oid)
			} else {
				data[i] = encodeText(v, cols[i].oid)
			}
		}
		sess.be.Send(&pgproto3.DataRow{Values: data})
	})
}

// eachRow scans every row and hands its values to send, flushing the
// connection every 256 rows so that a large result does not pile up in
// memory (and a vanished client is noticed).
func (sess *session) eachRow(rows *sql.Rows, n int, limit int64, send func([]any)) (int64, error) {
	order, err := output.StructOrderOf(rows)
	if err != nil {
		return 0, err
	}
	vals := make([]any, n)
	ptrs := make([]any, n)
	for i := range vals {
		ptrs[i] = &vals[i]
	}
	var count int64
	for (limit == 0 || count < limit) && rows.Next() {
		if err := rows.Scan(ptrs...); err != nil {
			return count, err
		}
		if order != nil {
			order(vals)
		}
		send(vals)
		count++
		if count%256 == 0 {
			if err := sess.be.Flush(); err != nil {
				return count, err
			}
		}
	}
	return count, rows.Err()
}

func formatOf(formats []int16, i int) int16 {
	switch len(formats) {
	case 0:
		return 0
	case 1:
		return formats[0]
	}
	if i < len(formats) {
		return formats[i]
	}
	return 0
}

func rowDescription(cols []column, formats []int16) *pgproto3.RowDescription {
	rd := &pgproto3.RowDescription{}
	for i, c := range cols {
		rd.Fields = append(rd.Fields, pgproto3.FieldDescription{
			Name: []byte(c.name), DataTypeOID: c.oid, DataTypeSize: typeSize(c.oid), TypeModifier: -1,
			Format: formatOf(formats, i),
		})
	}
	return rd
}

// track follows the transaction status across BEGIN, COMMIT and ROLLBACK.
func (sess *session) track(sql string, kind duckdb.StmtType) {
	if kind != duckdb.STATEMENT_TYPE_TRANSACTION {
		return
	}
	switch firstWord(sql) {
	case "BEGIN", "START":
		sess.txn = 'T'
	case "COMMIT", "END", "ROLLBACK", "ABORT":
		sess.txn = 'I'
		sess.endTransactionPortals()
	}
}

// commandTag is the CommandComplete tag PostgreSQL clients expect.
func commandTag(sql string, kind duckdb.StmtType, n int64) string {
	switch kind {
	case duckdb.STATEMENT_TYPE_INSERT:
		return fmt.Sprintf("INSERT 0 %d", n)
	case duckdb.STATEMENT_TYPE_UPDATE:
		return fmt.Sprintf("UPDATE %d", n)
	case duckdb.STATEMENT_TYPE_DELETE:
		return fmt.Sprintf("DELETE %d", n)
	case duckdb.STATEMENT_TYPE_COPY:
		return fmt.Sprintf("COPY %d", n)
	case duckdb.STATEMENT_TYPE_TRANSACTION:
		switch firstWord(sql) {
		case "BEGIN", "START":
			return "BEGIN"
		case "COMMIT", "END":
			return "COMMIT"
		}
		return "ROLLBACK"
	case duckdb.STATEMENT_TYPE_CREATE, duckdb.STATEMENT_TYPE_DROP, duckdb.STATEMENT_TYPE_ALTER, duckdb.STATEMENT_TYPE_CREATE_FUNC:
		words := strings.Fields(strings.ToUpper(sql))
		tag := []string{words[0]}
		for _, w := range words[1:] {
			if w == "OR" || w == "REPLACE" || w == "TEMP" || w == "TEMPORARY" || w == "UNIQUE" {
				continue
			}
			tag = append(tag, w)
			break
		}
		return strings.Join(tag, " ")
	}
	return firstWord(sql)
}

func firstWord(sql string) string {
	f := strings.Fields(strings.ToUpper(sql))
	if len(f) == 0 {
		return ""
	}
	return strings.TrimRight(f[0], ";")
}

func truncate(s string, n int) string {
	s = strings.Join(strings.Fields(s), " ")
	if len(s) > n {
		return s[:n] + "..."
	}
	return s
}

func firstLine(s string) string {
	line, _, _ := strings.Cut(s, "\n")
	return line
}
