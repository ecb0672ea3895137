package sandbox

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestResolve: what a client may name, as an attacker would try it.
func TestResolve(t *testing.T) {
	root := t.TempDir()
	data := filepath.Join(root, "data")
	private := filepath.Join(data, "private") // a private directory inside data is refused too
	outside := filepath.Join(root, "outside")
	for _, d := range []string{data, private, outside, filepath.Join(data, "in")} {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	os.Symlink(outside, filepath.Join(data, "escape"))
	os.Symlink(private, filepath.Join(data, "sneak"))
	p, err := New(data, private, filepath.Join(root, "db.duckdb"))
	if err != nil {
		t.Fatal(err)
	}
	real, _ := filepath.EvalSymlinks(data)
	for _, test := range []struct {
		path, want string // want "" when refused
	}{
		{"shops.parquet", filepath.Join(real, "shops.parquet")},
		{"in/*.csv", filepath.Join(real, "in", "*.csv")},
		{"in/../x.csv", filepath.Join(real, "x.csv")},
		{filepath.Join(data, "x.csv"), filepath.Join(real, "x.csv")},
		{"not/yet/written.parquet", filepath.Join(real, "not", "yet", "written.parquet")},
		{"../outside/x.csv", ""},
		{"in/../../outside/x.csv", ""},
		{"/etc/passwd", ""},
		{"escape/x.csv", ""},
		{"escape/*", ""},
		{"sneak/x", ""},
		{"private/*", ""},
		{filepath.Join(root, "db.duckdb"), ""},
		{"../db.duckdb", ""},
		{"http://example.com/x.csv", ""},
		{"s3://bucket/x.parquet", ""},
		{"~/x.csv", ""},
		{"", ""},
	} {
		got, err := p.Resolve(test.path)
		if test.want == "" {
			if err == nil {
				t.Errorf("Resolve(%q) = %q, want a refusal", test.path, got)
			} else if !IsRefused(err) || strings.Contains(err.Error(), root) && !strings.Contains(test.path, root) {
				t.Errorf("Resolve(%q): %v (a Refused naming only the path as written)", test.path, err)
			}
			continue
		}
		if err != nil || got != test.want {
			t.Errorf("Resolve(%q) = %q, %v, want %q", test.path, got, err, test.want)
		}
	}
	none, _ := New("")
	if _, err := none.Resolve("x.csv"); err == nil {
		t.Error("without a data directory a path was allowed")
	}
	msg := p.Scrub("No files found that match the pattern \"" + filepath.Join(real, "in", "x.csv") + "\" in " + private)
	if strings.Contains(msg, root) || !strings.Contains(msg, `"in/x.csv"`) {
		t.Errorf("Scrub left a server path: %s", msg)
	}
}

// TestSpillDirectory: the spill directory lies outside the data directory
// and only its owner may enter it.
func TestSpillDirectory(t *testing.T) {
	data := t.TempDir()
	dir, err := SpillDirectory(data)
	if err != nil {
		t.Fatal(err)
	}
	defer os.RemoveAll(dir)
	if within(dir, data) {
		t.Errorf("spill directory %s lies in %s", dir, data)
	}
	if st, err := os.Stat(dir); err != nil || st.Mode().Perm() != 0o700 {
		t.Errorf("spill directory mode %v, %v, want 0700", st.Mode().Perm(), err)
	}
	t.Setenv("TMPDIR", data) // a temporary directory inside --data is passed over
	dir2, err := SpillDirectory(data)
	if err == nil {
		defer os.RemoveAll(dir2)
		if within(dir2, data) {
			t.Errorf("with TMPDIR inside --data the spill directory is %s", dir2)
		}
	}
}
