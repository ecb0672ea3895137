package pgserver

import (
	"context"
	"database/sql/driver"
	"fmt"
	"regexp"
	"strconv"
	"strings"

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
	kind    duckdb.StmtType
	params  []uint32
	columns []column
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
func (sess *session) describeSQL(ctx context.Context, sql string) (shape, error) {
	var sh shape
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
		casts := paramCasts(sql)
		for i := 1; i <= ds.NumInput(); i++ {
			t, err := ds.ParamType(i)
			if err != nil || t == duckdb.TYPE_INVALID || t == duckdb.TYPE_ANY || t == duckdb.TYPE_VARCHAR {
				// DuckDB leaves a parameter it cannot place untyped (or
				// VARCHAR); a cast written beside it says what the client
				// should send.
				if oid, ok := casts[i]; ok {
					sh.params = append(sh.params, oid)
				} else {
					sh.params = append(sh.params, oidText)
				}
				continue
			}
			sh.params = append(sh.params, oidOfType(t, nil))
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
				return err
			}
			sh.columns = append(sh.columns, column{name: name, oid: oidOfType(info.InternalType(), info)})
		}
		return nil
	})
	return sh, err
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
		return oidJSON
	case duckdb.TYPE_STRUCT, duckdb.TYPE_MAP, duckdb.TYPE_ARRAY, duckdb.TYPE_UNION:
		return oidJSON
	}
	return oidText
}

var paramCast = regexp.MustCompile(`\$(\d+)\s*::\s*([A-Za-z][A-Za-z0-9 ]*?(\[\])?)(?:[^A-Za-z0-9\[]|$)`)

// paramCasts finds casts written on parameters ($3::DATE) and maps each
// parameter number to the cast type's OID.
func paramCasts(sql string) map[int]uint32 {
	out := map[int]uint32{}
	for _, m := range paramCast.FindAllStringSubmatch(sql, -1) {
		n, err := strconv.Atoi(m[1])
		if err != nil {
			continue
		}
		name := strings.ToUpper(strings.TrimSpace(m[2]))
		switch name {
		case "INT", "INT4":
			name = "INTEGER"
		case "INT8":
			name = "BIGINT"
		case "FLOAT8":
			name = "DOUBLE"
		case "BOOL":
			name = "BOOLEAN"
		case "TEXT", "STRING":
			name = "VARCHAR"
		}
		out[n] = typeOID(name)
	}
	return out
}
