package pgserver

import (
	"errors"
	"os"
	"path/filepath"
	"testing"
)

// ResolveDataPath, written as an attacker would try it: only an existing
// file reached from --data without leaving it passes.
func TestResolveDataPath(t *testing.T) {
	root := t.TempDir()
	data := filepath.Join(root, "data")
	for _, d := range []string{data, filepath.Join(data, "sub")} {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	for _, f := range []string{filepath.Join(data, "a.parquet"), filepath.Join(data, "sub", "b.csv"), filepath.Join(root, "secret.csv")} {
		if err := os.WriteFile(f, []byte("x"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	os.Symlink(filepath.Join(root, "secret.csv"), filepath.Join(data, "out.csv"))
	os.Symlink(root, filepath.Join(data, "up"))
	os.Symlink(filepath.Join(data, "a.parquet"), filepath.Join(data, "in.parquet"))
	cases := []struct {
		path, want string // want "": refused
	}{
		{"a.parquet", filepath.Join(data, "a.parquet")},
		{"sub/b.csv", filepath.Join(data, "sub", "b.csv")},
		{"sub/../a.parquet", filepath.Join(data, "a.parquet")},
		{"in.parquet", filepath.Join(data, "a.parquet")}, // a link that stays inside
		{"../secret.csv", ""},
		{"sub/../../secret.csv", ""},
		{filepath.Join(root, "secret.csv"), ""},
		{"/etc/passwd", ""},
		{"out.csv", ""},
		{"up/secret.csv", ""},
		{"up/data/a.parquet", filepath.Join(data, "a.parquet")}, // out and back in: the file is under --data
		{"missing.parquet", ""},
		{"*.parquet", ""},
		{"a.parquet\x00", ""},
		{"file:///etc/passwd", ""},
		{"~/secret.csv", ""},
		{"", ""},
		{".", ""},
		{"sub", filepath.Join(data, "sub")}, // a folder resolves; callers check for a regular file
	}
	for _, c := range cases {
		got, err := ResolveDataPath(data, c.path)
		if c.want == "" {
			if err == nil || !errors.Is(err, ErrOutsideData) {
				t.Errorf("%q: got %q, %v; want it refused", c.path, got, err)
			}
			continue
		}
		if err != nil || got != c.want {
			t.Errorf("%q: got %q, %v; want %q", c.path, got, err, c.want)
		}
	}
	if _, err := ResolveDataPath("", "a.parquet"); err == nil {
		t.Error("without --data every path is refused")
	}
}
