package explorer

import (
	"context"
	"crypto/rand"
	"crypto/subtle"
	"database/sql"
	"database/sql/driver"
	"encoding/base64"
	"errors"
	"fmt"
	"net/http"
	"sync"
	"time"
)

const sessionCookie = "plumb_session"

// session is one login: its user, its CSRF token, its own DuckDB
// connection (so its TEMP tables are its own) and the diagnoses it keeps.
type session struct {
	id, csrf string
	user     string
	conn     *sql.Conn
	// use serialises the connection: one statement at a time, and a
	// request waiting for it gives up when its own context ends.
	use chan struct{}

	mu       sync.Mutex
	lastUsed time.Time
	runs     []*run // oldest first
	nextRun  int
	closed   bool
}

// acquire waits for the session's connection; release gives it back.
func (s *session) acquire(ctx context.Context) error {
	select {
	case s.use <- struct{}{}:
		return nil
	case <-ctx.Done():
		return ctx.Err()
	}
}

func (s *session) release() { <-s.use }

// useSession bounds a request's work by the query timeout and waits for
// s's connection. With ok false the request has been answered (503) and
// there is nothing to release; otherwise the caller releases s when done
// with the connection and calls cancel when done with ctx.
func (e *Explorer) useSession(w http.ResponseWriter, r *http.Request, s *session) (ctx context.Context, cancel context.CancelFunc, ok bool) {
	ctx, cancel = context.WithTimeout(r.Context(), e.cfg.QueryTimeout)
	if err := s.acquire(ctx); err != nil {
		cancel()
		e.fail(w, r, http.StatusServiceUnavailable, fmt.Errorf("this session is busy (a diagnose is running): %w", err))
		return nil, nil, false
	}
	return ctx, cancel, true
}

func (s *session) touch() {
	s.mu.Lock()
	s.lastUsed = time.Now()
	s.mu.Unlock()
}

// close cancels the session's diagnoses and closes its connection, as
// plumb serve closes a PostgreSQL session's: the connection is discarded,
// not returned to database/sql's pool, so nothing it created reaches
// another session.
func (s *session) close() {
	s.mu.Lock()
	if s.closed {
		s.mu.Unlock()
		return
	}
	s.closed = true
	runs := s.runs
	s.mu.Unlock()
	for _, r := range runs {
		r.cancel()
	}
	ctx, cancel := context.WithTimeout(context.Background(), 10*time.Second)
	defer cancel()
	if s.acquire(ctx) == nil {
		defer s.release()
	}
	s.conn.ExecContext(ctx, "ROLLBACK")
	s.conn.Raw(func(any) error { return driver.ErrBadConn })
	s.conn.Close()
}

// sessions are the logins at once, by cookie value.
type sessions struct {
	mu  sync.Mutex
	max int
	m   map[string]*session
}

func newSessions(max int) *sessions { return &sessions{max: max, m: map[string]*session{}} }

var errTooManySessions = errors.New("too many sessions at once: log out elsewhere or try again later")

// open starts a session for user on its own connection of db. When the
// sessions are at their limit and evict is set (--auth trust, where any
// request without a cookie gets a session), the least recently used one
// with no diagnose running makes room.
func (ss *sessions) open(ctx context.Context, db *sql.DB, user string, evict bool) (*session, error) {
	ss.mu.Lock()
	full := len(ss.m) >= ss.max
	var oldest *session
	var oldestUsed time.Time
	if full && evict {
		for _, s := range ss.m {
			s.mu.Lock()
			idle := !s.busy()
			used := s.lastUsed
			s.mu.Unlock()
			if idle && (oldest == nil || used.Before(oldestUsed)) {
				oldest, oldestUsed = s, used
			}
		}
	}
	ss.mu.Unlock()
	if oldest != nil {
		ss.end(oldest)
		full = false
	}
	if full {
		return nil, errTooManySessions
	}
	conn, err := db.Conn(ctx)
	if err != nil {
		return nil, err
	}
	s := &session{id: randomToken(), csrf: randomToken(), user: user, conn: conn, use: make(chan struct{}, 1), lastUsed: time.Now()}
	ss.mu.Lock()
	defer ss.mu.Unlock()
	if len(ss.m) >= ss.max {
		conn.Raw(func(any) error { return driver.ErrBadConn })
		conn.Close()
		return nil, errTooManySessions
	}
	ss.m[s.id] = s
	return s, nil
}

// get finds the session a request's cookie names.
func (ss *sessions) get(r *http.Request) *session {
	c, err := r.Cookie(sessionCookie)
	if err != nil || c.Value == "" {
		return nil
	}
	ss.mu.Lock()
	s := ss.m[c.Value]
	ss.mu.Unlock()
	if s != nil {
		s.touch()
	}
	return s
}

func (ss *sessions) end(s *session) {
	ss.mu.Lock()
	delete(ss.m, s.id)
	ss.mu.Unlock()
	s.close()
}

func (ss *sessions) closeIdle(idle time.Duration) {
	ss.mu.Lock()
	var old []*session
	for id, s := range ss.m {
		s.mu.Lock()
		stale := time.Since(s.lastUsed) > idle && !s.busy()
		s.mu.Unlock()
		if stale {
			old = append(old, s)
			delete(ss.m, id)
		}
	}
	ss.mu.Unlock()
	for _, s := range old {
		s.close()
	}
}

func (ss *sessions) closeAll() {
	ss.mu.Lock()
	all := ss.m
	ss.m = map[string]*session{}
	ss.mu.Unlock()
	for _, s := range all {
		s.close()
	}
}

// busy reports whether a diagnose of the session is still running (the
// caller holds s.mu).
func (s *session) busy() bool {
	for _, r := range s.runs {
		if !r.finished() {
			return true
		}
	}
	return false
}

// randomToken is 32 random bytes, URL-safe: a session id or a CSRF token.
func randomToken() string {
	b := make([]byte, 32)
	rand.Read(b)
	return base64.RawURLEncoding.EncodeToString(b)
}

func sameToken(a, b string) bool {
	return a != "" && len(a) == len(b) && subtle.ConstantTimeCompare([]byte(a), []byte(b)) == 1
}

// setSessionCookie gives the browser its session: HttpOnly (no script
// reads it), SameSite=Strict (no other site's page sends it), Secure over
// TLS, for the whole site, ending with the browser.
func (e *Explorer) setSessionCookie(w http.ResponseWriter, value string, maxAge int) {
	http.SetCookie(w, &http.Cookie{Name: sessionCookie, Value: value, Path: "/", HttpOnly: true,
		SameSite: http.SameSiteStrictMode, Secure: e.cfg.TLS, MaxAge: maxAge})
}
