// Package statements splits a script of SQL statements at its semicolons.
package statements

import "strings"

// Split returns the statements of script in order, without their
// terminating semicolons and surrounding space. Semicolons inside string
// literals ('...'), quoted identifiers ("..."), dollar-quoted strings
// ($$...$$ or $tag$...$tag$), line comments (-- ...) and block comments
// (/* ... */) do not split. Statements that hold only space and comments are
// dropped. An unterminated quote or comment runs to the end of the script,
// which then forms the last statement, so the database reports the error.
func Split(script string) []string {
	var out []string
	start := 0
	emit := func(end int) {
		s := strings.TrimSpace(script[start:end])
		if s != "" && !onlyComments(s) {
			out = append(out, s)
		}
	}
	for i := 0; i < len(script); {
		c := script[i]
		switch {
		case c == '\'' || c == '"':
			i = skipQuoted(script, i, c)
		case c == '-' && strings.HasPrefix(script[i:], "--"):
			i = skipLine(script, i)
		case c == '/' && strings.HasPrefix(script[i:], "/*"):
			i = skipBlock(script, i)
		case c == '$':
			i = skipDollar(script, i)
		case c == ';':
			emit(i)
			i++
			start = i
		default:
			i++
		}
	}
	emit(len(script))
	return out
}

// skipQuoted returns the index after the quote that closes the one at i; a
// doubled quote inside is an escaped quote.
func skipQuoted(s string, i int, q byte) int {
	for j := i + 1; j < len(s); j++ {
		if s[j] == q {
			if j+1 < len(s) && s[j+1] == q {
				j++
				continue
			}
			return j + 1
		}
	}
	return len(s)
}

func skipLine(s string, i int) int {
	if j := strings.IndexByte(s[i:], '\n'); j >= 0 {
		return i + j + 1
	}
	return len(s)
}

func skipBlock(s string, i int) int {
	if j := strings.Index(s[i+2:], "*/"); j >= 0 {
		return i + 2 + j + 2
	}
	return len(s)
}

// skipDollar skips a dollar-quoted string $tag$...$tag$ starting at i; a $
// that does not open one (a parameter such as $1) is stepped over.
func skipDollar(s string, i int) int {
	j := i + 1
	for j < len(s) && (s[j] == '_' || isAlnum(s[j])) {
		j++
	}
	if j >= len(s) || s[j] != '$' || (j > i+1 && s[i+1] >= '0' && s[i+1] <= '9') {
		return i + 1
	}
	tag := s[i : j+1]
	if k := strings.Index(s[j+1:], tag); k >= 0 {
		return j + 1 + k + len(tag)
	}
	return len(s)
}

func isAlnum(c byte) bool {
	return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9'
}

// onlyComments reports whether s holds nothing but comments and space.
func onlyComments(s string) bool {
	for i := 0; i < len(s); {
		switch {
		case s[i] == ' ' || s[i] == '\t' || s[i] == '\n' || s[i] == '\r':
			i++
		case strings.HasPrefix(s[i:], "--"):
			i = skipLine(s, i)
		case strings.HasPrefix(s[i:], "/*"):
			i = skipBlock(s, i)
		default:
			return false
		}
	}
	return true
}
