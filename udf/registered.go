package udf

import (
	"regexp"
	"sort"
	"strings"
	"sync"
)

// What a server built on plumb needs to know about plumb's SQL names, read
// from the registration itself so that no second list can drift from it.

// tableMacro matches the head of a table macro's definition in macros.
var tableMacro = regexp.MustCompile(`(?is)CREATE\s+OR\s+REPLACE\s+TEMP\s+MACRO\s+(\w+)\s*\(([^)]*)\)\s*AS\s+TABLE`)

// anyMacro matches the name of every macro in macros.
var anyMacro = regexp.MustCompile(`(?is)CREATE\s+OR\s+REPLACE\s+TEMP\s+MACRO\s+(\w+)\s*\(`)

// sourceParameters are the macro parameter names that take a source: a
// table or view name, a file path or glob, or a parenthesised SELECT.
var sourceParameters = map[string]bool{"source": true, "recipes": true}

// SourceArguments lists every plumb table function that reads a source and,
// for each, the 1-based positions of its source arguments (restore has two:
// the series and the recipes). It is read from the table macros'
// definitions: a parameter named source or recipes is a source.
func SourceArguments() map[string][]int {
	out := map[string][]int{}
	for _, m := range tableMacro.FindAllStringSubmatch(macros, -1) {
		for i, p := range strings.Split(m[2], ",") {
			name, _, _ := strings.Cut(strings.TrimSpace(p), ":=")
			if sourceParameters[strings.Trim(strings.TrimSpace(name), `"`)] {
				out[m[1]] = append(out[m[1]], i+1)
			}
		}
	}
	return out
}

// FunctionNames lists, sorted, every SQL name plumb registers: its Go
// scalar functions (plumb_...) and its macros (diagnose, unit_root, ...).
// A server must not let a client create an object of one of these names,
// nor of any name starting with plumb_.
func FunctionNames() []string {
	seen := map[string]bool{}
	for _, n := range scalarNames() {
		seen[n] = true
	}
	for _, m := range anyMacro.FindAllStringSubmatch(macros, -1) {
		seen[strings.ToLower(m[1])] = true
	}
	out := make([]string, 0, len(seen))
	for n := range seen {
		out = append(out, n)
	}
	sort.Strings(out)
	return out
}

var (
	scalarOnce  sync.Once
	scalarList  []string
	scalarCalls *regexp.Regexp
)

// scalarNames are the names of plumb's Go scalar functions.
func scalarNames() []string {
	scalarOnce.Do(func() {
		functions, _ := allFunctions()
		seen := map[string]bool{}
		for _, f := range functions {
			if !seen[f.name] {
				seen[f.name] = true
				scalarList = append(scalarList, f.name)
			}
		}
		sort.Strings(scalarList)
		quoted := make([]string, len(scalarList))
		for i, n := range scalarList {
			quoted[i] = regexp.QuoteMeta(n)
		}
		scalarCalls = regexp.MustCompile(`\b(` + strings.Join(quoted, "|") + `)\b`)
	})
	return scalarList
}

// qualifyCalls writes every call of a plumb scalar function in sql as
// system.main.name(...), where DuckDB keeps functions registered through
// its API and where no client can create anything: an object a client
// creates in the database's own schema (main) is found before the system
// catalogue, so an unqualified name could be shadowed.
func qualifyCalls(sql string) string {
	scalarNames()
	code := maskQuoted(sql)
	var b strings.Builder
	last := 0
	for _, m := range scalarCalls.FindAllStringIndex(code, -1) {
		before := byte(' ')
		if m[0] > 0 {
			before = sql[m[0]-1]
		}
		after := strings.TrimLeft(code[m[1]:], " \t\n")
		if before == '.' || before == '"' || !strings.HasPrefix(after, "(") {
			continue // qualified already, quoted, or not a call
		}
		b.WriteString(sql[last:m[0]])
		b.WriteString("system.main.")
		last = m[0]
	}
	b.WriteString(sql[last:])
	return b.String()
}

// maskQuoted returns sql with the inside of every string literal, quoted
// identifier and comment replaced by spaces (same length), so that a name
// inside a client's text is never taken for a call.
func maskQuoted(sql string) string {
	b := []byte(sql)
	for i := 0; i < len(b); i++ {
		switch {
		case b[i] == '\'' || b[i] == '"':
			q := b[i]
			j := i + 1
			for ; j < len(b); j++ {
				if b[j] == q {
					if j+1 < len(b) && b[j+1] == q {
						b[j], b[j+1] = ' ', ' '
						j++
						continue
					}
					break
				}
				b[j] = ' '
			}
			i = j
		case b[i] == '-' && i+1 < len(b) && b[i+1] == '-':
			for ; i < len(b) && b[i] != '\n'; i++ {
				b[i] = ' '
			}
		case b[i] == '/' && i+1 < len(b) && b[i+1] == '*':
			j := i
			for ; j < len(b) && !(b[j] == '*' && j+1 < len(b) && b[j+1] == '/'); j++ {
				b[j] = ' '
			}
			i = j + 1
		}
	}
	return string(b)
}
