package pgserver

import "strings"

// A statement a client sends is cut into tokens before plumb rewrites any of
// it (rewrite.go), so that a rule never matches inside a string literal, a
// quoted identifier or a comment. The lexer follows PostgreSQL's lexical
// rules (documentation, "SQL Syntax: Lexical Structure"), which DuckDB's
// parser shares: '...' strings with '' inside, E'...' strings with
// backslash escapes, "..." identifiers, $tag$...$tag$ strings, -- and /* */
// comments, $n parameters, numbers, and operators.

// tokenKind says what a token is.
type tokenKind int

const (
	tokSpace  tokenKind = iota // white space and comments
	tokWord                    // a keyword or an unquoted identifier
	tokQuoted                  // a double-quoted identifier
	tokString                  // a string literal of any form
	tokNumber                  // a numeric constant
	tokParam                   // $1, $2, ...
	tokOp                      // an operator or punctuation: ( ) , ; . :: [ ] + - ...
)

// token is one lexical element and its exact text.
type token struct {
	kind tokenKind
	text string
}

// is reports whether t is the word w (case-insensitive) or the operator w.
func (t token) is(w string) bool {
	switch t.kind {
	case tokWord:
		return strings.EqualFold(t.text, w)
	case tokOp:
		return t.text == w
	}
	return false
}

// name is an identifier's name: lower-cased when bare, unquoted when quoted.
func (t token) name() string {
	switch t.kind {
	case tokWord:
		return strings.ToLower(t.text)
	case tokQuoted:
		inner := strings.TrimPrefix(t.text, `"`)
		if len(inner) > 0 && strings.HasSuffix(inner, `"`) {
			inner = inner[:len(inner)-1]
		}
		return strings.ReplaceAll(inner, `""`, `"`)
	}
	return ""
}

// stringValue is a plain '...' literal's value.
func (t token) stringValue() (string, bool) {
	if t.kind != tokString || !strings.HasPrefix(t.text, "'") || len(t.text) < 2 || !strings.HasSuffix(t.text, "'") {
		return "", false
	}
	return strings.ReplaceAll(t.text[1:len(t.text)-1], "''", "'"), true
}

// lex cuts sql into tokens; joining their texts gives sql back exactly.
func lex(sql string) []token {
	var out []token
	for i := 0; i < len(sql); {
		start := i
		c := sql[i]
		kind := tokOp
		switch {
		case c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\f':
			for i < len(sql) && strings.IndexByte(" \t\n\r\f", sql[i]) >= 0 {
				i++
			}
			kind = tokSpace
		case strings.HasPrefix(sql[i:], "--"):
			i = lineEnd(sql, i)
			kind = tokSpace
		case strings.HasPrefix(sql[i:], "/*"):
			i = blockEnd(sql, i)
			kind = tokSpace
		case c == '\'':
			i = quoteEnd(sql, i, '\'', false)
			kind = tokString
		case (c == 'E' || c == 'e') && i+1 < len(sql) && sql[i+1] == '\'':
			i = quoteEnd(sql, i+1, '\'', true)
			kind = tokString
		case c == '"':
			i = quoteEnd(sql, i, '"', false)
			kind = tokQuoted
		case c == '$' && i+1 < len(sql) && isDigit(sql[i+1]):
			i++
			for i < len(sql) && isDigit(sql[i]) {
				i++
			}
			kind = tokParam
		case c == '$':
			if end, ok := dollarEnd(sql, i); ok {
				i, kind = end, tokString
			} else {
				i++
			}
		case isIdentStart(c):
			for i < len(sql) && (isIdentStart(sql[i]) || isDigit(sql[i]) || sql[i] == '$') {
				i++
			}
			kind = tokWord
		case isDigit(c) || c == '.' && i+1 < len(sql) && isDigit(sql[i+1]):
			for i < len(sql) && (isDigit(sql[i]) || sql[i] == '.' || sql[i] == '_' ||
				(sql[i] == 'e' || sql[i] == 'E') && i+1 < len(sql) && (isDigit(sql[i+1]) || sql[i+1] == '-' || sql[i+1] == '+')) {
				if sql[i] == 'e' || sql[i] == 'E' {
					i++
				}
				i++
			}
			kind = tokNumber
		case strings.HasPrefix(sql[i:], "::"):
			i += 2
		case strings.IndexByte("(),;[]{}.", c) >= 0:
			i++
		default: // an operator: a run of operator characters
			for i < len(sql) && strings.IndexByte("+-*/<>=~!@#%^&|`?:", sql[i]) >= 0 &&
				!strings.HasPrefix(sql[i:], "--") && !strings.HasPrefix(sql[i:], "/*") && !strings.HasPrefix(sql[i:], "::") {
				i++
			}
			if i == start {
				i++
			}
		}
		out = append(out, token{kind, sql[start:i]})
	}
	return out
}

// join puts tokens back together.
func join(toks []token) string {
	var b strings.Builder
	for _, t := range toks {
		b.WriteString(t.text)
	}
	return b.String()
}

func isDigit(c byte) bool { return c >= '0' && c <= '9' }

func isIdentStart(c byte) bool {
	return c == '_' || c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= 0x80
}

func lineEnd(s string, i int) int {
	if j := strings.IndexByte(s[i:], '\n'); j >= 0 {
		return i + j + 1
	}
	return len(s)
}

func blockEnd(s string, i int) int {
	depth := 0
	for j := i; j+1 < len(s); j++ {
		switch {
		case s[j] == '/' && s[j+1] == '*':
			depth++
			j++
		case s[j] == '*' && s[j+1] == '/':
			depth--
			j++
			if depth == 0 {
				return j + 1
			}
		}
	}
	return len(s)
}

// quoteEnd returns the index after the quote closing the one at i; a
// doubled quote is part of the text, and so, with backslashes, is \'.
func quoteEnd(s string, i int, q byte, backslash bool) int {
	for j := i + 1; j < len(s); j++ {
		switch {
		case backslash && s[j] == '\\':
			j++
		case s[j] == q:
			if j+1 < len(s) && s[j+1] == q {
				j++
				continue
			}
			return j + 1
		}
	}
	return len(s)
}

// dollarEnd finds the end of a dollar-quoted string opening at i.
func dollarEnd(s string, i int) (int, bool) {
	j := i + 1
	for j < len(s) && (isIdentStart(s[j]) || isDigit(s[j])) {
		j++
	}
	if j >= len(s) || s[j] != '$' {
		return 0, false
	}
	tag := s[i : j+1]
	if k := strings.Index(s[j+1:], tag); k >= 0 {
		return j + 1 + k + len(tag), true
	}
	return len(s), true
}

// significant drops space and comments, keeping positions of the rest.
func significant(toks []token) []int {
	var idx []int
	for i, t := range toks {
		if t.kind != tokSpace {
			idx = append(idx, i)
		}
	}
	return idx
}
