package pgserver

import (
	"bytes"
	"encoding/csv"
	"strconv"
	"strings"

	"github.com/jackc/pgx/v5/pgproto3"
)

// copyOut answers COPY (query) TO STDOUT, and COPY table TO STDOUT, which
// psql's \copy sends: the rows go to the client as CopyData in PostgreSQL's
// text format (tab-separated, \N for NULL) or as CSV.
func (sess *session) copyOut(source string, opts copyOptions) (int64, error) {
	query := source
	if strings.HasPrefix(source, "(") {
		query = strings.TrimSuffix(strings.TrimPrefix(source, "("), ")")
	} else {
		query = "SELECT * FROM " + source
	}
	query = normalize(query)
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
	sess.be.Send(&pgproto3.CopyOutResponse{OverallFormat: 0, ColumnFormatCodes: formats})
	line := func(fields []string, null []bool) []byte {
		if opts.csv {
			var b bytes.Buffer
			w := csv.NewWriter(&b)
			w.Comma = rune(opts.delimiter[0])
			w.Write(fields)
			w.Flush()
			return b.Bytes()
		}
		out := make([]string, len(fields))
		for i, f := range fields {
			if null != nil && null[i] {
				out[i] = `\N`
				continue
			}
			out[i] = strings.NewReplacer(`\`, `\\`, "\t", `\t`, "\n", `\n`, "\r", `\r`).Replace(f)
		}
		return []byte(strings.Join(out, opts.delimiter) + "\n")
	}
	if opts.header {
		names := make([]string, len(sh.columns))
		for i, c := range sh.columns {
			names[i] = c.name
		}
		sess.be.Send(&pgproto3.CopyData{Data: line(names, nil)})
	}
	n, err := sess.eachRow(rows, len(sh.columns), 0, func(vals []any) {
		fields := make([]string, len(vals))
		null := make([]bool, len(vals))
		for i, v := range vals {
			null[i] = v == nil
			if v != nil {
				fields[i] = textOf(v, sh.columns[i].oid)
			}
		}
		sess.be.Send(&pgproto3.CopyData{Data: line(fields, null)})
	})
	if err != nil {
		return n, sess.wrap(ctx, err)
	}
	sess.be.Send(&pgproto3.CopyDone{})
	sess.be.Send(&pgproto3.CommandComplete{CommandTag: []byte("COPY " + itoa(n))})
	return n, nil
}

func itoa(n int64) string { return strconv.FormatInt(n, 10) }
