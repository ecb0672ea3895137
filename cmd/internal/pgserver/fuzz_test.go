package pgserver

import (
	"bufio"
	"strings"
	"testing"
)

// FuzzLex: the lexer gives any input back exactly, and the rewrite rules
// never panic on what it makes of it.
func FuzzLex(f *testing.F) {
	for _, s := range []string{"SELECT 'a''b', E'\\'', $$x$$, \"q\"\"\" -- c", "/* /* */", "$1::int[]", "OPERATOR(", "COPY t TO 'x'", "SELECT f(", "'",
		"FROM read_csv(['a', $1]", "FROM diagnose('(FROM ''x.csv'')', by := 'g'", "CREATE MACRO m(p) AS TABLE FROM restore(p, 'r.csv'",
		"EXPORT DATABASE 'd'", "COPY 'x' TO STDOUT", "ALTER TABLE t RENAME TO", "DROP TABLE a,", "PRAGMA", "CALL", "FROM \"x.csv\"."} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, sql string) {
		if got := join(lex(sql)); got != sql {
			t.Fatalf("lex(%q) joined to %q", sql, got)
		}
		rewriteSQL(sql, testGate("/data"))
		paramCastOIDs(lex(sql))
		ownKind(sql)
		parseCopyOptions(sql)
	})
}

// FuzzArrayText: PostgreSQL array input is parsed or refused, never a
// panic; what parses renders as literals.
func FuzzArrayText(f *testing.F) {
	for _, s := range []string{`{1,2}`, `{"a\"b",NULL}`, `{}`, `[1:2]={3,4}`, `{{1}}`, `{"`} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if elems, err := parseArrayText(s); err == nil {
			if _, err := textArrayLiterals(s, oidText); err != nil {
				t.Fatalf("%q parsed to %d elements but did not render: %v", s, len(elems), err)
			}
		}
	})
}

// FuzzCopyRecords: the text and CSV readers of COPY FROM STDIN end on any
// input without a panic.
func FuzzCopyRecords(f *testing.F) {
	for _, s := range []string{"1\ta\\tb\n\\N\n", "\"a,\"\"b\",c\r\n", "\"unterminated", "\\"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		for _, opts := range []copyOptions{parseCopyOptions(""), parseCopyOptions("CSV")} {
			r := bufio.NewReader(strings.NewReader(s))
			for k := 0; k <= len(s)+1; k++ {
				var err error
				if opts.csv {
					_, _, err = readCSVRecord(r, opts)
				} else {
					_, _, err = readTextRecord(r, opts)
				}
				if err != nil {
					break
				}
			}
		}
	})
}
