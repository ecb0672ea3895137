package explorer

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"github.com/plumb-sql/plumb/udf"
)

// A source is what the page may diagnose: a file under --data or a table
// or view of the database. Only sources the page itself offers are
// accepted (resolveSource), so a request cannot name anything else.
type source struct {
	Name string // as the page shows it and sends it back: a path relative to --data, or schema.table
	SQL  string // the source as diagnose takes it: the file's path under --data, or the quoted table name
	File bool
}

// dataExtensions are the files offered as sources.
var dataExtensions = []string{".parquet", ".csv", ".tsv", ".json", ".jsonl", ".ndjson"}

// maxListedFiles bounds the walk of --data.
const maxListedFiles = 2000

// listFiles lists the data files under dir, relative to it, skipping
// hidden entries and never following a symbolic link.
func listFiles(dir string) ([]string, error) {
	if dir == "" {
		return nil, nil
	}
	var out []string
	err := filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return nil // an unreadable folder is left out
		}
		if p != dir && strings.HasPrefix(d.Name(), ".") {
			if d.IsDir() {
				return filepath.SkipDir
			}
			return nil
		}
		if !d.Type().IsRegular() || !hasDataExtension(d.Name()) {
			return nil
		}
		rel, err := filepath.Rel(dir, p)
		if err != nil {
			return nil
		}
		out = append(out, filepath.ToSlash(rel))
		if len(out) >= maxListedFiles {
			return fs.SkipAll
		}
		return nil
	})
	sort.Strings(out)
	return out, err
}

func hasDataExtension(name string) bool {
	low := strings.ToLower(name)
	for _, x := range dataExtensions {
		if strings.HasSuffix(low, x) {
			return true
		}
	}
	return false
}

// listTables lists the database's own tables and views (schema.name; the
// schema is left out for main), not TEMP ones nor DuckDB's internal views.
func listTables(ctx context.Context, conn *sql.Conn) ([]string, error) {
	rows, err := conn.QueryContext(ctx, `SELECT schema_name, table_name FROM duckdb_tables() WHERE NOT temporary AND NOT internal
		UNION SELECT schema_name, view_name FROM duckdb_views() WHERE NOT temporary AND NOT internal
		ORDER BY 1, 2`)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var out []string
	for rows.Next() {
		var schema, name string
		if err := rows.Scan(&schema, &name); err != nil {
			return nil, err
		}
		if schema != "main" {
			name = schema + "." + name
		}
		out = append(out, name)
	}
	return out, rows.Err()
}

var errUnknownSource = errors.New("not a file under --data or a table of the database")

// resolveSource checks a source name sent by the page: a table or view the
// database lists, or a data file under --data through the same file policy
// as plumb serve's clients (sandbox.Paths.Resolve: nothing outside --data,
// symbolic links resolved, never the server's own files). The page offers
// only plain relative file names, so an absolute path or a glob is refused
// before that.
func (e *Explorer) resolveSource(ctx context.Context, conn *sql.Conn, name string) (source, error) {
	if name == "" {
		return source{}, fmt.Errorf("pick a source")
	}
	tables, err := listTables(ctx, conn)
	if err != nil {
		return source{}, err
	}
	for _, t := range tables {
		if t == name {
			schema, table, found := strings.Cut(t, ".")
			if !found {
				schema, table = "main", t
			}
			return source{Name: t, SQL: udf.QuoteIdent(schema) + "." + udf.QuoteIdent(table)}, nil
		}
	}
	if !hasDataExtension(name) {
		return source{}, fmt.Errorf("%q: %w", name, errUnknownSource)
	}
	if filepath.IsAbs(name) || strings.ContainsAny(name, "\x00*?[]{}") {
		return source{}, fmt.Errorf("%q: %w", name, errUnknownSource)
	}
	path, err := e.cfg.Files.Resolve(filepath.FromSlash(name))
	if err != nil {
		return source{}, fmt.Errorf("%q: %w", name, errUnknownSource)
	}
	if st, err := os.Stat(path); err != nil || !st.Mode().IsRegular() {
		return source{}, fmt.Errorf("%q: %w", name, errUnknownSource)
	}
	return source{Name: name, SQL: path, File: true}, nil
}

// column is one column of a source.
type column struct{ Name, Type string }

// sourceColumns lists a source's columns, in the words diagnose's checks
// use when it cannot be read.
func sourceColumns(ctx context.Context, conn *sql.Conn, src source) ([]column, error) {
	from, err := udf.SourceSQL(src.SQL)
	if err != nil {
		return nil, err
	}
	rows, err := conn.QueryContext(ctx, "SELECT column_name, column_type FROM (DESCRIBE SELECT * FROM "+from+")")
	if err != nil {
		return nil, fmt.Errorf("cannot read %s: %s", src.Name, firstLine(err.Error()))
	}
	defer rows.Close()
	var out []column
	for rows.Next() {
		var c column
		if err := rows.Scan(&c.Name, &c.Type); err != nil {
			return nil, err
		}
		out = append(out, c)
	}
	return out, rows.Err()
}

func firstLine(s string) string {
	line, _, _ := strings.Cut(s, "\n")
	return strings.TrimSpace(line)
}
