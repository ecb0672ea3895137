package udf

import (
	"database/sql"
	"fmt"
	"os"
	"regexp"
	"sort"
	"strings"
	"testing"
)

// renames reads the list under "Renamed in this version" in DEVELOPERS.md:
// one line per kind of name ("- fields: `old` → `new`, ..."), so that the
// list a reader sees is the list the tests check.
func renames(t *testing.T) map[string][][2]string {
	t.Helper()
	text, err := os.ReadFile("../DEVELOPERS.md")
	if err != nil {
		t.Fatal(err)
	}
	_, section, ok := strings.Cut(string(text), "\n## Renamed in this version\n")
	if !ok {
		t.Fatal("DEVELOPERS.md has no section Renamed in this version")
	}
	section, _, _ = strings.Cut(section, "\n## ")
	pair := regexp.MustCompile("`([^`]+)` → `([^`]+)`")
	out := map[string][][2]string{}
	for _, line := range strings.Split(section, "\n") {
		kind, list, ok := strings.Cut(strings.TrimPrefix(line, "- "), ": ")
		if !strings.HasPrefix(line, "- ") || !ok {
			continue
		}
		for _, m := range pair.FindAllStringSubmatch(list, -1) {
			out[kind] = append(out[kind], [2]string{m[1], m[2]})
		}
	}
	for _, kind := range []string{"fields", "lag_rule", "deterministic", "kind", "parameters", "flags"} {
		if len(out[kind]) == 0 {
			t.Errorf("DEVELOPERS.md: no renames of %s listed", kind)
		}
	}
	return out
}

