// Package explorer is plumb serve's explorer page (--http): pick a source
// and its columns, diagnose it once, then filter, sort and page through
// every group, open any group's pictures and tests, and download what is
// shown. It serves from the same sandboxed database as the PostgreSQL
// listener, to the same users; each login gets its own DuckDB connection,
// so one user's kept diagnoses (TEMP tables) are invisible to another.
//
// Everything is drawn on the server (inline SVG, html/template); the pages
// work without JavaScript, and one small script adds keyboard navigation.
// Nothing is fetched from the network.
package explorer

import (
	"context"
	"database/sql"
	"errors"
	"log/slog"
	"net"
	"net/http"
	"sync"
	"time"

	"github.com/plumb-sql/plumb/cmd/internal/sandbox"
)

// Config says what the explorer serves and to whom.
type Config struct {
	DB *sql.DB // the server's (sandboxed) database
	// Files is the server's file policy: sources come only from its data
	// directory (none: tables only).
	Files *sandbox.Paths
	// Trust skips the login (plumb serve --auth trust, loopback only).
	Trust bool
	// CheckPassword verifies a user's password (against plumb serve's SCRAM
	// verifiers); unused with Trust.
	CheckPassword func(user, password string) bool
	// TLS says the page is served over HTTPS, so the cookie is marked Secure.
	TLS bool
	Log *slog.Logger

	// Limits; zero values mean the defaults below.
	MaxSessions      int           // logins at once (default 32)
	IdleTimeout      time.Duration // a session unused this long is closed (default 30 min)
	QueryTimeout     time.Duration // a list, group or download query (default 60 s)
	FailedLoginDelay time.Duration // pause before a failed login is answered (default 1 s)
	LoginAttempts    int           // failed logins per address per LoginWindow (default 5)
	LoginWindow      time.Duration // (default 1 min)
	KeptRuns         int           // diagnoses a session keeps (default 4; the oldest is dropped)
}

func (c *Config) defaults() {
	if c.MaxSessions <= 0 {
		c.MaxSessions = 32
	}
	if c.IdleTimeout <= 0 {
		c.IdleTimeout = 30 * time.Minute
	}
	if c.QueryTimeout <= 0 {
		c.QueryTimeout = 60 * time.Second
	}
	if c.FailedLoginDelay <= 0 {
		c.FailedLoginDelay = time.Second
	}
	if c.LoginAttempts <= 0 {
		c.LoginAttempts = 5
	}
	if c.LoginWindow <= 0 {
		c.LoginWindow = time.Minute
	}
	if c.KeptRuns <= 0 {
		c.KeptRuns = 4
	}
	if c.Log == nil {
		c.Log = slog.New(slog.DiscardHandler)
	}
}

// Explorer is the page's handler and its sessions.
type Explorer struct {
	cfg      Config
	sessions *sessions
	limiter  *loginLimiter
	mux      *http.ServeMux
	closed   chan struct{}
	once     sync.Once
}

// New prepares the explorer; Close ends its sessions.
func New(cfg Config) (*Explorer, error) {
	cfg.defaults()
	if cfg.DB == nil || cfg.Files == nil {
		return nil, errors.New("explorer: no database or no file policy")
	}
	if !cfg.Trust && cfg.CheckPassword == nil {
		return nil, errors.New("explorer: no password check and not --auth trust")
	}
	e := &Explorer{cfg: cfg, sessions: newSessions(cfg.MaxSessions), limiter: newLoginLimiter(cfg.LoginAttempts, cfg.LoginWindow),
		closed: make(chan struct{})}
	e.routes()
	go e.reapIdle()
	return e, nil
}

// Close ends every session: running diagnoses are cancelled and each
// session's DuckDB connection (with its TEMP tables) is closed.
func (e *Explorer) Close() {
	e.once.Do(func() {
		close(e.closed)
		e.sessions.closeAll()
	})
}

func (e *Explorer) reapIdle() {
	tick := time.NewTicker(time.Minute)
	defer tick.Stop()
	for {
		select {
		case <-e.closed:
			return
		case <-tick.C:
			e.sessions.closeIdle(e.cfg.IdleTimeout)
		}
	}
}

// ServeHTTP answers one request; see routes.
func (e *Explorer) ServeHTTP(w http.ResponseWriter, r *http.Request) { e.mux.ServeHTTP(w, r) }

// Serve serves the explorer on ln until ctx ends, then shuts the HTTP
// server down (letting requests finish for up to grace) and closes the
// sessions. Timeouts bound slow clients: headers within 10 s, a request
// within 30 s, idle keep-alive connections 2 min; request bodies are
// limited where they are read.
func (e *Explorer) Serve(ctx context.Context, ln net.Listener, grace time.Duration, tlsCert, tlsKey string) error {
	hs := &http.Server{
		Handler:           e,
		ReadHeaderTimeout: 10 * time.Second,
		ReadTimeout:       30 * time.Second,
		IdleTimeout:       2 * time.Minute,
		MaxHeaderBytes:    64 << 10,
		ErrorLog:          slog.NewLogLogger(e.cfg.Log.Handler(), slog.LevelWarn),
	}
	done := make(chan error, 1)
	go func() {
		if tlsCert != "" {
			done <- hs.ServeTLS(ln, tlsCert, tlsKey)
		} else {
			done <- hs.Serve(ln)
		}
	}()
	var err error
	select {
	case <-ctx.Done():
		sctx, cancel := context.WithTimeout(context.Background(), grace)
		err = hs.Shutdown(sctx)
		cancel()
		<-done
	case err = <-done:
	}
	e.Close()
	if errors.Is(err, http.ErrServerClosed) {
		err = nil
	}
	return err
}
