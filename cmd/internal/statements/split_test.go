package statements

import (
	"slices"
	"strings"
	"testing"
)

func TestSplit(t *testing.T) {
	for _, test := range []struct {
		script string
		want   []string
	}{
		{"SELECT 1", []string{"SELECT 1"}},
		{"SELECT 1; SELECT 2;", []string{"SELECT 1", "SELECT 2"}},
		{"SELECT 'a;b'; SELECT 2", []string{"SELECT 'a;b'", "SELECT 2"}},
		{"SELECT 'it''s;'; SELECT 2", []string{"SELECT 'it''s;'", "SELECT 2"}},
		{`SELECT 1 AS "x;y"; SELECT 2`, []string{`SELECT 1 AS "x;y"`, "SELECT 2"}},
		{"-- a; comment\nSELECT 1; /* b; */ SELECT 2", []string{"-- a; comment\nSELECT 1", "/* b; */ SELECT 2"}},
		{"SELECT $$a;b$$; SELECT $t$;$t$", []string{"SELECT $$a;b$$", "SELECT $t$;$t$"}},
		{"SELECT $1; SELECT 2", []string{"SELECT $1", "SELECT 2"}},
		{";;  ; -- only a comment\n", nil},
		{"SELECT 'open;", []string{"SELECT 'open;"}},
	} {
		if got := Split(test.script); !slices.Equal(got, test.want) {
			t.Errorf("Split(%q) = %q, want %q", test.script, got, test.want)
		}
	}
}

// FuzzSplit checks that splitting never panics and never loses text: every
// statement is a piece of the script.
func FuzzSplit(f *testing.F) {
	for _, s := range []string{"SELECT 1; SELECT 2", "'a;'", "$x$;$x$", "/*", "--", `"`, "$1;$"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, script string) {
		for _, s := range Split(script) {
			if !strings.Contains(script, s) {
				t.Fatalf("statement %q is not part of %q", s, script)
			}
		}
	})
}
