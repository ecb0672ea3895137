package udf

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestColumnsCheckedEverywhere: every table function refuses a by, at or
// value column its source lacks with the same message, naming the column
// and listing the source's columns (never DuckDB's binder error about a
// COLUMNS expression), refuses a value column that is not a number, tells
// an empty file and a CSV file with a header line alone for what they are,
// and matches names without regard to case, as DuckDB does.
func TestColumnsCheckedEverywhere(t *testing.T) {
	db := openTest(t)
	exec(t, db, `CREATE TABLE s AS SELECT 'a' AS g, i AS t, (i % 5)::DOUBLE + i AS v, 'x' AS label FROM range(40) r(i)`)
	dir := t.TempDir()
	empty := filepath.Join(dir, "empty.csv")
	header := filepath.Join(dir, "header.csv")
	os.WriteFile(empty, nil, 0o644)
	os.WriteFile(header, []byte("g,t,v\n"), 0o644)
	calls := map[string]string{
		"diagnose":             "diagnose(%s, by := %s, at := %s, value := %s)",
		"differenced":          "differenced(%s, by := %s, at := %s, value := %s)",
		"rolling_dispersion":   "rolling_dispersion(%s, by := %s, at := %s, value := %s)",
		"stationarize":         "stationarize(%s, by := %s, at := %s, value := %s)",
		"stationarize_recipes": "stationarize_recipes(%s, by := %s, at := %s, value := %s)",
		"forecast":             "forecast(%s, by := %s, at := %s, value := %s)",
		"forecast_models":      "forecast_models(%s, by := %s, at := %s, value := %s)",
		"restore":              "restore(%s, 'recipes', by := %s, at := %s, value := %s)",
	}
	exec(t, db, `CREATE TABLE recipes AS FROM stationarize_recipes('s', by := 'g', at := 't', value := 'v')`)
	const columns = "; its columns are: g, t, v, label"
	for function, call := range calls {
		fill := func(source, by, at, value string) string {
			out := call
			for _, a := range []string{source, by, at, value} {
				out = strings.Replace(out, "%s", a, 1)
			}
			return "FROM " + out
		}
		for _, test := range []struct{ query, want string }{
			{fill("'s'", "'group'", "'t'", "'v'"), function + `: the by column "group" is not in s` + columns},
			{fill("'s'", "['g', 'k']", "'t'", "'v'"), function + `: the by column "k" is not in s` + columns},
			{fill("'s'", "'g'", "'time'", "'v'"), function + `: the at column "time" is not in s` + columns},
			{fill("'s'", "'g'", "'t'", "'unit'"), function + `: the value column "unit" is not in s` + columns},
			{fill("'s'", "'g'", "'t'", "'label'"), function + `: the value column "label" of s is VARCHAR, not a number`},
			{fill(quoteLiteral(empty), "'g'", "'t'", "'v'"), function + `: the by column "g" is not in ` + empty + `, which holds no rows`},
			{fill(quoteLiteral(header), "'g'", "'t'", "'v'"), function + `: the by column "g" is not in ` + header +
				`; its columns are: column0, column1, column2 (DuckDB found no header line`},
		} {
			want := test.want
			if function == "restore" && strings.Contains(want, "by column") {
				// The recipes lack the column too, and either check may speak first.
				want, _, _ = strings.Cut(want, " is not in ")
			}
			if msg := queryError(t, db, test.query); !strings.Contains(msg, want) || strings.Contains(msg, "COLUMNS") {
				t.Errorf("%s: error %q, want %q", test.query, msg, test.want)
			}
		}
		if function != "restore" {
			if _, err := db.Exec(fill("'s'", "'G'", "'T'", "'V'")); err != nil {
				t.Errorf("%s with the names in capitals: %v", function, err)
			}
		}
	}
	// A bad option of a table function reads in the commands' words,
	// without duckdb-go's prefix for a Go function's error.
	for _, q := range []string{`FROM diagnose('s', by := 'g', at := 't', value := 'v', alpha := 0)`,
		`FROM forecast('s', by := 'g', at := 't', value := 'v', period := 0)`} {
		if msg := queryError(t, db, q); strings.Contains(msg, "API error") || strings.Contains(msg, "_sql") ||
			!(strings.Contains(msg, "Invalid Input Error: alpha must be between 0 and 1 (exclusive), got 0") ||
				strings.Contains(msg, "Invalid Input Error: period must be at least 2, 1 (not seasonal), or left out (NULL) to detect it; got 0")) {
			t.Errorf("%s: error %q", q, msg)
		}
	}
	// restore's recipes need the group columns and the recipe's own.
	for _, test := range []struct{ query, want string }{
		{`FROM restore('s', 's', by := 'g', at := 't', value := 'v')`, `restore: the recipe column "n" is not in s` + columns},
		{`FROM restore('s', '(SELECT * EXCLUDE (g) FROM recipes)', by := 'g', at := 't', value := 'v')`, `restore: the by column "g" is not in (SELECT * EXCLUDE (g) FROM recipes)`},
	} {
		if msg := queryError(t, db, test.query); !strings.Contains(msg, test.want) {
			t.Errorf("%s: error %q, want %q", test.query, msg, test.want)
		}
	}
}
