// Package output writes query results for people (aligned tables) and for
// programs (CSV, JSON lines).
package output

import (
	"database/sql"
	"encoding/json"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
	"time"

	"github.com/duckdb/duckdb-go/v2"
)

// Format names an output format.
type Format string

const (
	Table Format = "table"
	CSV   Format = "csv"
	JSON  Format = "json"
)

// ParseFormat checks a format name given by a user.
func ParseFormat(s string) (Format, error) {
	switch f := Format(strings.ToLower(s)); f {
	case Table, CSV, JSON:
		return f, nil
	}
	return "", fmt.Errorf("unknown format %q: use table, csv or json", s)
}

// Result is a fully read query result.
type Result struct {
	Columns []string
	Rows    [][]any
}

// Read reads every row of rows.
func Read(rows *sql.Rows) (*Result, error) {
	cols, err := rows.Columns()
	if err != nil {
		return nil, err
	}
	r := &Result{Columns: cols}
	order, err := StructOrderOf(rows)
	if err != nil {
		return nil, err
	}
	for rows.Next() {
		vals := make([]any, len(cols))
		ptrs := make([]any, len(cols))
		for i := range vals {
			ptrs[i] = &vals[i]
		}
		if err := rows.Scan(ptrs...); err != nil {
			return nil, err
		}
		if order != nil {
			order(vals)
		}
		r.Rows = append(r.Rows, vals)
	}
	return r, rows.Err()
}

// StructOrderOf is StructOrder for the columns of rows; the server uses it
// too, so STRUCTs reach its clients with their fields in declared order.
func StructOrderOf(rows *sql.Rows) (func([]any), error) {
	types, err := rows.ColumnTypes()
	if err != nil {
		return nil, err
	}
	names := make([]string, len(types))
	for i, t := range types {
		names[i] = t.DatabaseTypeName()
	}
	return StructOrder(names), nil
}

// Text renders one value for a person: whole floats without a decimal
// point, others with up to 10 significant digits; lists as [a, b]; structs
// (in declared order when read by Read, see StructOrder) and maps as
// {name: value}; NULL as NULL.
func Text(v any) string { return text(v, 10) }

// Exact renders one value with every digit a float64 holds, for CSV.
func Exact(v any) string { return text(v, -1) }

func text(v any, digits int) string {
	switch x := v.(type) {
	case nil:
		return "NULL"
	case float64:
		return formatFloat(x, digits)
	case float32:
		return formatFloat(float64(x), digits)
	case string:
		return x
	case []byte:
		return fmt.Sprintf("\\x%x", x)
	case time.Time:
		if x.Hour() == 0 && x.Minute() == 0 && x.Second() == 0 && x.Nanosecond() == 0 {
			return x.Format("2006-01-02")
		}
		return x.Format("2006-01-02 15:04:05.999999")
	case []any:
		parts := make([]string, len(x))
		for i, e := range x {
			parts[i] = text(e, digits)
		}
		return "[" + strings.Join(parts, ", ") + "]"
	case Struct:
		parts := make([]string, len(x.Names))
		for i, k := range x.Names {
			parts[i] = k + ": " + text(x.Values[i], digits)
		}
		return "{" + strings.Join(parts, ", ") + "}"
	case duckdb.OrderedMap:
		keys, values := x.Keys(), x.Values()
		parts := make([]string, len(keys))
		for i, k := range keys {
			parts[i] = text(k, digits) + ": " + text(values[i], digits)
		}
		return "{" + strings.Join(parts, ", ") + "}"
	case map[string]any: // a STRUCT whose type was not known: fields by name
		keys := make([]string, 0, len(x))
		for k := range x {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		parts := make([]string, len(keys))
		for i, k := range keys {
			parts[i] = k + ": " + text(x[k], digits)
		}
		return "{" + strings.Join(parts, ", ") + "}"
	default:
		return fmt.Sprint(x)
	}
}

// FormatFloat renders a float with the given significant digits (-1 for
// as many as it takes to read back exactly), NaN and ±Infinity spelled as
// PostgreSQL and JSON consumers expect; bits is 32 or 64.
func FormatFloat(f float64, digits, bits int) string {
	switch {
	case math.IsNaN(f):
		return "NaN"
	case math.IsInf(f, 1):
		return "Infinity"
	case math.IsInf(f, -1):
		return "-Infinity"
	}
	return strconv.FormatFloat(f, 'g', digits, bits)
}

func formatFloat(f float64, digits int) string { return FormatFloat(f, digits, 64) }

// JSONValue turns a value read from DuckDB into something encoding/json
// writes faithfully: non-finite floats become strings, times RFC 3339,
// decimals numbers, lists, structs and maps recurse (map keys as text;
// Struct fields and MAP entries keep their order), and
// other values with a String method (intervals, UUIDs) their text.
func JSONValue(v any) any { return jsonValue(v) }

func jsonValue(v any) any {
	switch x := v.(type) {
	case float64:
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return formatFloat(x, -1)
		}
		return x
	case time.Time:
		return x.Format(time.RFC3339Nano)
	case []byte:
		return text(x, -1)
	case []any:
		out := make([]any, len(x))
		for i, e := range x {
			out[i] = jsonValue(e)
		}
		return out
	case map[string]any:
		out := make(map[string]any, len(x))
		for k, e := range x {
			out[k] = jsonValue(e)
		}
		return out
	case Struct:
		out := jsonObject{keys: x.Names, values: make([]any, len(x.Values))}
		for i, e := range x.Values {
			out.values[i] = jsonValue(e)
		}
		return out
	case duckdb.OrderedMap:
		keys, values := x.Keys(), x.Values()
		out := jsonObject{keys: make([]string, len(keys)), values: make([]any, len(values))}
		for i, k := range keys {
			out.keys[i], out.values[i] = text(k, -1), jsonValue(values[i])
		}
		return out
	case duckdb.Map:
		out := make(map[string]any, len(x))
		for k, e := range x {
			out[fmt.Sprint(k)] = jsonValue(e)
		}
		return out
	case duckdb.Interval:
		return fmt.Sprintf("%d months %d days %d microseconds", x.Months, x.Days, x.Micros)
	case interface{ Float64() float64 }: // DECIMAL
		return jsonValue(x.Float64())
	case fmt.Stringer:
		return x.String()
	default:
		if _, err := json.Marshal(x); err != nil {
			return fmt.Sprint(x)
		}
		return x
	}
}
