package output

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"strings"
	"unicode/utf8"
)

// Write writes r to w in format f.
func Write(w io.Writer, r *Result, f Format) error {
	switch f {
	case CSV:
		return writeCSV(w, r)
	case JSON:
		return writeJSON(w, r)
	default:
		return writeTable(w, r)
	}
}

// writeTable writes an aligned table: a header, a rule, one line a row,
// numbers right-aligned, and a row count.
func writeTable(w io.Writer, r *Result) error {
	cells := make([][]string, len(r.Rows))
	width := make([]int, len(r.Columns))
	numeric := make([]bool, len(r.Columns))
	for j, c := range r.Columns {
		width[j] = utf8.RuneCountInString(c)
		numeric[j] = true
	}
	for i, row := range r.Rows {
		cells[i] = make([]string, len(row))
		for j, v := range row {
			s := strings.ReplaceAll(Text(v), "\n", " ")
			cells[i][j] = s
			width[j] = max(width[j], utf8.RuneCountInString(s))
			if v != nil && !isNumber(v) {
				numeric[j] = false
			}
		}
	}
	line := func(vals []string) string {
		parts := make([]string, len(vals))
		for j, s := range vals {
			pad := strings.Repeat(" ", width[j]-utf8.RuneCountInString(s))
			if numeric[j] {
				parts[j] = pad + s
			} else {
				parts[j] = s + pad
			}
		}
		return strings.TrimRight(strings.Join(parts, "  "), " ")
	}
	var b strings.Builder
	b.WriteString(line(r.Columns) + "\n")
	rules := make([]string, len(width))
	for j, n := range width {
		rules[j] = strings.Repeat("-", n)
	}
	b.WriteString(strings.Join(rules, "  ") + "\n")
	for _, row := range cells {
		b.WriteString(line(row) + "\n")
	}
	noun := "rows"
	if len(r.Rows) == 1 {
		noun = "row"
	}
	fmt.Fprintf(&b, "(%d %s)\n", len(r.Rows), noun)
	_, err := io.WriteString(w, b.String())
	return err
}

func isNumber(v any) bool {
	switch v.(type) {
	case int, int8, int16, int32, int64, uint, uint8, uint16, uint32, uint64, float32, float64:
		return true
	}
	return false
}

func writeCSV(w io.Writer, r *Result) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(r.Columns); err != nil {
		return err
	}
	rec := make([]string, len(r.Columns))
	for _, row := range r.Rows {
		for j, v := range row {
			if v == nil {
				rec[j] = ""
			} else {
				rec[j] = Exact(v)
			}
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// writeJSON writes one JSON object a row (JSON lines), keys in column order.
func writeJSON(w io.Writer, r *Result) error {
	for _, row := range r.Rows {
		var b strings.Builder
		b.WriteByte('{')
		for j, v := range row {
			if j > 0 {
				b.WriteByte(',')
			}
			k, _ := json.Marshal(r.Columns[j])
			val, err := json.Marshal(jsonValue(v))
			if err != nil {
				return fmt.Errorf("column %s: %w", r.Columns[j], err)
			}
			b.Write(k)
			b.WriteByte(':')
			b.Write(val)
		}
		b.WriteString("}\n")
		if _, err := io.WriteString(w, b.String()); err != nil {
			return err
		}
	}
	return nil
}
