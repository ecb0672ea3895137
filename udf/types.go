package udf

import (
	"fmt"

	"github.com/duckdb/duckdb-go/v2"
)

// types builds DuckDB type descriptions, remembering the first error so that
// a table of function signatures reads without an error check per line.
type types struct{ err error }

func (t *types) of(kind duckdb.Type) duckdb.TypeInfo {
	info, err := duckdb.NewTypeInfo(kind)
	if err != nil && t.err == nil {
		t.err = fmt.Errorf("udf: type %v: %w", kind, err)
	}
	return info
}

func (t *types) double() duckdb.TypeInfo  { return t.of(duckdb.TYPE_DOUBLE) }
func (t *types) bigint() duckdb.TypeInfo  { return t.of(duckdb.TYPE_BIGINT) }
func (t *types) varchar() duckdb.TypeInfo { return t.of(duckdb.TYPE_VARCHAR) }
func (t *types) boolean() duckdb.TypeInfo { return t.of(duckdb.TYPE_BOOLEAN) }
func (t *types) anyType() duckdb.TypeInfo { return t.of(duckdb.TYPE_ANY) }
func (t *types) date() duckdb.TypeInfo    { return t.of(duckdb.TYPE_DATE) }
func (t *types) timestamp() duckdb.TypeInfo {
	return t.of(duckdb.TYPE_TIMESTAMP)
}

func (t *types) list(child duckdb.TypeInfo) duckdb.TypeInfo {
	info, err := duckdb.NewListInfo(child)
	if err != nil && t.err == nil {
		t.err = fmt.Errorf("udf: list type: %w", err)
	}
	return info
}

func (t *types) doubles() duckdb.TypeInfo { return t.list(t.double()) }

// field is one named member of a STRUCT result.
type field struct {
	name string
	info duckdb.TypeInfo
}

func (t *types) structOf(fields ...field) duckdb.TypeInfo {
	entries := make([]duckdb.StructEntry, len(fields))
	for i, f := range fields {
		entry, err := duckdb.NewStructEntry(f.info, f.name)
		if err != nil && t.err == nil {
			t.err = fmt.Errorf("udf: struct field %s: %w", f.name, err)
		}
		entries[i] = entry
	}
	info, err := duckdb.NewStructInfo(entries[0], entries[1:]...)
	if err != nil && t.err == nil {
		t.err = fmt.Errorf("udf: struct type: %w", err)
	}
	return info
}
