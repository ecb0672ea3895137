package udf

import (
	"database/sql/driver"
	"fmt"
	"regexp"
	"strings"
)

// quoteIdent quotes a column or table name for splicing into SQL: it is
// wrapped in double quotes with any double quote doubled, so no name, however
// odd, can end the identifier and run SQL of its own.
func quoteIdent(name string) string {
	return `"` + strings.ReplaceAll(name, `"`, `""`) + `"`
}

// quoteLiteral quotes a string as an SQL string literal.
func quoteLiteral(s string) string {
	return `'` + strings.ReplaceAll(s, `'`, `''`) + `'`
}

var (
	plainName = regexp.MustCompile(`^[A-Za-z_][A-Za-z0-9_$]*(\.[A-Za-z_][A-Za-z0-9_$]*){0,2}$`)
	fileLike  = regexp.MustCompile(`[/\\*?]|\.(parquet|csv|tsv|json|jsonl|ndjson|txt)(\.(gz|zst))?$`)
)

// sourceSQL turns the source argument of a table function into a FROM item:
//
//   - "(SELECT ...)" is used as written (the caller may run SQL anyway);
//   - a path or glob ("sales/*.parquet", "x.csv") becomes a string literal,
//     which DuckDB reads with the reader its extension names;
//   - a table or view name ("sales", "main.sales", "db.main.sales") has each
//     part quoted; an already quoted name is used as written.
func sourceSQL(source string) (string, error) {
	s := strings.TrimSpace(source)
	switch {
	case s == "":
		return "", fmt.Errorf("the source is empty: give a table or view name, a file path or glob, or a parenthesised SELECT")
	case strings.HasPrefix(s, "("):
		if !strings.HasSuffix(s, ")") {
			return "", fmt.Errorf("the source %q opens a parenthesis it does not close", s)
		}
		return s, nil
	case strings.HasPrefix(s, `"`):
		return s, nil
	case fileLike.MatchString(s):
		return quoteLiteral(s), nil
	case plainName.MatchString(s):
		parts := strings.Split(s, ".")
		for i, p := range parts {
			parts[i] = quoteIdent(p)
		}
		return strings.Join(parts, "."), nil
	default:
		return "", fmt.Errorf("the source %q is not a table or view name, a file path or glob, or a parenthesised SELECT", s)
	}
}

// columnNames reads the "by" argument: one column name or a list of them.
func columnNames(v driver.Value, what string) ([]string, error) {
	switch x := v.(type) {
	case string:
		if x == "" {
			return nil, fmt.Errorf("%s names no column", what)
		}
		return []string{x}, nil
	case []any:
		if len(x) == 0 {
			return nil, fmt.Errorf("%s names no column", what)
		}
		names := make([]string, len(x))
		for i, e := range x {
			s, ok := e.(string)
			if !ok || s == "" {
				return nil, fmt.Errorf("%s must list column names as text, got %v", what, e)
			}
			names[i] = s
		}
		return names, nil
	default:
		return nil, fmt.Errorf("%s must be a column name or a list of column names, got %T", what, v)
	}
}

// columnName reads an argument that names exactly one column.
func columnName(v driver.Value, what string) (string, error) {
	s, ok := v.(string)
	if !ok || s == "" {
		return "", fmt.Errorf("%s must name one column as text", what)
	}
	return s, nil
}

// SourceSQL turns a source as the table functions accept it (a table or
// view name, a file path or glob, or a parenthesised SELECT) into a FROM
// item, for code that queries a source directly (the report).
func SourceSQL(source string) (string, error) { return sourceSQL(source) }

// QuoteIdent quotes a column or table name for splicing into SQL.
func QuoteIdent(name string) string { return quoteIdent(name) }

// QuoteLiteral quotes text as an SQL string literal.
func QuoteLiteral(s string) string { return quoteLiteral(s) }
