package pgserver

import (
	"context"
	"database/sql"
	"encoding/binary"
	"strconv"
	"strings"

	"github.com/jackc/pgx/v5/pgproto3"
)

// copyOut answers COPY (query) TO STDOUT, and COPY table TO STDOUT, which
// psql's \copy sends: the rows go to the client as CopyData, one row a
// message as PostgreSQL sends them, in PostgreSQL's text format
// (tab-separated, \N for NULL, backslash escapes) or as CSV (NULL as an
// empty field, an empty string as ""). Each row is written into one reused
// buffer.
func (sess *session) copyOut(source string, opts copyOptions) (int64, error) {
	query := source
	if strings.HasPrefix(source, "(") {
		query = strings.TrimSuffix(strings.TrimPrefix(source, "("), ")")
	} else {
		query = "SELECT * FROM " + source
	}
	ctx := sess.begin()
	defer sess.end()
	sh, err := sess.describeSQL(ctx, query)
	if err != nil {
		return 0, err
	}
	rows, err := sess.db.QueryContext(ctx, query)
	if err != nil {
		return 0, sess.wrap(ctx, err)
	}
	defer rows.Close()
	formats := make([]uint16, len(sh.columns))
	if opts.binary {
		for i := range formats {
			formats[i] = 1
		}
		sess.be.Send(&pgproto3.CopyOutResponse{OverallFormat: 1, ColumnFormatCodes: formats})
		return sess.copyOutBinary(ctx, rows, sh.columns)
	}
	sess.be.Send(&pgproto3.CopyOutResponse{OverallFormat: 0, ColumnFormatCodes: formats})
	var line []byte
	field := func(s string, null bool) {
		switch {
		case null && opts.csv:
			line = append(line, opts.null...)
		case null:
			line = append(line, opts.null...)
		case opts.csv:
			line = appendCSVField(line, s, opts.delimiter[0], opts.null)
		default:
			line = appendTextField(line, s, opts.delimiter[0])
		}
	}
	if opts.header {
		line = line[:0]
		for i, c := range sh.columns {
			if i > 0 {
				line = append(line, opts.delimiter...)
			}
			field(c.name, false)
		}
		line = append(line, '\n')
		sess.be.Send(&pgproto3.CopyData{Data: line})
	}
	n, err := sess.eachRow(rows, len(sh.columns), 0, func(vals []any) {
		line = line[:0]
		for i, v := range vals {
			if i > 0 {
				line = append(line, opts.delimiter...)
			}
			if v == nil {
				field("", true)
			} else {
				field(textOf(v, sh.columns[i].oid), false)
			}
		}
		line = append(line, '\n')
		sess.be.Send(&pgproto3.CopyData{Data: line})
	})
	if err != nil {
		return n, sess.wrap(ctx, err)
	}
	sess.be.Send(&pgproto3.CopyDone{})
	sess.be.Send(&pgproto3.CommandComplete{CommandTag: []byte("COPY " + itoa(n))})
	return n, nil
}

// copyOutBinary sends rows in PostgreSQL's binary COPY format: the
// signature, flags and an empty header extension, then each row as a field
// count and (length, bytes) fields in the types' binary forms, -1 for NULL,
// and a field count of -1 at the end. As PostgreSQL does, the header goes in
// one message with the first row (psycopg reads them together).
func (sess *session) copyOutBinary(ctx context.Context, rows *sql.Rows, cols []column) (int64, error) {
	head := append(append([]byte(nil), pgcopySignature...), 0, 0, 0, 0, 0, 0, 0, 0)
	tuple := head
	n, err := sess.eachRow(rows, len(cols), 0, func(vals []any) {
		tuple = binary.BigEndian.AppendUint16(tuple, uint16(len(vals)))
		for i, v := range vals {
			if v == nil {
				tuple = binary.BigEndian.AppendUint32(tuple, 0xFFFFFFFF)
				continue
			}
			data := encodeBinary(v, cols[i].oid)
			tuple = binary.BigEndian.AppendUint32(tuple, uint32(len(data)))
			tuple = append(tuple, data...)
		}
		sess.be.Send(&pgproto3.CopyData{Data: tuple})
		tuple = tuple[:0]
	})
	if err != nil {
		return n, sess.wrap(ctx, err)
	}
	sess.be.Send(&pgproto3.CopyData{Data: append(tuple, 0xFF, 0xFF)}) // the header too when there was no row
	sess.be.Send(&pgproto3.CopyDone{})
	sess.complete("COPY " + itoa(n))
	return n, nil
}

