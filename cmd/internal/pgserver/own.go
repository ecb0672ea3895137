package pgserver

import (
	"context"
	"fmt"
	"strconv"
	"strings"

	"github.com/jackc/pgx/v5/pgproto3"
)

// Statements plumb answers itself instead of DuckDB: client SET, SHOW and
// RESET of PostgreSQL session parameters; a BEGIN inside a transaction
// (PostgreSQL's warning); savepoints, which DuckDB lacks; COPY to and from
// the client; and DECLARE, FETCH, MOVE and CLOSE of cursors, which are
// portals (cursor.go) opened by SQL instead of by Bind.

// words are a statement's significant tokens, bare words lower-cased and
// quoted names unquoted.
func words(sql string) []string {
	var out []string
	for _, t := range lex(sql) {
		switch t.kind {
		case tokSpace:
		case tokWord, tokQuoted:
			out = append(out, t.name())
		default:
			out = append(out, t.text)
		}
	}
	return out
}

// ownKind says which of plumb's own statements sql is, "" if none.
func ownKind(sql string) string {
	w := words(sql)
	if len(w) == 0 {
		return ""
	}
	at := func(i int) string {
		if i < len(w) {
			return w[i]
		}
		return ""
	}
	switch w[0] {
	case "set":
		if _, _, ok := setParameter(sql); ok || at(1) == "transaction" || at(1) == "session" && at(2) == "characteristics" {
			return "set"
		}
	case "show":
		if _, ok := showParameter(sql); ok {
			return "show"
		}
	case "reset", "discard", "deallocate":
		if resetStmt.MatchString(sql) {
			return "reset"
		}
	case "begin", "start":
		return "begin"
	case "savepoint", "release":
		return "savepoint"
	case "rollback", "abort":
		for _, x := range w[1:] {
			if x == "to" {
				return "savepoint"
			}
		}
		return "end"
	case "commit", "end":
		return "end"
	case "copy":
		if dir, _, _ := copyClient(sql); dir != "" {
			return "copy " + dir
		}
	case "declare", "fetch", "move", "close":
		return w[0]
	}
	return ""
}

// ownShape is the shape of one of plumb's own statements, for Describe.
func (sess *session) ownShape(sql string) (shape, bool) {
	switch ownKind(sql) {
	case "":
		return shape{}, false
	case "begin":
		if sess.txn == 'I' {
			return shape{}, false // DuckDB's own BEGIN
		}
	case "end":
		if sess.txn != 'I' {
			return shape{}, false // DuckDB's own COMMIT or ROLLBACK
		}
	case "show":
		name, _ := showParameter(sql)
		return shape{columns: []column{{name: name, oid: oidText}}}, true
	case "fetch":
		if f, err := parseFetch(sql); err == nil {
			if pt, ok := sess.portals[f.cursor]; ok {
				return pt.shape, true
			}
		}
	}
	return shape{}, true
}

