package main

import (
	"os"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// TestMarkdownTables: every table in README.md and DEVELOPERS.md is one
// block of lines that each start with "|" (a blank line inside a table
// ends it, and the rest renders as raw pipes), led by a header and a
// delimiter row, and every row has as many cells as the header.
func TestMarkdownTables(t *testing.T) {
	for _, file := range []string{"../../README.md", "../../DEVELOPERS.md"} {
		text, err := os.ReadFile(file)
		if err != nil {
			t.Fatal(err)
		}
		for _, problem := range tableProblems(string(text)) {
			t.Errorf("%s: %s", file, problem)
		}
	}
}

func TestTableProblems(t *testing.T) {
	for _, test := range []struct {
		name, text string
		want       int
	}{
		{"good", "| a | b |\n|---|---|\n| 1 | `x|y` |\n\ntext\n", 0},
		{"blank line inside", "| a | b |\n|---|---|\n| 1 | 2 |\n\n| 3 | 4 |\n", 1},
		{"cells", "| a | b |\n|---|---|\n| 1 | 2 | 3 |\n", 1},
		{"no delimiter", "| a | b |\n| 1 | 2 |\n", 1},
		{"in a code block", "```\n| a |\n\n| b |\n```\n", 0},
		{"escaped pipe", "| a | b |\n|---|---|\n| 1 \\| 2 | 3 |\n", 0},
	} {
		if got := tableProblems(test.text); len(got) != test.want {
			t.Errorf("%s: %q, want %d problems", test.name, got, test.want)
		}
	}
}

var delimiterRow = regexp.MustCompile(`^\|(\s*:?-+:?\s*\|)+$`)

// tableProblems returns one line for each malformed table row in a
// Markdown text, outside fenced code blocks.
func tableProblems(text string) []string {
	var problems []string
	lines := strings.Split(text, "\n")
	inCode := false
	for i := 0; i < len(lines); i++ {
		line := strings.TrimSpace(lines[i])
		if strings.HasPrefix(line, "```") {
			inCode = !inCode
			continue
		}
		if inCode || !strings.HasPrefix(line, "|") {
			continue
		}
		start := i
		for i < len(lines) && strings.HasPrefix(strings.TrimSpace(lines[i]), "|") {
			i++
		}
		block := lines[start:i]
		if len(block) < 2 || !delimiterRow.MatchString(strings.TrimSpace(block[1])) {
			problems = append(problems, "line "+strconv.Itoa(start+1)+": a table row without a header and delimiter row above it (a blank line inside a table?)")
			continue
		}
		want := cells(block[0])
		for j, row := range block {
			if got := cells(row); got != want {
				problems = append(problems, "line "+strconv.Itoa(start+j+1)+": "+strconv.Itoa(got)+" cells, the header has "+strconv.Itoa(want))
			}
		}
	}
	return problems
}

// cells counts the cells of a table row: the "|" outside code spans and
// not escaped, less one.
func cells(row string) int {
	row = strings.TrimSpace(row)
	n, inCode := 0, false
	for i := 0; i < len(row); i++ {
		switch {
		case row[i] == '`':
			inCode = !inCode
		case row[i] == '\\' && !inCode:
			i++
		case row[i] == '|' && !inCode:
			n++
		}
	}
	return n - 1
}
