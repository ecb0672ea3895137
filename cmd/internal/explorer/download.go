package explorer

import (
	"context"
	"database/sql"
	"encoding/csv"
	"fmt"
	"net/http"
	"strings"

	"github.com/plumb-sql/plumb/cmd/internal/output"
	"github.com/plumb-sql/plumb/udf"
)

// downloadSQL selects every column of the filtered list (but plumb_id), in
// the list's order, each cast to a type the downloads write: booleans,
// BIGINT, DOUBLE, VARCHAR, VARCHAR[], DATE and TIMESTAMP.
func downloadSQL(ctx context.Context, conn *sql.Conn, run *run, q listQuery) (string, []any, []column, error) {
	rows, err := conn.QueryContext(ctx, "SELECT column_name, column_type FROM (DESCRIBE "+udf.QuoteIdent(run.table)+")")
	if err != nil {
		return "", nil, nil, err
	}
	var cols []column
	for rows.Next() {
		var c column
		if err := rows.Scan(&c.Name, &c.Type); err != nil {
			rows.Close()
			return "", nil, nil, err
		}
		if !strings.HasPrefix(c.Name, "plumb_") { // plumb_id, the order columns and plumb_text are the explorer's own
			c.Type = exportType(c.Type)
			cols = append(cols, c)
		}
	}
	rows.Close()
	if err := rows.Err(); err != nil {
		return "", nil, nil, err
	}
	picks := make([]string, len(cols))
	for i, c := range cols {
		picks[i] = fmt.Sprintf("%s::%s AS %s", udf.QuoteIdent(c.Name), c.Type, udf.QuoteIdent(c.Name))
	}
	where, args := q.where(run.Spec.By)
	return fmt.Sprintf("SELECT %s FROM %s WHERE %s ORDER BY %s", strings.Join(picks, ", "), udf.QuoteIdent(run.table), where, q.orderBy()),
		args, cols, nil
}

// exportType maps a DuckDB column type to the few the downloads write.
func exportType(t string) string {
	u := strings.ToUpper(t)
	switch {
	case u == "BOOLEAN":
		return "BOOLEAN"
	case strings.HasSuffix(u, "[]"):
		return "VARCHAR[]"
	case u == "DATE":
		return "DATE"
	case strings.HasPrefix(u, "TIMESTAMP"):
		return "TIMESTAMP"
	case u == "FLOAT" || u == "DOUBLE" || strings.HasPrefix(u, "DECIMAL"):
		return "DOUBLE"
	case isNumeric(u) && u != "UBIGINT" && u != "HUGEINT":
		return "BIGINT"
	}
	return "VARCHAR"
}

// handleListDownload streams the filtered list as CSV or Parquet.
func (e *Explorer) handleListDownload(format string) runHandler {
	return func(w http.ResponseWriter, r *http.Request, s *session, run *run, info *runInfo) {
		q, err := parseList(r.URL.Query(), info)
		if err != nil {
			e.fail(w, r, http.StatusBadRequest, err)
			return
		}
		ctx, cancel, ok := e.useSession(w, r, s)
		if !ok {
			return
		}
		defer cancel()
		defer s.release()
		query, args, cols, err := downloadSQL(ctx, s.conn, run, q)
		if err != nil {
			e.fail(w, r, http.StatusInternalServerError, err)
			return
		}
		rows, err := s.conn.QueryContext(ctx, query, args...)
		if err != nil {
			e.fail(w, r, http.StatusInternalServerError, err)
			return
		}
		defer rows.Close()
		name := fileName(run.Src.Name) + "_diagnosis." + format
		secureHeaders(w)
		w.Header().Set("Content-Disposition", `attachment; filename="`+name+`"`)
		if format == "csv" {
			w.Header().Set("Content-Type", "text/csv; charset=utf-8")
			err = writeRowsCSV(w, rows, cols)
		} else {
			w.Header().Set("Content-Type", "application/vnd.apache.parquet")
			err = writeParquet(w, rows, cols)
		}
		if err != nil {
			e.cfg.Log.Warn("explorer download ended early", "user", s.user, "error", err)
		}
	}
}

