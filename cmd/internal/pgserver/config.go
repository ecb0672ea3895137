// Package pgserver is plumb's PostgreSQL wire-protocol query proxy: psql,
// notebooks' PostgreSQL drivers and BI tools connect to it and run SQL, with
// plumb's functions, on an embedded DuckDB database.
//
// Every client session gets its own DuckDB connection (its own transactions
// and TEMP tables) on one shared database. The database is sandboxed: no
// file access outside the data directory, no extensions, and the
// configuration is locked after start-up.
package pgserver

import (
	"bufio"
	"fmt"
	"net"
	"os"
	"strings"
	"time"
)

// Config says how to serve.
type Config struct {
	Addr         string // host:port to listen on
	DataDir      string // the only directory clients may read and write
	DBPath       string // database file; empty for in-memory
	ReadOnly     bool   // open DBPath read-only
	Auth         string // "scram" (default) or "trust" (loopback only)
	Users        map[string]string
	Roles        map[string]Role // per user; a user not listed has RoleWrite
	TLSCert      string
	TLSKey       string
	QueryTimeout time.Duration // 0: none
	MaxConns     int           // 0: 64
	MemoryLimit  string        // DuckDB memory_limit, e.g. "4GB"; empty: DuckDB's default
	Grace        time.Duration // how long running statements may finish at shutdown
	// FailedLoginDelay is the pause before a failed login is answered.
	FailedLoginDelay time.Duration
	// AuthTimeout is how long a connection may take to log in (0: 10 s,
	// as PostgreSQL's authentication_timeout); it holds a connection slot
	// meanwhile.
	AuthTimeout time.Duration
	// TLSRequired refuses sessions that did not negotiate TLS.
	TLSRequired bool
}

// Check validates a configuration before anything is opened.
func (c *Config) Check() error {
	if c.Auth == "" {
		c.Auth = "scram"
	}
	if c.MaxConns == 0 {
		c.MaxConns = 64
	}
	if c.Grace == 0 {
		c.Grace = 10 * time.Second
	}
	if c.AuthTimeout == 0 {
		c.AuthTimeout = 10 * time.Second
	}
	if c.FailedLoginDelay == 0 {
		c.FailedLoginDelay = time.Second
	}
	switch c.Auth {
	case "scram":
		if len(c.Users) == 0 {
			return fmt.Errorf("no users: give a users file (--users) or PLUMB_USERS, or use --auth trust on a loopback address")
		}
	case "trust":
		host, _, err := net.SplitHostPort(c.Addr)
		if err != nil {
			return fmt.Errorf("listen address %q: %w", c.Addr, err)
		}
		if ip := net.ParseIP(host); host != "localhost" && (ip == nil || !ip.IsLoopback()) {
			return fmt.Errorf("--auth trust is allowed only on a loopback address, not %q", host)
		}
	default:
		return fmt.Errorf("unknown --auth %q: use scram or trust", c.Auth)
	}
	if (c.TLSCert == "") != (c.TLSKey == "") {
		return fmt.Errorf("give both --tls-cert and --tls-key, or neither")
	}
	if c.TLSRequired && c.TLSCert == "" {
		return fmt.Errorf("--tls-required needs a certificate: give --tls-cert and --tls-key")
	}
	if c.MaxConns < 0 || c.AuthTimeout < 0 {
		return fmt.Errorf("--max-connections and --auth-timeout must not be negative")
	}
	if c.MemoryLimit != "" {
		if _, err := byteSize(c.MemoryLimit); err != nil {
			return fmt.Errorf("--memory-limit: %w", err)
		}
	}
	if c.DataDir != "" {
		st, err := os.Stat(c.DataDir)
		if err != nil || !st.IsDir() {
			return fmt.Errorf("--data %q is not a directory", c.DataDir)
		}
	}
	return nil
}

// ParseUsers reads "user:password" lines (blank lines and # comments are
// skipped), as in a users file or the PLUMB_USERS variable (lines or
// commas). A line may start with a role and a space, "read ana:s3cret" or
// "write ben:pa55"; without one a user has RoleWrite. The password is
// everything after the first colon.
func ParseUsers(text string) (map[string]string, map[string]Role, error) {
	users := map[string]string{}
	roles := map[string]Role{}
	sc := bufio.NewScanner(strings.NewReader(strings.ReplaceAll(text, ",", "\n")))
	for n := 1; sc.Scan(); n++ {
		line := strings.TrimSpace(sc.Text())
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		user, password, ok := strings.Cut(line, ":")
		role := RoleWrite
		if r, name, spaced := strings.Cut(user, " "); spaced {
			switch Role(r) {
			case RoleRead, RoleWrite:
				role, user = Role(r), strings.TrimSpace(name)
			default:
				return nil, nil, fmt.Errorf("users line %d: want [read|write] user:password, not the role %q", n, r)
			}
		}
		if !ok || user == "" || password == "" {
			return nil, nil, fmt.Errorf("users line %d: want [read|write] user:password", n)
		}
		users[user] = password
		roles[user] = role
	}
	return users, roles, sc.Err()
}

// role is the user's role (RoleWrite unless the users file says read).
func (c *Config) role(user string) Role {
	if r, ok := c.Roles[user]; ok {
		return r
	}
	return RoleWrite
}
