package udf

import (
	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/udf/internal/vectors"
)

// One declaration per result.
//
// A STRUCT result is declared once, as a layout: its columns in order, each
// with its SQL name, its DuckDB type and how its value is read from the
// stats result. The DuckDB type (info), the values written for a row
// (record, positional), diagnose's column list and the README's field
// tables (layout_test.go checks them) all come from that one list.

// kind is the DuckDB type of a column.
type kind int

const (
	kindDouble   kind = iota // DOUBLE
	kindBigint               // BIGINT
	kindBoolean              // BOOLEAN
	kindVarchar              // VARCHAR
	kindVarchars             // VARCHAR[], given as a []any of strings
	kindDoubles              // DOUBLE[], given as a doubleList (NaN for NULL)
)

func (k kind) info(t *types) duckdb.TypeInfo {
	switch k {
	case kindBigint:
		return t.bigint()
	case kindBoolean:
		return t.boolean()
	case kindVarchar:
		return t.varchar()
	case kindVarchars:
		return t.list(t.varchar())
	case kindDoubles:
		return t.doubles()
	}
	return t.double()
}

// column is one field of a result of type R: nil from get is SQL NULL.
type column[R any] struct {
	name string
	kind kind
	get  func(*R) any
}

// layout is the declared columns of a result of type R.
type layout[R any] struct {
	columns []column[R]
	names   []string
}

func newLayout[R any](columns ...column[R]) *layout[R] {
	l := &layout[R]{columns: columns, names: make([]string, len(columns))}
	for i, c := range columns {
		l.names[i] = c.name
	}
	return l
}

// info is the STRUCT type of the layout.
func (l *layout[R]) info(t *types) duckdb.TypeInfo {
	fields := make([]field, len(l.columns))
	for i, c := range l.columns {
		fields[i] = field{c.name, c.kind.info(t)}
	}
	return t.structOf(fields...)
}

// record reads one row's values from r, in the declared order.
func (l *layout[R]) record(r *R) record {
	values := make([]any, len(l.columns))
	for i, c := range l.columns {
		values[i] = c.get(r)
	}
	return record{Names: l.names, Values: values}
}

// column returns the column called name and whether there is one.
func (l *layout[R]) column(name string) (column[R], bool) {
	for _, c := range l.columns {
		if c.name == name {
			return c, true
		}
	}
	return column[R]{}, false
}

// record is one STRUCT value, written by position (vectors.Record).
type record = vectors.Record

// Column constructors, one per kind.

func num[R any](name string, get func(*R) any) column[R] {
	return column[R]{name, kindDouble, get}
}
func integer64[R any](name string, get func(*R) any) column[R] {
	return column[R]{name, kindBigint, get}
}
func boolean[R any](name string, get func(*R) any) column[R] {
	return column[R]{name, kindBoolean, get}
}
func varchar[R any](name string, get func(*R) any) column[R] {
	return column[R]{name, kindVarchar, get}
}
func varchars[R any](name string, get func(*R) any) column[R] {
	return column[R]{name, kindVarchars, get}
}
func doubles[R any](name string, get func(*R) any) column[R] {
	return column[R]{name, kindDoubles, get}
}
