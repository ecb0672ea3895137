package stats

import (
	"go/parser"
	"go/token"
	"io/fs"
	"path"
	"path/filepath"
	"slices"
	"sort"
	"strconv"
	"strings"
	"testing"
)

// module is plumb's module path; stats is the bottom of its import graph.
const module = "github.com/plumb-sql/plumb"

// allowedImports is the import graph under stats, by folder relative to
// stats ("." is stats itself): what each package's code (tests included)
// may import from the module. A package missing here fails the test, so a
// new package is placed in the graph on purpose. Every package may also
// import defaults and longtests, and every package's tests
// internal/testseries; nothing imports upwards (udf, cmd) or DuckDB.
var allowedImports = map[string][]string{
	"forecast":            {"verdict", "unitroot", ".", "internal/numeric"},
	"verdict":             {"unitroot", ".", "internal/numeric"},
	"unitroot":            {".", "internal/numeric"},
	".":                   {"internal/numeric"},
	"internal/numeric":    {},
	"internal/testseries": {},
	"defaults":            {},
	"longtests":           {},
}

// importableEverywhere may be imported by every package under stats.
var importableEverywhere = map[string]bool{"defaults": true, "longtests": true}

// TestImportGraph parses the imports of every Go file under stats (without
// building anything, so no cgo is needed) and fails on an import the graph
// above does not allow, on cgo, and on DuckDB.
func TestImportGraph(t *testing.T) {
	fset := token.NewFileSet()
	seen := map[string]bool{}
	err := filepath.WalkDir(".", func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && (d.Name() == "testdata" || strings.HasPrefix(d.Name(), ".")) && p != "." {
			return filepath.SkipDir
		}
		if d.IsDir() || !strings.HasSuffix(p, ".go") {
			return nil
		}
		dir := filepath.ToSlash(filepath.Dir(p))
		seen[dir] = true
		allowed, known := allowedImports[dir]
		if !known {
			t.Errorf("%s: package %s is not in allowedImports (stats/imports_test.go): place it in the graph", p, dir)
			return nil
		}
		f, err := parser.ParseFile(fset, p, nil, parser.ImportsOnly)
		if err != nil {
			return err
		}
		isTest := strings.HasSuffix(p, "_test.go")
		for _, spec := range f.Imports {
			imp, _ := strconv.Unquote(spec.Path.Value)
			switch {
			case imp == "C":
				t.Errorf("%s imports C: stats is pure Go", p)
				continue
			case strings.Contains(imp, "duckdb"):
				t.Errorf("%s imports %s: stats does not talk to DuckDB", p, imp)
				continue
			case imp == module+"/stats":
				imp = "."
			case strings.HasPrefix(imp, module+"/stats/"):
				imp = strings.TrimPrefix(imp, module+"/stats/")
			case imp == module || strings.HasPrefix(imp, module+"/"):
				t.Errorf("%s imports %s: nothing under stats imports upwards", p, imp)
				continue
			default:
				continue // the standard library, gonum
			}
			if imp == dir || importableEverywhere[imp] || (isTest && imp == "internal/testseries") {
				continue
			}
			if !slices.Contains(allowed, imp) {
				t.Errorf("%s imports stats/%s, which %s may not import (allowed: %s)",
					p, path.Clean(imp), dir, strings.Join(allowed, ", "))
			}
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	var missing []string
	for dir := range allowedImports {
		if !seen[dir] {
			missing = append(missing, dir)
		}
	}
	sort.Strings(missing)
	if len(missing) > 0 {
		t.Errorf("allowedImports names packages with no Go files: %v", missing)
	}
}