// appendTextField escapes a value for the text format: backslash, the
// delimiter, newline, carriage return and tab get backslash escapes.
func appendTextField(b []byte, s string, delim byte) []byte {
	for i := 0; i < len(s); i++ {
		switch c := s[i]; c {
		case '\\':
			b = append(b, '\\', '\\')
		case '\n':
			b = append(b, '\\', 'n')
		case '\r':
			b = append(b, '\\', 'r')
		case '\t':
			b = append(b, '\\', 't')
		default:
			if c == delim {
				b = append(b, '\\', c)
			} else {
				b = append(b, c)
			}
		}
	}
	return b
}

// appendCSVField quotes a value for CSV when it holds the delimiter, a
// quote, a line break, or is empty or equal to the NULL string.
func appendCSVField(b []byte, s string, delim byte, null string) []byte {
	if s != "" && s != null && !strings.ContainsAny(s, "\"\r\n") && strings.IndexByte(s, delim) < 0 {
		return append(b, s...)
	}
	b = append(b, '"')
	for i := 0; i < len(s); i++ {
		if s[i] == '"' {
			b = append(b, '"')
		}
		b = append(b, s[i])
	}
	return append(b, '"')
}

func itoa(n int64) string { return strconv.FormatInt(n, 10) }

// copyOptions are the options of a COPY to or from the client.
type copyOptions struct {
	csv, binary bool
	header      bool
	delimiter   string
	null        string
	quote       byte
	escape      byte
}

// parseCopyOptions reads COPY's options in either syntax: WITH (FORMAT
// csv, HEADER true, DELIMITER ',', NULL ”) or the older WITH CSV HEADER
// DELIMITER ',' NULL ”.
func parseCopyOptions(s string) copyOptions {
	o := copyOptions{delimiter: "\t", null: `\N`, quote: '"'}
	toks := lex(s)
	idx := significant(toks)
	value := func(k int) (string, bool) { // the option value after idx[k]
		if k+1 >= len(idx) {
			return "", false
		}
		t := toks[idx[k+1]]
		if v, ok := t.stringValue(); ok {
			return v, true
		}
		if t.kind == tokWord || t.kind == tokNumber {
			return strings.ToLower(t.text), true
		}
		return "", false
	}
	delimSet, nullSet := false, false
	for k := 0; k < len(idx); k++ {
		t := toks[idx[k]]
		switch {
		case t.is("csv"):
			o.csv = true
		case t.is("binary"):
			o.binary = true
		case t.is("format"):
			if v, ok := value(k); ok {
				o.csv, o.binary = v == "csv", v == "binary"
				k++
			}
		case t.is("header"):
			o.header = true
			if v, ok := value(k); ok {
				switch v {
				case "false", "0", "off":
					o.header = false
					k++
				case "true", "1", "on", "match":
					k++
				}
			}
		case t.is("delimiter"):
			if v, ok := value(k); ok && v != "" {
				o.delimiter, delimSet = v, true
				k++
			}
		case t.is("null"):
			if v, ok := value(k); ok {
				o.null, nullSet = v, true
				k++
			}
		case t.is("quote"):
			if v, ok := value(k); ok && v != "" {
				o.quote = v[0]
				k++
			}
		case t.is("escape"):
			if v, ok := value(k); ok && v != "" {
				o.escape = v[0]
				k++
			}
		}
	}
	if o.csv {
		if !delimSet {
			o.delimiter = ","
		}
		if !nullSet {
			o.null = ""
		}
	}
	if o.escape == 0 {
		o.escape = o.quote
	}
	return o
}
