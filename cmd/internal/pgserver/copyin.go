package pgserver

import (
	"bufio"
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"strings"

	"github.com/jackc/pgx/v5/pgproto3"
)

// COPY table [(columns)] FROM STDIN, in PostgreSQL's text, CSV and binary
// formats. The data a client sends over its own connection touches no
// file, so the sandbox allows it. Rows are read from the CopyData stream as
// they come and inserted a batch at a time, as rows of typed literals, on
// the session's connection: inside the client's transaction when it has one,
// in a transaction of their own otherwise, so a COPY that fails leaves no
// row behind. Memory stays bounded by one batch.

// copyBatchRows is how many rows one INSERT carries.
const copyBatchRows = 1000

// copyIn runs COPY ... FROM STDIN.
func (sess *session) copyIn(sql string) (int64, error) {
	target, columns, opts, err := parseCopyIn(sql)
	if err != nil {
		return 0, err
	}
	if sess.srv.cfg.ReadOnly {
		return 0, pgError{stateReadOnlyTxn, "cannot execute COPY FROM in a read-only server (--read-only)"}
	}
	if sess.txn == 'E' {
		return 0, pgError{stateInFailedTxn, "current transaction is aborted, commands ignored until end of transaction block"}
	}
	list := "*"
	if len(columns) > 0 {
		quoted := make([]string, len(columns))
		for i, c := range columns {
			quoted[i] = quoteIdentifier(c)
		}
		list = strings.Join(quoted, ", ")
	}
	ctx := sess.begin()
	defer sess.end()
	sh, err := sess.describeSQL(ctx, "SELECT "+list+" FROM "+target)
	if err != nil {
		return 0, err
	}
	if len(columns) == 0 {
		for _, c := range sh.columns {
			columns = append(columns, quoteIdentifier(c.name))
		}
		list = strings.Join(columns, ", ")
	}
	format := int8(0)
	if opts.binary {
		format = 1
	}
	codes := make([]uint16, len(sh.columns))
	for i := range codes {
		codes[i] = uint16(format)
	}
	sess.be.Send(&pgproto3.CopyInResponse{OverallFormat: byte(format), ColumnFormatCodes: codes})
	if err := sess.be.Flush(); err != nil {
		return 0, err
	}
	own := sess.txn == 'I'
	if own {
		if _, err := sess.db.ExecContext(ctx, "BEGIN TRANSACTION"); err != nil {
			sess.drainCopy()
			return 0, sess.wrap(ctx, err)
		}
	}
	in := &copyStream{sess: sess}
	ins := &copyInserter{sess: sess, ctx: ctx, prefix: "INSERT INTO " + target + " (" + list + ") VALUES "}
	var n int64
	switch {
	case opts.binary:
		n, err = readBinaryCopy(bufio.NewReaderSize(in, 64<<10), sh.columns, ins)
	default:
		n, err = readTextCopy(bufio.NewReaderSize(in, 64<<10), sh.columns, opts, ins)
	}
	if err == nil {
		err = ins.flush()
	}
	if err != nil {
		if !in.ended {
			sess.drainCopy()
		}
		if own {
			sess.db.ExecContext(context.Background(), "ROLLBACK")
		}
		return 0, sess.wrap(ctx, err)
	}
	if own {
		if _, err := sess.db.ExecContext(ctx, "COMMIT"); err != nil {
			return 0, sess.wrap(ctx, err)
		}
	}
	sess.complete("COPY " + itoa(n))
	return n, nil
}

// parseCopyIn reads COPY target [(columns)] FROM STDIN [options].
func parseCopyIn(sql string) (target string, columns []string, opts copyOptions, err error) {
	toks := lex(sql)
	idx := significant(toks)
	k := 1
	var name []string
	for ; k < len(idx) && !toks[idx[k]].is("(") && !toks[idx[k]].is("from"); k++ {
		name = append(name, toks[idx[k]].text)
	}
	if k < len(idx) && toks[idx[k]].is("(") {
		for k++; k < len(idx) && !toks[idx[k]].is(")"); k++ {
			if n := toks[idx[k]].name(); n != "" {
				columns = append(columns, n)
			}
		}
		k++
	}
	if len(name) == 0 || k+1 >= len(idx) || !toks[idx[k]].is("from") || !toks[idx[k+1]].is("stdin") {
		return "", nil, opts, pgError{stateSyntax, "COPY ... FROM STDIN: expected COPY table [(columns)] FROM STDIN [options]"}
	}
	rest := ""
	if k+2 < len(idx) {
		rest = join(toks[idx[k+2]:])
	}
	return strings.Join(name, ""), columns, parseCopyOptions(rest), nil
}

// copyStream reads the CopyData messages of a COPY FROM STDIN as one
// stream; it ends at CopyDone and fails at CopyFail.
type copyStream struct {
	sess  *session
	buf   []byte
	ended bool
}

