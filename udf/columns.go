package udf

import (
	"database/sql/driver"
	"fmt"
	"slices"
	"strings"

	"github.com/duckdb/duckdb-go/v2"
)

// The columns a table function reads are checked against the source's own
// columns before anything else runs, by one Go function that SQL (every
// table function's query) and the commands (diagnosis.Spec.Check) share, so
// that a name is accepted or refused with the same message everywhere:
//
//	diagnose: the value column "unit" is not in shops.parquet; its columns are: shop, product, day, units
//
// DuckDB matches column names without regard to case, and so does the check.

// wantedColumn is a column a table function reads and the argument that
// named it.
type wantedColumn struct{ name, role string }

// seriesColumns lists the columns of a series query with their roles, each
// name once (a name given twice keeps its first role).
func seriesColumns(by []string, at, value string) []wantedColumn {
	var out []wantedColumn
	add := func(name, role string) {
		for _, w := range out {
			if strings.EqualFold(w.name, name) {
				return
			}
		}
		out = append(out, wantedColumn{name, role})
	}
	for _, b := range by {
		add(b, "by")
	}
	add(at, "at")
	add(value, "value")
	return out
}

// SourceColumnsProblem returns what is wrong with the columns a table
// function named for a source ("" when nothing is): a named column the
// source lacks, or a value column that is not a number. names and types are
// the source's columns as DuckDB describes them; rows says whether the
// source holds any row (nil: not known), so that an empty file, or a CSV
// file with a header line and no data (whose column names DuckDB cannot
// tell from data and calls column0, column1, ...), is called what it is.
// value may be "" when no value column is read.
func SourceColumnsProblem(function, source string, by []string, at, value string, names, types []string, rows *bool) string {
	return columnsProblem(function, source, seriesColumns(by, at, value), value, names, types, rows)
}

func columnsProblem(function, source string, wanted []wantedColumn, value string, names, types []string, rows *bool) string {
	find := func(name string) int {
		return slices.IndexFunc(names, func(n string) bool { return strings.EqualFold(n, name) })
	}
	for _, w := range wanted {
		if find(w.name) >= 0 {
			continue
		}
		if rows != nil && !*rows {
			return fmt.Sprintf("%s: the %s column %q is not in %s, which holds no rows (it is empty, or a file with a header line alone, "+
				"whose names DuckDB cannot tell from data); the columns DuckDB read are: %s",
				function, w.role, w.name, source, strings.Join(names, ", "))
		}
		hint := ""
		if unnamedColumns(names) {
			hint = " (DuckDB found no header line, so it numbered the columns; a file whose only line is its header holds no data)"
		}
		return fmt.Sprintf("%s: the %s column %q is not in %s; its columns are: %s%s",
			function, w.role, w.name, source, strings.Join(names, ", "), hint)
	}
	if value != "" {
		if i := find(value); i >= 0 && i < len(types) && !numericType(types[i]) {
			return fmt.Sprintf("%s: the value column %q of %s is %s, not a number", function, value, source, types[i])
		}
	}
	return ""
}

// unnamedColumns reports whether names are column0, column1, ...: what
// DuckDB calls the columns of a CSV file in which it found no header line.
func unnamedColumns(names []string) bool {
	for i, n := range names {
		if n != fmt.Sprintf("column%d", i) {
			return false
		}
	}
	return len(names) > 0
}

// numericType reports whether a DuckDB type name is one the value column
// may have: an integer, a floating-point number or a decimal.
func numericType(t string) bool {
	t = strings.ToUpper(strings.TrimSpace(t))
	return slices.Contains([]string{"TINYINT", "SMALLINT", "INTEGER", "BIGINT", "HUGEINT", "UTINYINT", "USMALLINT",
		"UINTEGER", "UBIGINT", "UHUGEINT", "FLOAT", "DOUBLE"}, t) || strings.HasPrefix(t, "DECIMAL")
}

