package pgserver

import (
	"context"
	"database/sql/driver"
	"fmt"

	"github.com/duckdb/duckdb-go/v2"
)

// column is one result column as the client sees it.
type column struct {
	name string
	oid  uint32
}

// shape is what preparing a statement tells: its kind, parameters and
// result columns.
type shape struct {
	kind       duckdb.StmtType
	params     []uint32 // OIDs DuckDB infers, 0 where it infers none
	paramTypes []string // the same as DuckDB type names, "" where none
	columns    []column
	incomplete bool // some column's type is known only once parameters are bound
}

// returnsRows reports whether the statement's result is rows for the
// client (a SELECT and the like), rather than a count or nothing.
func (s shape) returnsRows() bool {
	switch s.kind {
	case duckdb.STATEMENT_TYPE_INSERT, duckdb.STATEMENT_TYPE_UPDATE, duckdb.STATEMENT_TYPE_DELETE,
		duckdb.STATEMENT_TYPE_CREATE, duckdb.STATEMENT_TYPE_DROP, duckdb.STATEMENT_TYPE_ALTER,
		duckdb.STATEMENT_TYPE_TRANSACTION, duckdb.STATEMENT_TYPE_COPY, duckdb.STATEMENT_TYPE_SET,
		duckdb.STATEMENT_TYPE_VARIABLE_SET, duckdb.STATEMENT_TYPE_CREATE_FUNC, duckdb.STATEMENT_TYPE_LOAD,
		duckdb.STATEMENT_TYPE_ATTACH, duckdb.STATEMENT_TYPE_DETACH, duckdb.STATEMENT_TYPE_VACUUM,
		duckdb.STATEMENT_TYPE_EXTENSION, duckdb.STATEMENT_TYPE_ANALYZE, duckdb.STATEMENT_TYPE_EXPORT:
		return false
	}
	return len(s.columns) > 0
}

// describeSQL prepares sql on the session's connection to learn its shape.
// A column whose type DuckDB cannot tell before the parameters are bound
// (SELECT $1, a table function's result) is described as text and the shape
// marked incomplete; it is described again once the values are inlined.
//
// Every client statement reaches DuckDB through here first, so the
// allow-list is applied here: its token checks before DuckDB prepares the
// statement, the statement type after.
func (sess *session) describeSQL(ctx context.Context, sql string) (shape, error) {
	var sh shape
	if err := sess.gate.check(sql); err != nil {
		return sh, err
	}
	err := sess.db.Raw(func(dc any) error {
		prep, ok := dc.(driver.ConnPrepareContext)
		if !ok {
			return fmt.Errorf("connection %T cannot prepare", dc)
		}
		st, err := prep.PrepareContext(ctx, sql)
		if err != nil {
			return err
		}
		defer st.Close()
		ds, ok := st.(*duckdb.Stmt)
		if !ok {
			return fmt.Errorf("statement %T is not DuckDB's", st)
		}
		if sh.kind, err = ds.StatementType(); err != nil {
			return err
		}
		if sess.gate != nil {
			if err := sess.gate.checkKind(sh.kind); err != nil {
				return err
			}
		}
		for i := 1; i <= ds.NumInput(); i++ {
			t, err := ds.ParamType(i)
			if t == duckdb.TYPE_LIST { // a list of what, a cast beside it may tell (extended.go)
				sh.params = append(sh.params, 0)
				sh.paramTypes = append(sh.paramTypes, "LIST")
				continue
			}
			if err != nil || t == duckdb.TYPE_INVALID || t == duckdb.TYPE_ANY {
				sh.params = append(sh.params, 0)
				sh.paramTypes = append(sh.paramTypes, "")
				continue
			}
			sh.params = append(sh.params, oidOfType(t, nil))
			sh.paramTypes = append(sh.paramTypes, duckdbParamType(t))
		}
		n, err := ds.ColumnCount()
		if err != nil {
			return err
		}
		for i := 0; i < n; i++ {
			name, err := ds.ColumnName(i)
			if err != nil {
				return err
			}
			info, err := ds.ColumnTypeInfo(i)
			if err != nil {
				sh.incomplete = true
				sh.columns = append(sh.columns, column{name: name, oid: oidText})
				continue
			}
			sh.columns = append(sh.columns, column{name: name, oid: oidOfType(info.InternalType(), info)})
		}
		return nil
	})
	if err == nil && sh.kind == duckdb.STATEMENT_TYPE_EXPLAIN && sess.gate != nil {
		// EXPLAIN ANALYZE runs what it explains: that must be allowed too.
		if inner := explained(sql); inner != "" {
			if _, err := sess.describeSQL(ctx, inner); err != nil {
				return sh, err
			}
		}
	}
	return sh, err
}

