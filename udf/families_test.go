package udf

import (
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"
)

// helpers are the internal plumb_* functions a family registers whose
// names do not carry the family's name.
var helpers = map[string][]string{
	"diagnose":           {"plumb_q_values"},
	"combine_diagnoses":  {"plumb_shard", "plumb_combine_sql"},
	"rolling_dispersion": {"plumb_rolling"},
	"forecast":           {"plumb_advance"},
}

var macroName = regexp.MustCompile(`(?i)CREATE OR REPLACE TEMP MACRO\s+([a-z_]+)\s*\(`)

// TestEveryFunctionHasItsFile checks the layout DEVELOPERS.md describes:
// each family's Go file udf/<name>.go exists, its macros come from
// udf/sql/<name>.sql and are named after it, every function it registers
// carries its name (or is a listed helper), no macro is created from Go
// text, and every SQL file belongs to a family.
func TestEveryFunctionHasItsFile(t *testing.T) {
	typesSeen := &types{}
	var sqlFiles []string
	for _, f := range families {
		if _, err := os.Stat(f.name + ".go"); err != nil {
			t.Errorf("family %s: no file %s.go", f.name, f.name)
		}
		if f.macros != "" {
			sqlFiles = append(sqlFiles, f.name+".sql")
			text, err := os.ReadFile(filepath.Join("sql", f.name+".sql"))
			if err != nil || string(text) != f.macros {
				t.Errorf("family %s: its macros are not sql/%s.sql (%v)", f.name, f.name, err)
			}
			names := macroName.FindAllStringSubmatch(f.macros, -1)
			if len(names) == 0 {
				t.Errorf("family %s: sql/%s.sql creates no macro", f.name, f.name)
			}
			for _, m := range names {
				if !strings.Contains(m[1], f.name) {
					t.Errorf("macro %s lives in sql/%s.sql, not in a file of its own name", m[1], f.name)
				}
			}
		}
		for _, fn := range f.functions(typesSeen) {
			name := strings.TrimPrefix(fn.name, "plumb_")
			if f.macros != "" && !strings.Contains(name, f.name) && !slices.Contains(helpers[f.name], fn.name) {
				t.Errorf("%s is registered by %s.go, which is not named after it", fn.name, f.name)
			}
		}
	}
	if typesSeen.err != nil {
		t.Fatal(typesSeen.err)
	}
	onDisk, err := filepath.Glob(filepath.Join("sql", "*.sql"))
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range onDisk {
		if !slices.Contains(sqlFiles, filepath.Base(p)) {
			t.Errorf("%s belongs to no family (open.go)", p)
		}
	}
	goFiles, err := filepath.Glob("*.go")
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range goFiles {
		if strings.HasSuffix(p, "_test.go") {
			continue
		}
		text, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		if m := macroName.Find(text); m != nil {
			t.Errorf("%s creates a macro in Go text (%q); macros live in udf/sql", p, m)
		}
	}
}

// TestMacroDefaultsFromTable checks that no macro writes a default of its
// own: every named parameter defaults to NULL or to an entry of package
// defaults ({{.name}}).
func TestMacroDefaultsFromTable(t *testing.T) {
	param := regexp.MustCompile(`([a-z_]+)\s*:=\s*([^,)]+)`)
	for _, f := range families {
		for _, m := range param.FindAllStringSubmatch(f.macros, -1) {
			v := strings.TrimSpace(m[2])
			if v != "NULL" && !regexp.MustCompile(`^\{\{\.[a-z_]+\}\}$`).MatchString(v) {
				t.Errorf("sql/%s.sql: %s := %s is written there, not taken from package defaults", f.name, m[1], v)
			}
		}
	}
	if strings.Contains(macros, "{{") || strings.Contains(macros, "error(") {
		t.Errorf("the macros did not render:\n%s", macros)
	}
}

// mathsPath is a file of the mathematics named on a family's "The maths:"
// line, relative to the module's top (stats/verdict/verdict*.go).
var mathsPath = regexp.MustCompile(`stats/[a-z_/]+\*?\.go`)

// TestMathsLinesNameFilesThatExist checks each family's line saying where
// its mathematics lives (DEVELOPERS.md, "How a SQL function is built"):
// every file it names exists, so that moving the mathematics cannot leave
// the line pointing at nothing.
func TestMathsLinesNameFilesThatExist(t *testing.T) {
	for _, f := range families {
		text, err := os.ReadFile(f.name + ".go")
		if err != nil {
			continue // TestEveryFunctionHasItsFile reports it
		}
		_, after, found := strings.Cut(string(text), "// The maths:")
		if !found {
			continue // a family without mathematics of its own (batches, columns)
		}
		var block strings.Builder
		for i, line := range strings.Split(after, "\n") {
			if i > 0 && !strings.HasPrefix(line, "//") {
				break
			}
			block.WriteString(line + "\n")
		}
		for _, p := range mathsPath.FindAllString(block.String(), -1) {
			if m, _ := filepath.Glob(filepath.Join("..", p)); len(m) == 0 {
				t.Errorf("%s.go: its maths line names %s, which does not exist", f.name, p)
			}
		}
	}
}