// TestUserFacingNames prints every SQL function plumb registers with its
// parameters, their defaults and its result columns (go test ./udf -run
// TestUserFacingNames -v shows the list: the audit of user-facing names),
// checks that no retired name is among them, and pins the order of the
// unit-root STRUCTs: what was tested, then the evidence, then how it was
// computed.
func TestUserFacingNames(t *testing.T) {
	db := openTest(t)
	exec(t, db, `CREATE TABLE s AS SELECT i % 3 AS g, i // 3 AS t, (i % 3) * 10 + sin(i) + (i // 3) * 0.01 + 5 AS v FROM range(600) r(i)`)
	exec(t, db, `CREATE TABLE rec AS FROM stationarize_recipes('s', by := 'g', at := 't', value := 'v')`)
	exec(t, db, `CREATE TABLE st AS FROM stationarize('s', by := 'g', at := 't', value := 'v')`)
	exec(t, db, `CREATE TABLE parts AS FROM diagnose('s', by := 'g', at := 't', value := 'v', shard := 0, shards := 1)`)

	// Parameters as DuckDB lists them; defaults from the macros' own text.
	params := map[string]string{}
	kinds := map[string]string{}
	rows, err := db.Query(`SELECT function_name, function_type, parameters::VARCHAR FROM duckdb_functions()
		WHERE database_name = 'temp' AND schema_name = 'main' AND function_type IN ('macro', 'table_macro')`)
	if err != nil {
		t.Fatal(err)
	}
	for rows.Next() {
		var name, kind, p string
		if err := rows.Scan(&name, &kind, &p); err != nil {
			t.Fatal(err)
		}
		params[name], kinds[name] = p, kind
	}
	rows.Close()
	defaults := macroDefaults(macros)

	// One call of each function whose result type DESCRIBE shows.
	series := "[5.0, 7, 6, 9, 8, 10, 9, 12, 11, 13, 12, 15, 14, 16, 15, 18, 17, 19, 18, 21, 20, 22, 21, 24, 23, 25, 24, 27, 26, 28, 27, 30, 29, 31, 30, 33, 32, 34, 33, 36]"
	src := `'s', by := 'g', at := 't', value := 'v'`
	calls := map[string]string{
		"difference":           "SELECT difference(" + series + ") AS result",
		"undifference":         "SELECT undifference(" + series + ", [1.0]) AS result",
		"unit_root":            "SELECT unit_root(" + series + ") AS result",
		"stability":            "SELECT stability(" + series + ") AS result",
		"seasonality":          "SELECT seasonality(" + series + ") AS result",
		"white_noise":          "SELECT white_noise(" + series + ") AS result",
		"rolling_mean":         "SELECT rolling_mean(" + series + ", 3) AS result",
		"rolling_spread":       "SELECT rolling_spread(" + series + ", 3) AS result",
		"box_cox":              "SELECT box_cox(" + series + ", 0.5) AS result",
		"inverse_box_cox":      "SELECT inverse_box_cox(" + series + ", 0.5) AS result",
		"box_cox_lambda":       "SELECT box_cox_lambda(" + series + ") AS result",
		"stationarity":         "SELECT stationarity(" + series + ") AS result",
		"outlier_positions":    "SELECT outlier_positions(" + series + ") AS result",
		"demand_profile":       "SELECT demand_profile(" + series + ") AS result",
		"zivot_andrews":        "SELECT zivot_andrews(" + series + ") AS result",
		"mean_break":           "SELECT mean_break(" + series + ") AS result",
		"differenced":          "FROM differenced(" + src + ")",
		"diagnose":             "FROM diagnose(" + src + ")",
		"rolling_dispersion":   "FROM rolling_dispersion(" + src + ")",
		"stationarize":         "FROM stationarize(" + src + ")",
		"stationarize_recipes": "FROM stationarize_recipes(" + src + ")",
		"restore":              "FROM restore('st', 'rec', by := 'g', at := 't', value := 'v')",
		"forecast":             "FROM forecast(" + src + ", horizon := 2)",
		"forecast_models":      "FROM forecast_models(" + src + ", horizon := 2)",
		"combine_diagnoses":    "FROM combine_diagnoses('parts')",
	}
	names := make([]string, 0, len(kinds))
	for name := range kinds {
		names = append(names, name)
	}
	sort.Strings(names)
	var audit strings.Builder
	for _, name := range names {
		call, ok := calls[name]
		if !ok {
			t.Errorf("%s: a registered function the audit has no call for; add one", name)
			continue
		}
		columns := describe(t, db, call)
		fmt.Fprintf(&audit, "%s (%s)\n  parameters %s\n  defaults   %s\n  returns    %s\n",
			name, kinds[name], params[name], strings.Join(defaults[name], ", "), columns)
	}
	for _, f := range mustFunctions(t) {
		fmt.Fprintf(&audit, "%s (scalar, internal)\n", f.name)
	}
	t.Logf("user-facing names:\n%s", audit.String())
	words := map[string]bool{}
	for _, w := range regexp.MustCompile(`[A-Za-z0-9_]+`).FindAllString(audit.String(), -1) {
		words[strings.ToLower(w)] = true
	}
	for _, rename := range append(renames(t)["fields"], renames(t)["parameters"]...) {
		if words[rename[0]] {
			t.Errorf("retired name %s still appears among the functions' names", rename[0])
		}
		if !words[rename[1]] {
			t.Errorf("new name %s appears nowhere among the functions' names", rename[1])
		}
	}

	// The STRUCT order: what was tested, the evidence, how it was computed.
	for _, test := range []struct{ call, want string }{
		{"SELECT unit_root(" + series + ") AS result",
			"method, deterministic, null_hypothesis, statistic, p_value, p_value_bound, cutoff_01, cutoff_05, cutoff_10, lags, observations, status"},
		{"SELECT unit_root(" + series + ", method := 'kpss') AS result",
			"method, deterministic, null_hypothesis, statistic, p_value, p_value_bound, cutoff_01, cutoff_05, cutoff_10, lags, observations, status"},
		{"SELECT zivot_andrews(" + series + ") AS result",
			"kind, statistic, p_value, p_value_bound, cutoff_01, cutoff_05, cutoff_10, break_at, lags, observations, status"},
	} {
		if got := structFields(t, describe(t, db, test.call)); got != test.want {
			t.Errorf("%s: fields %s, want %s", test.call, got, test.want)
		}
	}
}