// own runs sql if it is one of plumb's own statements.
func (sess *session) own(sql string, formats []int16, describe bool) (bool, int64, error) {
	kind := ownKind(sql)
	switch kind {
	case "":
		return false, 0, nil
	case "set":
		if name, value, ok := setParameter(sql); ok {
			sess.params[name] = value
			// pg_settings and current_setting() follow.
			if _, err := sess.db.ExecContext(context.Background(), settingsView(sess.params)); err != nil {
				return true, 0, err
			}
		}
		sess.complete("SET")
	case "show":
		name, _ := showParameter(sql)
		if describe {
			sess.be.Send(rowDescription([]column{{name: name, oid: oidText}}, nil))
		}
		sess.be.Send(&pgproto3.DataRow{Values: [][]byte{[]byte(sess.param(name))}})
		sess.complete("SHOW")
		return true, 1, nil
	case "reset":
		m := resetStmt.FindStringSubmatch(sql)
		tag := strings.Fields(strings.ToUpper(m[1]))[0]
		if tag == "DISCARD" {
			tag = "DISCARD ALL"
		}
		sess.complete(tag)
	case "begin":
		if sess.txn == 'I' {
			return false, 0, nil
		}
		// PostgreSQL warns and stays in the transaction it has.
		sess.be.Send(&pgproto3.NoticeResponse{Severity: "WARNING", SeverityUnlocalized: "WARNING", Code: stateActiveTxn,
			Message: "there is already a transaction in progress"})
		sess.complete("BEGIN")
	case "end":
		if sess.txn != 'I' {
			return false, 0, nil
		}
		// PostgreSQL warns and succeeds; DuckDB would fail.
		sess.be.Send(&pgproto3.NoticeResponse{Severity: "WARNING", SeverityUnlocalized: "WARNING", Code: stateNoActiveTxn,
			Message: "there is no transaction in progress"})
		tag := "COMMIT"
		if w := words(sql); w[0] == "rollback" || w[0] == "abort" {
			tag = "ROLLBACK"
		}
		sess.complete(tag)
	case "savepoint":
		return true, 0, pgError{stateFeatureNotSupport, "savepoints are not supported: DuckDB has none, so plumb serve refuses SAVEPOINT, RELEASE and ROLLBACK TO; commit or roll back the whole transaction"}
	case "copy in":
		if sess.gate != nil && sess.gate.role == RoleRead {
			return true, 0, refused("COPY ... FROM STDIN is not allowed for a read-only user (role read)")
		}
		n, err := sess.copyIn(sql)
		return true, n, err
	case "copy out":
		_, source, options := copyClient(sql)
		n, err := sess.copyOut(source, parseCopyOptions(options))
		return true, n, err
	case "declare":
		return true, 0, sess.declare(sql)
	case "fetch", "move":
		f, err := parseFetch(sql)
		if err != nil {
			return true, 0, err
		}
		pt, ok := sess.portals[f.cursor]
		if !ok {
			return true, 0, pgError{stateInvalidCursor, fmt.Sprintf("cursor %q does not exist", f.cursor)}
		}
		send := kind == "fetch"
		if send && describe {
			sess.be.Send(rowDescription(pt.shape.columns, pt.resultFormats(formats)))
		}
		n, err := sess.fetchCursor(pt, f.count, send, pt.resultFormats(formats))
		if err != nil {
			return true, n, err
		}
		sess.complete(fmt.Sprintf("%s %d", strings.ToUpper(kind), n))
		return true, n, nil
	case "close":
		w := words(sql)
		if len(w) >= 2 && w[1] == "all" {
			for name, pt := range sess.portals {
				if pt.declared {
					sess.closeCursor(pt)
					delete(sess.portals, name)
				}
			}
		} else if len(w) >= 2 {
			pt, ok := sess.portals[w[1]]
			if !ok {
				return true, 0, pgError{stateInvalidCursor, fmt.Sprintf("cursor %q does not exist", w[1])}
			}
			sess.closeCursor(pt)
			delete(sess.portals, w[1])
		}
		sess.complete("CLOSE CURSOR")
	}
	return true, 0, nil
}

func (sess *session) complete(tag string) {
	sess.be.Send(&pgproto3.CommandComplete{CommandTag: []byte(tag)})
}

// declare opens a cursor: DECLARE name [BINARY] [ASENSITIVE | INSENSITIVE]
// [[NO] SCROLL] CURSOR [{WITH | WITHOUT} HOLD] FOR query.
func (sess *session) declare(sql string) error {
	toks := lex(sql)
	idx := significant(toks)
	if len(idx) < 2 {
		return pgError{stateSyntax, "DECLARE needs a cursor name"}
	}
	name := toks[idx[1]].name()
	binary, hold, query := false, false, ""
	for k := 2; k < len(idx); k++ {
		t := toks[idx[k]]
		switch {
		case t.is("binary"):
			binary = true
		case t.is("scroll") && !(k > 2 && toks[idx[k-1]].is("no")):
			return pgError{stateFeatureNotSupport, "plumb serve's cursors move forward only: declare them NO SCROLL or without SCROLL"}
		case t.is("with") && k+1 < len(idx) && toks[idx[k+1]].is("hold"):
			hold = true
		case t.is("for"):
			query = join(toks[idx[k]+1:])
			k = len(idx)
		}
	}
	if strings.TrimSpace(query) == "" {
		return pgError{stateSyntax, "DECLARE ... CURSOR needs FOR and a query"}
	}
	if !hold && sess.txn == 'I' {
		return pgError{stateNoActiveTxn, "DECLARE CURSOR can only be used in transaction blocks"}
	}
	if pt, ok := sess.portals[name]; ok && pt.declared {
		return pgError{stateDuplicateCursor, fmt.Sprintf("cursor %q already exists", name)}
	}
	ctx := sess.begin()
	sh, err := sess.describeSQL(ctx, query)
	sess.end()
	if err != nil {
		return err
	}
	if !sh.returnsRows() {
		return pgError{stateInvalidCursorDef, "a cursor's query must return rows"}
	}
	pt := &portal{stmt: &prepared{sql: query}, sql: query, shape: sh, hold: hold, declared: true, binary: binary}
	sess.closeCursor(sess.portals[name])
	sess.portals[name] = pt
	sess.complete("DECLARE CURSOR")
	return nil
}

