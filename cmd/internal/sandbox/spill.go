package sandbox

import (
	"fmt"
	"os"
	"path/filepath"
)

// SpillDirectory creates a fresh directory, readable by this process's user
// only, for DuckDB's temporary (spill) files, outside the data directory
// data: in the system's temporary directory, else in the user's cache
// directory. DuckDB lets itself read and write its temporary directory
// whatever allowed_directories says, so it must lie where no client path
// can reach (Resolve refuses everything outside the data directory).
func SpillDirectory(data string) (string, error) {
	dataReal := ""
	if data != "" {
		var err error
		if dataReal, err = realpath(data); err != nil {
			return "", err
		}
	}
	var bases []string
	bases = append(bases, os.TempDir())
	if cache, err := os.UserCacheDir(); err == nil {
		bases = append(bases, filepath.Join(cache, "plumb"))
	}
	for _, base := range bases {
		real, err := realpath(base)
		if err != nil || dataReal != "" && (within(real, dataReal)) {
			continue
		}
		if err := os.MkdirAll(base, 0o700); err != nil {
			continue
		}
		dir, err := os.MkdirTemp(base, "plumb-spill-")
		if err != nil {
			continue
		}
		if real, err := realpath(dir); err == nil && (dataReal == "" || !within(real, dataReal)) {
			return real, nil
		}
		os.Remove(dir)
	}
	return "", fmt.Errorf("no place for DuckDB's spill files outside --data: the temporary directory (TMPDIR) and the cache directory lie inside it; set TMPDIR to a directory outside --data")
}