// columnsFunctions provides
//
//	plumb_columns_problem(function VARCHAR, source VARCHAR, wanted VARCHAR[], roles VARCHAR[], value VARCHAR,
//	                      names VARCHAR[], types VARCHAR[], has_rows BOOLEAN) -> VARCHAR
//
// columnsProblem for SQL: NULL when the columns are right, the message
// otherwise (the caller raises it with error(), so that it reads as plumb's
// own words). has_rows may be NULL (not known).
func columnsFunctions(t *types) []*function {
	texts := t.list(t.varchar())
	return []*function{{
		name:     "plumb_columns_problem",
		params:   []duckdb.TypeInfo{t.varchar(), t.varchar(), texts, texts, t.varchar(), texts, texts, t.boolean()},
		result:   t.varchar(),
		nullable: true,
		eval: func(args []driver.Value) (any, error) {
			function, err := text(args[0], "function")
			if err != nil {
				return nil, err
			}
			source, err := text(args[1], "source")
			if err != nil {
				return nil, err
			}
			lists := make([][]string, 4)
			for i, a := range []driver.Value{args[2], args[3], args[5], args[6]} {
				if lists[i], err = textsOf(a); err != nil {
					return nil, err
				}
			}
			if len(lists[0]) != len(lists[1]) {
				return nil, fmt.Errorf("plumb_columns_problem: %d columns but %d roles", len(lists[0]), len(lists[1]))
			}
			wanted := make([]wantedColumn, len(lists[0]))
			for i := range wanted {
				wanted[i] = wantedColumn{lists[0][i], lists[1][i]}
			}
			value, _ := args[4].(string)
			var rows *bool
			if b, ok := args[7].(bool); ok {
				rows = &b
			}
			if p := columnsProblem(function, source, wanted, value, lists[2], lists[3], rows); p != "" {
				return p, nil
			}
			return nil, nil
		},
	}}
}

// textsOf reads a VARCHAR[] argument (NULL elements are skipped).
func textsOf(v driver.Value) ([]string, error) {
	if v == nil {
		return nil, nil
	}
	xs, ok := v.([]any)
	if !ok {
		return nil, fmt.Errorf("expected a list of text, got %T", v)
	}
	out := make([]string, 0, len(xs))
	for _, x := range xs {
		if s, ok := x.(string); ok {
			out = append(out, s)
		}
	}
	return out, nil
}

// columnsCheckCTE is a CTE, plumb_source_ok, whose one row is true when the
// source has the wanted columns and fails with columnsProblem's message
// otherwise (columnsCheck).
func columnsCheckCTE(function, source, label string, wanted []wantedColumn, value string) string {
	return fmt.Sprintf("plumb_source_ok AS MATERIALIZED (\n    %s\n)", columnsCheck(function, source, label, wanted, value))
}

// columnsCheck is a SELECT of one row and one column, plumb_ok: true when
// source has the wanted columns, and otherwise failing with columnsProblem's
// message. Whether the source holds rows is asked only of a file (a quoted
// path), where an empty file is a likely mistake and reading one row is
// cheap; a SELECT could cost as much as the whole query.
func columnsCheck(function, source, label string, wanted []wantedColumn, value string) string {
	names := make([]string, len(wanted))
	roles := make([]string, len(wanted))
	for i, w := range wanted {
		names[i], roles[i] = quoteLiteral(w.name), quoteLiteral(w.role)
	}
	rows := "NULL::BOOLEAN"
	if strings.HasPrefix(source, "'") {
		rows = fmt.Sprintf("(SELECT count(*) > 0 FROM (SELECT 1 FROM %s LIMIT 1))", source)
	}
	valueSQL := "NULL"
	if value != "" {
		valueSQL = quoteLiteral(value)
	}
	return fmt.Sprintf(`SELECT CASE WHEN plumb_problem IS NULL THEN true ELSE error(plumb_problem) END AS plumb_ok
    FROM (SELECT plumb_columns_problem(%[1]s, %[2]s, [%[3]s]::VARCHAR[], [%[4]s]::VARCHAR[], %[5]s,
                                       list(column_name), list(column_type), %[6]s) AS plumb_problem
          FROM (DESCRIBE SELECT * FROM %[7]s))`,
		quoteLiteral(function), quoteLiteral(label), strings.Join(names, ", "), strings.Join(roles, ", "), valueSQL, rows, source)
}

// guardedSelect selects the named columns from source so that the query
// binds even when one is missing: each is also added as a NULL column after
// the source's own, which DuckDB renames (units_1) when the source has the
// name and which stands in for it when it does not; plumb_source_ok then
// fails with plumb's message before any row is used.
func guardedSelect(source string, names []string) string {
	picks := make([]string, len(names))
	stand := make([]string, len(names))
	for i, n := range names {
		picks[i] = quoteIdent(n)
		stand[i] = "NULL AS " + quoteIdent(n)
	}
	return fmt.Sprintf("SELECT %s\n    FROM (SELECT *, %s FROM %s)", strings.Join(picks, ", "), strings.Join(stand, ", "), source)
}