func (c *copyStream) Read(p []byte) (int, error) {
	for len(c.buf) == 0 {
		if c.ended {
			return 0, io.EOF
		}
		msg, err := c.sess.be.Receive()
		if err != nil {
			c.ended = true
			return 0, err
		}
		switch m := msg.(type) {
		case *pgproto3.CopyData:
			c.buf = append(c.buf[:0], m.Data...)
		case *pgproto3.CopyDone:
			c.ended = true
			return 0, io.EOF
		case *pgproto3.CopyFail:
			c.ended = true
			return 0, pgError{stateQueryCanceled, "COPY from stdin failed: " + m.Message}
		case *pgproto3.Flush, *pgproto3.Sync:
			// allowed during COPY; Sync is answered after it
		default:
			c.ended = true
			return 0, pgError{stateProtocolViolation, fmt.Sprintf("unexpected message %T during COPY from stdin", msg)}
		}
	}
	n := copy(p, c.buf)
	c.buf = c.buf[n:]
	return n, nil
}

// drainCopy reads and drops the rest of a COPY the server gave up on, as
// PostgreSQL does, so that the client's next message is read in step.
func (sess *session) drainCopy() {
	for {
		msg, err := sess.be.Receive()
		if err != nil {
			return
		}
		switch msg.(type) {
		case *pgproto3.CopyDone, *pgproto3.CopyFail:
			return
		}
	}
}

// copyInserter collects rows of literals and inserts them a batch at a time.
type copyInserter struct {
	sess   *session
	ctx    context.Context
	prefix string
	sql    bytes.Buffer
	rows   int
}

func (ins *copyInserter) add(literals []string) error {
	if ins.rows == 0 {
		ins.sql.Reset()
		ins.sql.WriteString(ins.prefix)
	} else {
		ins.sql.WriteString(", ")
	}
	ins.sql.WriteByte('(')
	ins.sql.WriteString(strings.Join(literals, ", "))
	ins.sql.WriteByte(')')
	ins.rows++
	if ins.rows >= copyBatchRows || ins.sql.Len() > 4<<20 {
		return ins.flush()
	}
	return nil
}

func (ins *copyInserter) flush() error {
	if ins.rows == 0 {
		return nil
	}
	ins.rows = 0
	_, err := ins.sess.db.ExecContext(ins.ctx, ins.sql.String())
	return err
}

// readTextCopy reads the text or CSV format, a row at a time.
func readTextCopy(r *bufio.Reader, cols []column, opts copyOptions, ins *copyInserter) (int64, error) {
	var n int64
	line := 0
	first := true
	for {
		var fields []string
		var nulls []bool
		var err error
		if opts.csv {
			fields, nulls, err = readCSVRecord(r, opts)
		} else {
			fields, nulls, err = readTextRecord(r, opts)
		}
		if errors.Is(err, io.EOF) && fields == nil {
			return n, nil
		}
		if err != nil && !errors.Is(err, io.EOF) {
			return n, err
		}
		line++
		if first && opts.header {
			first = false
			continue
		}
		first = false
		if len(fields) == 1 && !opts.csv && fields[0] == `\.` { // end-of-data marker
			return n, nil
		}
		if len(fields) != len(cols) {
			return n, pgError{stateBadCopyData, fmt.Sprintf("COPY from stdin, line %d: %d fields, the table has %d columns", line, len(fields), len(cols))}
		}
		literals := make([]string, len(fields))
		for i, f := range fields {
			if nulls[i] {
				literals[i] = "NULL"
				continue
			}
			lit, lerr := copyTextLiteral(f, cols[i].oid)
			if lerr != nil {
				return n, pgError{stateBadCopyData, fmt.Sprintf("COPY from stdin, line %d, column %s: %v", line, cols[i].name, lerr)}
			}
			literals[i] = lit
		}
		if err := ins.add(literals); err != nil {
			return n, err
		}
		n++
		if errors.Is(err, io.EOF) {
			return n, nil
		}
	}
}

// copyTextLiteral quotes one text value; arrays in PostgreSQL's {...}
// form become DuckDB lists, everything else a string DuckDB casts to the
// column's type.
func copyTextLiteral(s string, oid uint32) (string, error) {
	if elem, ok := elementOf[oid]; ok && strings.HasPrefix(strings.TrimSpace(s), "{") {
		items, err := textArrayLiterals(s, elem)
		if err != nil {
			return "", err
		}
		return "[" + strings.Join(items, ", ") + "]", nil
	}
	if oid == oidBytea {
		return textLiteral(s, oid, "")
	}
	return sqlQuote(s), nil
}