// TestRetiredOptionValues: the option values plumb replaced are errors,
// not quiet aliases, and the new ones run.
func TestRetiredOptionValues(t *testing.T) {
	db := openTest(t)
	x := "list_transform(range(60), i -> sin(i * i * 0.37) + i * 0.05)"
	r := renames(t)
	calls := map[string][]string{
		"lag_rule":      {"unit_root(%s, lag_rule := '%s', lags := 2)", "zivot_andrews(%s, lag_rule := '%s', lags := 2)"},
		"deterministic": {"unit_root(%s, deterministic := '%s')"},
		"kind":          {"zivot_andrews(%s, kind := '%s')"},
	}
	for kind, forms := range calls {
		for _, rename := range r[kind] {
			for _, form := range forms {
				old, renamed := fmt.Sprintf(form, x, rename[0]), fmt.Sprintf(form, x, rename[1])
				if msg := queryError(t, db, "SELECT "+old); !strings.Contains(msg, "unknown") {
					t.Errorf("%s: error %q, want an unknown-value error", old, msg)
				}
				if got := queryString(t, db, "SELECT ("+renamed+").status"); got != "ok" {
					t.Errorf("%s: status %s", renamed, got)
				}
			}
		}
	}
	exec(t, db, `CREATE TABLE s AS SELECT 1 AS g, i AS t, 20 + sin(i * i * 0.37) + cos(i * 1.3) AS v FROM range(80) r(i)`)
	for _, rename := range r["parameters"] {
		q := fmt.Sprintf(`FROM forecast('s', by := 'g', at := 't', value := 'v', %s := true)`, rename[0])
		if msg := queryError(t, db, q); msg == "" {
			t.Errorf("forecast accepted %s", rename[0])
		}
	}
	if msg := queryError(t, db, `FROM forecast('s', by := 'g', at := 't', value := 'v', point := 'average')`); !strings.Contains(msg, "unknown point") {
		t.Errorf("forecast point := 'average': error %q", msg)
	}
	for _, point := range []string{"median", "mean"} {
		q := fmt.Sprintf(`SELECT count(*) FILTER (WHERE forecast IS NOT NULL) FROM forecast('s', by := 'g', at := 't', value := 'v', horizon := 3, point := '%s')`, point)
		if got := queryString(t, db, q); got != "3" {
			t.Errorf("point := %s: %s forecasts, want 3", point, got)
		}
	}
}

// describe returns "name TYPE, ..." for the columns of q.
func describe(t *testing.T, db *sql.DB, q string) string {
	t.Helper()
	rows, err := db.Query("DESCRIBE " + q)
	if err != nil {
		t.Fatalf("DESCRIBE %s: %v", q, err)
	}
	defer rows.Close()
	cols, _ := rows.Columns()
	var out []string
	for rows.Next() {
		vals := make([]sql.NullString, len(cols))
		ptrs := make([]any, len(cols))
		for i := range vals {
			ptrs[i] = &vals[i]
		}
		if err := rows.Scan(ptrs...); err != nil {
			t.Fatal(err)
		}
		out = append(out, vals[0].String+" "+vals[1].String)
	}
	return strings.Join(out, ", ")
}

// structFields lists the field names of the one STRUCT column in a
// describe result, in order.
func structFields(t *testing.T, column string) string {
	t.Helper()
	open, end := strings.Index(column, "STRUCT("), strings.LastIndex(column, ")")
	if open < 0 || end < open {
		t.Fatalf("not a STRUCT: %s", column)
	}
	var names []string
	for _, f := range strings.Split(column[open+len("STRUCT("):end], ", ") {
		name, _, _ := strings.Cut(f, " ")
		names = append(names, strings.Trim(name, `"`))
	}
	return strings.Join(names, ", ")
}

// macroDefaults reads "name := default" pairs from the CREATE MACRO
// statements, by macro name.
func macroDefaults(text string) map[string][]string {
	out := map[string][]string{}
	head := regexp.MustCompile(`(?s)CREATE OR REPLACE TEMP MACRO (\w+)\((.*?)\) AS`)
	pair := regexp.MustCompile(`(\w+) := ('[^']*'|[^,)\s]+)`)
	for _, m := range head.FindAllStringSubmatch(text, -1) {
		for _, p := range pair.FindAllStringSubmatch(m[2], -1) {
			out[m[1]] = append(out[m[1]], p[1]+" := "+p[2])
		}
	}
	return out
}

func mustFunctions(t *testing.T) []*function {
	t.Helper()
	fs, err := allFunctions()
	if err != nil {
		t.Fatal(err)
	}
	return fs
}
