// Package examples holds the runnable SQL of plumb's demo scenario. Each
// .sql file runs against the demo's tables (shops, containers and their
// *_truth tables, as `plumb demo` creates them); its first comment line is its
// title. `plumb demo` runs them all in name order, and a test runs each.
package examples

import (
	"embed"
	"io/fs"
	"sort"
	"strings"
)

//go:embed *.sql
var files embed.FS

// Example is one SQL file.
type Example struct {
	Name  string // file name
	Title string // first comment line, without "-- "
	SQL   string
}

// All returns every example in name order.
func All() ([]Example, error) {
	names, err := fs.Glob(files, "*.sql")
	if err != nil {
		return nil, err
	}
	sort.Strings(names)
	out := make([]Example, 0, len(names))
	for _, n := range names {
		b, err := files.ReadFile(n)
		if err != nil {
			return nil, err
		}
		s := string(b)
		title, _, _ := strings.Cut(s, "\n")
		out = append(out, Example{Name: n, Title: strings.TrimSpace(strings.TrimPrefix(title, "--")), SQL: s})
	}
	return out, nil
}
