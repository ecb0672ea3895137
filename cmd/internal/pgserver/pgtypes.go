package pgserver

import (
	"fmt"
	"strings"
)

// pgType is one row of PostgreSQL's pg_type for a type plumb sends or
// accepts: its OID, name, size, category, the name format_type prints, and
// the DuckDB type its values become. Numbers come from PostgreSQL 15's
// pg_type catalogue (src/include/catalog/pg_type.dat), common practice.
type pgType struct {
	oid      uint32
	name     string // typname
	length   int16  // typlen, -1 for variable length
	category byte   // typcategory
	format   string // what format_type() prints
	duckdb   string // the DuckDB type a value of it is cast to
	elem     uint32 // for an array type, its element's OID
}

// arrayOID is what arrays of this type are, 0 if none is listed.
func (t pgType) arrayOID() uint32 {
	for _, a := range pgTypes {
		if a.elem == t.oid {
			return a.oid
		}
	}
	return 0
}

// pgTypes lists every type the server describes columns or parameters as,
// and the others drivers look up by name (pgjdbc asks for them all in
// getTypeInfo). Element types come before their arrays.
var pgTypes = []pgType{
	{oidBool, "bool", 1, 'B', "boolean", "BOOLEAN", 0},
	{oidBytea, "bytea", -1, 'U', "bytea", "BLOB", 0},
	{18, "char", 1, 'Z', `"char"`, "VARCHAR", 0},
	{19, "name", 64, 'S', "name", "VARCHAR", 0},
	{oidInt8, "int8", 8, 'N', "bigint", "BIGINT", 0},
	{oidInt2, "int2", 2, 'N', "smallint", "SMALLINT", 0},
	{oidInt4, "int4", 4, 'N', "integer", "INTEGER", 0},
	{oidText, "text", -1, 'S', "text", "VARCHAR", 0},
	{26, "oid", 4, 'N', "oid", "BIGINT", 0},
	{oidJSON, "json", -1, 'U', "json", "VARCHAR", 0},
	{oidFloat4, "float4", 4, 'N', "real", "FLOAT", 0},
	{oidFloat8, "float8", 8, 'N', "double precision", "DOUBLE", 0},
	{oidUnknown, "unknown", -2, 'X', "unknown", "VARCHAR", 0},
	{1042, "bpchar", -1, 'S', "character", "VARCHAR", 0},
	{oidVarchar, "varchar", -1, 'S', "character varying", "VARCHAR", 0},
	{oidDate, "date", 4, 'D', "date", "DATE", 0},
	{oidTime, "time", 8, 'D', "time without time zone", "TIME", 0},
	{oidTimestamp, "timestamp", 8, 'D', "timestamp without time zone", "TIMESTAMP", 0},
	{oidTimestampTZ, "timestamptz", 8, 'D', "timestamp with time zone", "TIMESTAMPTZ", 0},
	{oidInterval, "interval", 16, 'T', "interval", "INTERVAL", 0},
	{oidNumeric, "numeric", -1, 'N', "numeric", "DECIMAL(38,10)", 0},
	{oidUUID, "uuid", 16, 'U', "uuid", "UUID", 0},
	{3802, "jsonb", -1, 'U', "jsonb", "VARCHAR", 0},
	{oidBoolArray, "_bool", -1, 'A', "boolean[]", "BOOLEAN[]", oidBool},
	{1001, "_bytea", -1, 'A', "bytea[]", "BLOB[]", oidBytea},
	{oidInt2Array, "_int2", -1, 'A', "smallint[]", "SMALLINT[]", oidInt2},
	{oidInt4Array, "_int4", -1, 'A', "integer[]", "INTEGER[]", oidInt4},
	{oidTextArray, "_text", -1, 'A', "text[]", "VARCHAR[]", oidText},
	{1015, "_varchar", -1, 'A', "character varying[]", "VARCHAR[]", oidVarchar},
	{oidInt8Array, "_int8", -1, 'A', "bigint[]", "BIGINT[]", oidInt8},
	{oidFloat4Array, "_float4", -1, 'A', "real[]", "FLOAT[]", oidFloat4},
	{oidFloat8Array, "_float8", -1, 'A', "double precision[]", "DOUBLE[]", oidFloat8},
	{1028, "_oid", -1, 'A', "oid[]", "BIGINT[]", 26},
	{199, "_json", -1, 'A', "json[]", "VARCHAR[]", oidJSON},
	{1182, "_date", -1, 'A', "date[]", "DATE[]", oidDate},
	{1115, "_timestamp", -1, 'A', "timestamp without time zone[]", "TIMESTAMP[]", oidTimestamp},
	{1185, "_timestamptz", -1, 'A', "timestamp with time zone[]", "TIMESTAMPTZ[]", oidTimestampTZ},
	{1231, "_numeric", -1, 'A', "numeric[]", "DECIMAL(38,10)[]", oidNumeric},
	{2951, "_uuid", -1, 'A', "uuid[]", "UUID[]", oidUUID},
}