// resultFormats are a cursor's: binary for a BINARY cursor, else those the
// FETCH was bound with.
func (pt *portal) resultFormats(fetch []int16) []int16 {
	if pt.binary {
		return []int16{1}
	}
	return fetch
}

// fetchCursor sends (or skips, for MOVE) up to count rows; count 0 is ALL.
func (sess *session) fetchCursor(pt *portal, count int64, send bool, formats []int16) (int64, error) {
	saved := pt.formats
	pt.formats = formats
	defer func() { pt.formats = saved }()
	if pt.done {
		return 0, nil
	}
	n, err := sess.fetchRows(pt, count, send)
	if err == nil && (count == 0 || n < count) {
		pt.done = true // the result is used up; keep the portal until CLOSE
		sess.closeCursor(pt)
	}
	return n, err
}

// fetchRequest is a parsed FETCH or MOVE.
type fetchRequest struct {
	cursor string
	count  int64 // 0: ALL
}

// parseFetch reads FETCH|MOVE [NEXT | FORWARD [n | ALL] | ALL | n]
// [FROM | IN] name; backward directions are refused.
func parseFetch(sql string) (fetchRequest, error) {
	w := words(sql)
	f := fetchRequest{count: 1}
	i := 1
	for ; i < len(w); i++ {
		switch w[i] {
		case "next", "forward":
		case "all":
			f.count = 0
		case "from", "in":
		case "prior", "backward", "first", "last", "absolute", "relative", "-":
			return f, pgError{stateFeatureNotSupport, "plumb serve's cursors move forward only (FETCH " + strings.ToUpper(w[i]) + " is not supported)"}
		case ";":
		default:
			if n, err := strconv.ParseInt(w[i], 10, 64); err == nil {
				if n < 0 {
					return f, pgError{stateFeatureNotSupport, "plumb serve's cursors move forward only"}
				}
				f.count = n
				if n == 0 {
					f.count = -1 // FETCH 0: no rows
				}
				continue
			}
			f.cursor = w[i]
		}
	}
	if f.cursor == "" {
		return f, pgError{stateSyntax, "FETCH needs a cursor name"}
	}
	if f.count < 0 {
		f.count = 0
	}
	return f, nil
}

// copyClient finds a COPY to or from the client: "in" for COPY ... FROM
// STDIN, "out" for COPY source TO STDOUT (with its source, a table or a
// parenthesised query, and the options after STDOUT), "" otherwise.
// Only keywords outside parentheses count.
func copyClient(sql string) (dir, source, options string) {
	toks := lex(sql)
	idx := significant(toks)
	if len(idx) == 0 || !toks[idx[0]].is("copy") {
		return "", "", ""
	}
	depth := 0
	for k := 1; k+1 < len(idx); k++ {
		t := toks[idx[k]]
		switch {
		case t.is("("):
			depth++
		case t.is(")"):
			depth--
		case depth == 0 && t.is("from") && toks[idx[k+1]].is("stdin"):
			return "in", "", ""
		case depth == 0 && t.is("to") && toks[idx[k+1]].is("stdout"):
			source = strings.TrimSpace(join(toks[idx[1]:idx[k]]))
			options = strings.TrimSuffix(strings.TrimSpace(join(toks[idx[k+1]+1:])), ";")
			return "out", source, options
		}
	}
	return "", "", ""
}