func writeRowsCSV(w http.ResponseWriter, rows *sql.Rows, cols []column) error {
	cw := csv.NewWriter(w)
	header := make([]string, len(cols))
	for i, c := range cols {
		header[i] = c.Name
	}
	if err := cw.Write(header); err != nil {
		return err
	}
	vals := make([]any, len(cols))
	ptrs := make([]any, len(cols))
	for i := range vals {
		ptrs[i] = &vals[i]
	}
	rec := make([]string, len(cols))
	for rows.Next() {
		if err := rows.Scan(ptrs...); err != nil {
			return err
		}
		for i, v := range vals {
			rec[i] = csvCell(v)
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return err
	}
	return rows.Err()
}

// csvCell writes a value exactly (output.Exact), a list as its elements
// joined by "|", NULL as empty.
func csvCell(v any) string {
	switch x := v.(type) {
	case nil:
		return ""
	case []any:
		parts := make([]string, len(x))
		for i, e := range x {
			parts[i] = output.Exact(e)
		}
		return strings.Join(parts, "|")
	}
	return output.Exact(v)
}

// fileName keeps letters, digits, '-' and '_' of a source's name for a
// download's file name.
func fileName(s string) string {
	s = strings.TrimSuffix(s, ".parquet")
	var b strings.Builder
	for _, r := range s {
		switch {
		case r >= 'a' && r <= 'z', r >= 'A' && r <= 'Z', r >= '0' && r <= '9', r == '-', r == '_':
			b.WriteRune(r)
		default:
			b.WriteByte('_')
		}
	}
	if b.Len() == 0 {
		return "groups"
	}
	return b.String()
}

// handleGroupDownload writes one group's history, transformed series or
// forecasts as CSV.
func (e *Explorer) handleGroupDownload(w http.ResponseWriter, r *http.Request, s *session, run *run, info *runInfo) {
	part := r.PathValue("part")
	if part != "history.csv" && part != "transformed.csv" && part != "forecast.csv" {
		e.fail(w, r, http.StatusNotFound, fmt.Errorf("no download %q: history.csv, transformed.csv or forecast.csv", part))
		return
	}
	if len(r.URL.Query()) > 0 {
		e.fail(w, r, http.StatusBadRequest, fmt.Errorf("a group's download takes no parameters"))
		return
	}
	id, err := parseGroupID(r)
	if err != nil {
		e.fail(w, r, http.StatusNotFound, err)
		return
	}
	ctx, cancel, ok := e.useSession(w, r, s)
	if !ok {
		return
	}
	defer cancel()
	row, err := readGroupRow(ctx, s.conn, run, info, id)
	var g *groupSeries
	if err == nil {
		g, err = loadSeries(ctx, s.conn, run, info, row.Keys, row.int("period"))
	}
	s.release()
	if err != nil {
		e.fail(w, r, http.StatusNotFound, err)
		return
	}
	var records [][]string
	keyHeader, keyValues := append([]string{}, run.Spec.By...), make([]string, len(run.Spec.By))
	for i, k := range row.Keys {
		keyValues[i] = nullText(k)
	}
	num := func(v float64) string { return output.Exact(v) }
	switch part {
	case "history.csv":
		records = append(records, append(keyHeader, run.Spec.At, run.Spec.Value))
		for i, y := range g.Y {
			records = append(records, append(append([]string{}, keyValues...), xText(g.X, g.X.X[i]), num(y)))
		}
	case "transformed.csv":
		records = append(records, append(keyHeader, run.Spec.At, "transformed"))
		for i, y := range g.Transformed {
			records = append(records, append(append([]string{}, keyValues...), xText(g.TX, g.TX.X[i]), num(y)))
		}
	case "forecast.csv":
		records = append(records, append(keyHeader, "step", run.Spec.At, "forecast", "lower", "upper"))
		for i := range g.FX.X {
			records = append(records, append(append([]string{}, keyValues...), fmt.Sprint(i+1), xText(g.FX, g.FX.X[i]),
				num(g.Forecast.Mean[i]), num(g.Forecast.Lower[i]), num(g.Forecast.Upper[i])))
		}
	}
	secureHeaders(w)
	w.Header().Set("Content-Type", "text/csv; charset=utf-8")
	w.Header().Set("Content-Disposition", fmt.Sprintf(`attachment; filename="%s_%d_%s"`, fileName(run.Src.Name), id, part))
	cw := csv.NewWriter(w)
	cw.WriteAll(records)
}