// explained is the statement an EXPLAIN [ANALYZE] [(options)] explains.
func explained(sql string) string {
	toks := lex(sql)
	idx := significant(toks)
	k := 1
	if k < len(idx) && toks[idx[k]].is("analyze") {
		k++
	}
	if k < len(idx) && toks[idx[k]].is("(") {
		depth := 0
		for ; k < len(idx); k++ {
			if toks[idx[k]].is("(") {
				depth++
			} else if toks[idx[k]].is(")") {
				if depth--; depth == 0 {
					k++
					break
				}
			}
		}
	}
	if k >= len(idx) {
		return ""
	}
	return join(toks[idx[k]:])
}

// duckdbParamType names a parameter's DuckDB type for a cast, "" for types
// whose details (a list's element) the prepared statement does not tell.
func duckdbParamType(t duckdb.Type) string {
	switch t {
	case duckdb.TYPE_BOOLEAN:
		return "BOOLEAN"
	case duckdb.TYPE_TINYINT:
		return "TINYINT"
	case duckdb.TYPE_SMALLINT:
		return "SMALLINT"
	case duckdb.TYPE_INTEGER:
		return "INTEGER"
	case duckdb.TYPE_BIGINT:
		return "BIGINT"
	case duckdb.TYPE_UTINYINT:
		return "UTINYINT"
	case duckdb.TYPE_USMALLINT:
		return "USMALLINT"
	case duckdb.TYPE_UINTEGER:
		return "UINTEGER"
	case duckdb.TYPE_UBIGINT:
		return "UBIGINT"
	case duckdb.TYPE_HUGEINT:
		return "HUGEINT"
	case duckdb.TYPE_FLOAT:
		return "FLOAT"
	case duckdb.TYPE_DOUBLE:
		return "DOUBLE"
	case duckdb.TYPE_VARCHAR:
		return "VARCHAR"
	case duckdb.TYPE_DATE:
		return "DATE"
	case duckdb.TYPE_TIME:
		return "TIME"
	case duckdb.TYPE_TIMESTAMP:
		return "TIMESTAMP"
	case duckdb.TYPE_TIMESTAMP_TZ:
		return "TIMESTAMPTZ"
	case duckdb.TYPE_INTERVAL:
		return "INTERVAL"
	case duckdb.TYPE_BLOB:
		return "BLOB"
	case duckdb.TYPE_UUID:
		return "UUID"
	case duckdb.TYPE_LIST:
		return "LIST" // a list of what, the statement does not say
	}
	return ""
}

// oidOfType maps a DuckDB type (with its details, for lists) to an OID.
func oidOfType(t duckdb.Type, info duckdb.TypeInfo) uint32 {
	switch t {
	case duckdb.TYPE_BOOLEAN:
		return oidBool
	case duckdb.TYPE_TINYINT, duckdb.TYPE_SMALLINT, duckdb.TYPE_UTINYINT:
		return oidInt2
	case duckdb.TYPE_INTEGER, duckdb.TYPE_USMALLINT:
		return oidInt4
	case duckdb.TYPE_BIGINT, duckdb.TYPE_UINTEGER:
		return oidInt8
	case duckdb.TYPE_UBIGINT, duckdb.TYPE_HUGEINT, duckdb.TYPE_UHUGEINT, duckdb.TYPE_DECIMAL, duckdb.TYPE_BIGNUM:
		return oidNumeric
	case duckdb.TYPE_FLOAT:
		return oidFloat4
	case duckdb.TYPE_DOUBLE:
		return oidFloat8
	case duckdb.TYPE_TIMESTAMP, duckdb.TYPE_TIMESTAMP_S, duckdb.TYPE_TIMESTAMP_MS, duckdb.TYPE_TIMESTAMP_NS:
		return oidTimestamp
	case duckdb.TYPE_TIMESTAMP_TZ:
		return oidTimestampTZ
	case duckdb.TYPE_DATE:
		return oidDate
	case duckdb.TYPE_TIME:
		return oidTime
	case duckdb.TYPE_INTERVAL:
		return oidInterval
	case duckdb.TYPE_BLOB:
		return oidBytea
	case duckdb.TYPE_UUID:
		return oidUUID
	case duckdb.TYPE_LIST:
		if info != nil {
			if d, ok := info.Details().(*duckdb.ListDetails); ok && d.Child != nil {
				if a, ok := arrayOf[oidOfType(d.Child.InternalType(), d.Child)]; ok {
					return a
				}
			}
		}
		return oidJSONText
	case duckdb.TYPE_STRUCT, duckdb.TYPE_MAP, duckdb.TYPE_ARRAY, duckdb.TYPE_UNION:
		return oidJSONText
	}
	return oidText
}
