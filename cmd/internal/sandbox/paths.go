// Package sandbox decides which files a client of plumb's server may reach:
// only those under the data directory (--data), never the server's spill
// directory or database file, wherever those lie. The PostgreSQL server
// (cmd/internal/pgserver) checks every path a statement names through it,
// and so should anything else that serves files to clients.
package sandbox

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
)

// Paths is the file policy of one server: the data directory clients may
// read and write, and the private files and directories (spill directory,
// database file and its write-ahead log) they may never reach, even where
// those lie inside the data directory.
type Paths struct {
	data    string   // absolute, symbolic links resolved; "" when no file access
	private []string // absolute, symbolic links resolved
}

// New makes the policy for data (the data directory, "" for none) and the
// server's private paths. Paths that do not exist yet are kept as given,
// made absolute.
func New(data string, private ...string) (*Paths, error) {
	p := &Paths{}
	if data != "" {
		abs, err := realpath(data)
		if err != nil {
			return nil, fmt.Errorf("data directory: %w", err)
		}
		p.data = abs
	}
	for _, q := range private {
		if q == "" {
			continue
		}
		abs, err := realpath(q)
		if err != nil {
			return nil, err
		}
		p.private = append(p.private, abs)
	}
	return p, nil
}

// Data is the data directory (absolute, links resolved), "" when clients
// may reach no file.
func (p *Paths) Data() string { return p.data }

// Refused is the error for a path a client may not reach. Its message names
// the path as the client wrote it, never a server path.
type Refused struct {
	Path   string // as the client wrote it
	Reason string
}

func (e *Refused) Error() string { return fmt.Sprintf("path %q %s", e.Path, e.Reason) }

// IsRefused reports whether err is (or wraps) a Refused.
func IsRefused(err error) bool {
	var r *Refused
	return errors.As(err, &r)
}

// Resolve turns a path a client wrote (relative to the data directory, or
// absolute; a glob is allowed) into the absolute path under the data
// directory it means, with the symbolic links of the part that exists
// resolved. It refuses a URL, a home-directory path, anything outside the
// data directory, and the private paths and everything under them.
func (p *Paths) Resolve(path string) (string, error) {
	s := strings.TrimSpace(path)
	switch {
	case p.data == "":
		return "", &Refused{path, "cannot be read: the server was started without a data directory (--data), so clients reach no file"}
	case s == "":
		return "", &Refused{path, "is empty"}
	case strings.Contains(s, "://") || strings.HasPrefix(s, "~"):
		return "", &Refused{path, "is outside the data directory (only files under it can be read or written)"}
	}
	abs := s
	if !filepath.IsAbs(abs) {
		abs = filepath.Join(p.data, abs)
	}
	abs = filepath.Clean(abs)
	real, err := realpath(abs)
	if err != nil {
		return "", &Refused{path, "cannot be resolved"}
	}
	if !within(real, p.data) || !within(abs, p.data) {
		return "", &Refused{path, "is outside the data directory"}
	}
	for _, q := range p.private {
		if within(real, q) || within(abs, q) {
			return "", &Refused{path, "is one of the server's own files (database or spill files), which clients cannot reach"}
		}
	}
	return real, nil
}

// Scrub removes the server's own paths from a message meant for a client:
// the data directory becomes the relative path a client would write, the
// private paths a placeholder.
func (p *Paths) Scrub(msg string) string {
	for _, q := range p.private {
		msg = strings.ReplaceAll(msg, q, "<server file>")
	}
	if p.data != "" {
		msg = strings.ReplaceAll(msg, p.data+string(filepath.Separator), "")
		msg = strings.ReplaceAll(msg, p.data, ".")
	}
	return msg
}

// Private are the private paths (absolute, links resolved).
func (p *Paths) Private() []string { return append([]string(nil), p.private...) }

// within reports whether path is dir or lies under it.
func within(path, dir string) bool {
	if dir == "" {
		return false
	}
	rel, err := filepath.Rel(dir, path)
	return err == nil && rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator))
}

// realpath makes path absolute and resolves the symbolic links of its
// longest existing prefix (a glob's wildcards and files not yet written are
// kept as written).
func realpath(path string) (string, error) {
	abs, err := filepath.Abs(path)
	if err != nil {
		return "", err
	}
	cur, rest := abs, ""
	for { // the longest prefix that exists, one lstat a step
		if _, err := os.Lstat(cur); err == nil {
			break
		}
		parent := filepath.Dir(cur)
		if parent == cur {
			return abs, nil
		}
		rest = filepath.Join(filepath.Base(cur), rest)
		cur = parent
	}
	r, err := filepath.EvalSymlinks(cur)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) { // a link to nothing: refuse to guess
			return "", err
		}
		return abs, nil // a component that cannot be read: kept as written
	}
	return filepath.Join(r, rest), nil
}