// pgTypeOf finds a type by OID.
func pgTypeOf(oid uint32) (pgType, bool) {
	for _, t := range pgTypes {
		if t.oid == oid {
			return t, true
		}
	}
	return pgType{}, false
}

// duckdbTypeName is the DuckDB type a parameter of type oid is cast to; ""
// for unknown (untyped) parameters.
func duckdbTypeName(oid uint32) string {
	if oid == 0 || oid == oidUnknown {
		return ""
	}
	if t, ok := pgTypeOf(oid); ok {
		return t.duckdb
	}
	return ""
}

// pgTypeRows is pg_type as a VALUES list for the compatibility view.
func pgTypeRows(pgCatalogOID int64) string {
	var rows []string
	for _, t := range pgTypes {
		typtype, delim, input := "b", ",", t.name+"in"
		if t.elem != 0 {
			input = "array_in"
		}
		byval := t.length > 0 && t.length <= 8
		rows = append(rows, fmt.Sprintf("(%d, %s, %d, %d, %t, '%s', '%c', %s, %d, %d, %s, %s, %s)",
			t.oid, sqlQuote(t.name), pgCatalogOID, t.length, byval, typtype, t.category, sqlQuote(delim),
			t.elem, t.arrayOID(), sqlQuote(input), sqlQuote(strings.TrimSuffix(input, "in")+"out"), sqlQuote(t.format)))
	}
	return strings.Join(rows, ",\n")
}

// sqlQuote quotes s as a SQL string literal.
func sqlQuote(s string) string { return "'" + strings.ReplaceAll(s, "'", "''") + "'" }

// typeOIDRows maps DuckDB's type names (duckdb_columns()'s data_type) to
// the OIDs the server describes such columns with, as a VALUES list for
// pg_attribute: the SQL twin of typeOID, generated from it. Names not
// listed (DECIMAL(p,s), STRUCTs, MAPs) are matched by pattern in the view.
func typeOIDRows() string {
	var rows []string
	for _, n := range []string{"BOOLEAN", "TINYINT", "SMALLINT", "UTINYINT", "INTEGER", "USMALLINT", "BIGINT", "UINTEGER",
		"FLOAT", "DOUBLE", "DATE", "TIME", "INTERVAL", "BLOB", "UUID", "VARCHAR", "HUGEINT", "UHUGEINT", "UBIGINT",
		"TIMESTAMP", "TIMESTAMP_S", "TIMESTAMP_MS", "TIMESTAMP_NS", "TIMESTAMP WITH TIME ZONE", "JSON"} {
		oid := typeOID(n)
		rows = append(rows, fmt.Sprintf("(%s, %d)", sqlQuote(n), oid))
		if a, ok := arrayOf[oid]; ok {
			rows = append(rows, fmt.Sprintf("(%s, %d)", sqlQuote(n+"[]"), a))
		}
	}
	return strings.Join(rows, ", ")
}
