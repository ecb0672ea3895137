package main

import (
	"os"
	"regexp"
	"strings"
	"testing"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// TestRenamedFlags reads the flags line under "Renamed in this version" in
// DEVELOPERS.md: no command may still take an old flag, and some command
// must take each new one; plumb report writes its file with --out, as every
// other command does.
func TestRenamedFlags(t *testing.T) {
	text, err := os.ReadFile("../../DEVELOPERS.md")
	if err != nil {
		t.Fatal(err)
	}
	_, section, ok := strings.Cut(string(text), "\n## Renamed in this version\n")
	if !ok {
		t.Fatal("DEVELOPERS.md has no section Renamed in this version")
	}
	section, _, _ = strings.Cut(section, "\n## ")
	var line string
	for _, l := range strings.Split(section, "\n") {
		if strings.HasPrefix(l, "- flags: ") {
			line = l
		}
	}
	pairs := regexp.MustCompile("`--([a-z-]+)` → `--([a-z-]+)`").FindAllStringSubmatch(line, -1)
	if len(pairs) == 0 {
		t.Fatal("DEVELOPERS.md lists no renamed flags")
	}
	flags := map[string][]string{} // flag name -> commands taking it
	var walk func(c *cobra.Command)
	walk = func(c *cobra.Command) {
		c.Flags().VisitAll(func(f *pflag.Flag) { flags[f.Name] = append(flags[f.Name], c.Name()) })
		for _, sub := range c.Commands() {
			walk(sub)
		}
	}
	walk(newRootCommand())
	for _, p := range pairs {
		if cmds := flags[p[1]]; len(cmds) > 0 {
			t.Errorf("--%s is still taken by %v", p[1], cmds)
		}
		if len(flags[p[2]]) == 0 {
			t.Errorf("no command takes --%s", p[2])
		}
	}
	report, _, err := newRootCommand().Find([]string{"report"})
	if err != nil {
		t.Fatal(err)
	}
	if f := report.Flags().Lookup("out"); f == nil || f.Shorthand != "o" {
		t.Errorf("plumb report: no -o/--out flag")
	}
}