// readTextRecord reads one line of the text format: fields split at the
// delimiter, backslash escapes decoded, the NULL string (\N) as NULL.
func readTextRecord(r *bufio.Reader, opts copyOptions) ([]string, []bool, error) {
	raw, err := r.ReadString('\n')
	if raw == "" && err != nil {
		return nil, nil, err
	}
	raw = strings.TrimSuffix(strings.TrimSuffix(raw, "\n"), "\r")
	var fields []string
	var nulls []bool
	delim := opts.delimiter[0]
	var b strings.Builder
	start := 0
	flush := func(end int) {
		rawField := raw[start:end]
		if rawField == opts.null {
			fields, nulls = append(fields, ""), append(nulls, true)
		} else {
			fields, nulls = append(fields, b.String()), append(nulls, false)
		}
		b.Reset()
	}
	for i := 0; i < len(raw); i++ {
		c := raw[i]
		switch {
		case c == delim:
			flush(i)
			start = i + 1
		case c == '\\' && i+1 < len(raw):
			i++
			switch e := raw[i]; e {
			case 'n':
				b.WriteByte('\n')
			case 'r':
				b.WriteByte('\r')
			case 't':
				b.WriteByte('\t')
			case 'b':
				b.WriteByte('\b')
			case 'f':
				b.WriteByte('\f')
			case 'v':
				b.WriteByte('\v')
			default:
				b.WriteByte(e)
			}
		default:
			b.WriteByte(c)
		}
	}
	flush(len(raw))
	return fields, nulls, err
}

// readCSVRecord reads one CSV record, which may span lines inside quotes;
// an unquoted field equal to the NULL string is NULL, a quoted one never.
func readCSVRecord(r *bufio.Reader, opts copyOptions) ([]string, []bool, error) {
	var fields []string
	var nulls []bool
	var b strings.Builder
	quoted, inQuotes, any := false, false, false
	delim := opts.delimiter[0]
	end := func() {
		v := b.String()
		fields = append(fields, v)
		nulls = append(nulls, !quoted && v == opts.null)
		b.Reset()
		quoted = false
	}
	for {
		c, err := r.ReadByte()
		if err != nil {
			if !any {
				return nil, nil, err
			}
			end()
			return fields, nulls, io.EOF
		}
		any = true
		switch {
		case inQuotes && c == opts.escape && opts.escape != opts.quote:
			if next, err := r.ReadByte(); err == nil {
				b.WriteByte(next)
			}
		case inQuotes && c == opts.quote:
			if next, err := r.Peek(1); err == nil && next[0] == opts.quote {
				r.ReadByte()
				b.WriteByte(opts.quote)
			} else {
				inQuotes = false
			}
		case inQuotes:
			b.WriteByte(c)
		case c == opts.quote:
			inQuotes, quoted = true, true
		case c == delim:
			end()
		case c == '\n':
			end()
			return fields, nulls, nil
		case c == '\r':
			if next, err := r.Peek(1); err == nil && next[0] == '\n' {
				r.ReadByte()
			}
			end()
			return fields, nulls, nil
		default:
			b.WriteByte(c)
		}
	}
}

// pgcopySignature opens PostgreSQL's binary COPY format.
var pgcopySignature = []byte("PGCOPY\n\xff\r\n\x00")

// readBinaryCopy reads the binary format: the signature, flags and header
// extension, then tuples of (length, bytes) fields, -1 for NULL, up to a
// field count of -1.
func readBinaryCopy(r *bufio.Reader, cols []column, ins *copyInserter) (int64, error) {
	head := make([]byte, len(pgcopySignature)+8)
	if _, err := io.ReadFull(r, head); err != nil || !bytes.Equal(head[:len(pgcopySignature)], pgcopySignature) {
		return 0, pgError{stateBadCopyData, "COPY file signature not recognized"}
	}
	if ext := binary.BigEndian.Uint32(head[len(head)-4:]); ext > 0 {
		if _, err := io.CopyN(io.Discard, r, int64(ext)); err != nil {
			return 0, pgError{stateBadCopyData, "COPY header extension cut short"}
		}
	}
	var n int64
	var word [4]byte
	for {
		if _, err := io.ReadFull(r, word[:2]); err != nil {
			if errors.Is(err, io.EOF) {
				return n, nil
			}
			return n, pgError{stateBadCopyData, "COPY data cut short"}
		}
		count := int16(binary.BigEndian.Uint16(word[:2]))
		if count == -1 {
			return n, nil
		}
		if int(count) != len(cols) {
			return n, pgError{stateBadCopyData, fmt.Sprintf("row %d has %d fields, the table has %d columns", n+1, count, len(cols))}
		}
		literals := make([]string, len(cols))
		for i := range cols {
			if _, err := io.ReadFull(r, word[:]); err != nil {
				return n, pgError{stateBadCopyData, "COPY data cut short"}
			}
			size := int32(binary.BigEndian.Uint32(word[:]))
			if size < 0 {
				literals[i] = "NULL"
				continue
			}
			// Read as the bytes arrive, so a field length the data does
			// not back costs no memory.
			data, err := readGrowing(r, nil, int(size))
			if err != nil {
				return n, pgError{stateBadCopyData, "COPY data cut short"}
			}
			if _, isArray := elementOf[cols[i].oid]; isArray {
				var items []string
				items, err = binaryArrayLiterals(data)
				literals[i] = "[" + strings.Join(items, ", ") + "]"
			} else {
				literals[i], err = binaryLiteral(data, cols[i].oid)
			}
			if err != nil {
				return n, pgError{stateBadCopyData, fmt.Sprintf("row %d, column %s: %v", n+1, cols[i].name, err)}
			}
		}
		if err := ins.add(literals); err != nil {
			return n, err
		}
		n++
	}
}
