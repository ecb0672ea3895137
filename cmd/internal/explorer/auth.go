package explorer

import (
	"context"
	"fmt"
	"net"
	"net/http"
	"net/url"
	"strings"
	"sync"
	"time"
)

const loginCookie = "plumb_login"

// maxFormBytes bounds every POST body the explorer reads.
const maxFormBytes = 64 << 10

type sessionKey struct{}

func sessionOf(r *http.Request) *session {
	s, _ := r.Context().Value(sessionKey{}).(*session)
	return s
}

// authed wraps a page that needs a login: without a session the answer is
// the login page and nothing else (401); a POST must carry the session's
// CSRF token and come from this site (checkPost). With --auth trust a
// browser gets a session on its first request.
func (e *Explorer) authed(h http.HandlerFunc) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		s := e.sessions.get(r)
		if s == nil && e.cfg.Trust {
			var err error
			if s, err = e.sessions.open(r.Context(), e.cfg.DB, "trust", true); err != nil {
				e.fail(w, r, http.StatusServiceUnavailable, err)
				return
			}
			e.setSessionCookie(w, s.id, 0)
		}
		if s == nil {
			e.loginPage(w, r, http.StatusUnauthorized, "")
			return
		}
		if r.Method == http.MethodPost {
			if err := e.checkPost(w, r, s.csrf); err != nil {
				e.fail(w, r, http.StatusForbidden, err)
				return
			}
		}
		h(w, r.WithContext(context.WithValue(r.Context(), sessionKey{}, s)))
	}
}

// checkPost refuses a POST from another site: its Origin (or, without
// one, its Referer) must be this site, and its form must carry token.
func (e *Explorer) checkPost(w http.ResponseWriter, r *http.Request, token string) error {
	scheme := "http"
	if e.cfg.TLS {
		scheme = "https"
	}
	want := scheme + "://" + r.Host
	if o := r.Header.Get("Origin"); o != "" {
		if o != want {
			return fmt.Errorf("refused: the form was sent from %s, not from this page", o)
		}
	} else if ref, err := url.Parse(r.Header.Get("Referer")); err != nil || ref.Scheme+"://"+ref.Host != want {
		return fmt.Errorf("refused: the form did not say which page sent it")
	}
	r.Body = http.MaxBytesReader(w, r.Body, maxFormBytes)
	if err := r.ParseForm(); err != nil {
		return fmt.Errorf("refused: %w", err)
	}
	if !sameToken(r.PostForm.Get("csrf"), token) {
		return fmt.Errorf("refused: the form's token is missing or out of date; reload the page and try again")
	}
	return nil
}

// loginPage shows the login form with a fresh pre-login token (a cookie
// and the same value in the form), so a login cannot be forged from
// another site either.
//
// A browser that already holds a pre-login token keeps it: a second page
// load (or the browser's own request for an icon) must not invalidate the
// form it shows.
func (e *Explorer) loginPage(w http.ResponseWriter, r *http.Request, status int, message string) {
	token := randomToken()
	if c, err := r.Cookie(loginCookie); err == nil && len(c.Value) == len(token) {
		token = c.Value
	}
	http.SetCookie(w, &http.Cookie{Name: loginCookie, Value: token, Path: "/login", HttpOnly: true,
		SameSite: http.SameSiteStrictMode, Secure: e.cfg.TLS, MaxAge: 600})
	e.render(w, status, "login", pageData{Title: "Log in", CSRF: token, Message: message})
}

func (e *Explorer) handleLogin(w http.ResponseWriter, r *http.Request) {
	if e.cfg.Trust {
		http.Redirect(w, r, "/", http.StatusSeeOther)
		return
	}
	if r.Method != http.MethodPost {
		e.loginPage(w, r, http.StatusOK, "")
		return
	}
	c, err := r.Cookie(loginCookie)
	token := ""
	if err == nil {
		token = c.Value
	}
	if err := e.checkPost(w, r, token); err != nil {
		e.loginPage(w, r, http.StatusForbidden, err.Error())
		return
	}
	addr := clientAddress(r)
	if wait := e.limiter.blocked(addr); wait > 0 {
		e.loginPage(w, r, http.StatusTooManyRequests, fmt.Sprintf("too many failed logins from your address; try again in %d s", int(wait.Seconds())+1))
		return
	}
	user, password := r.PostForm.Get("user"), r.PostForm.Get("password")
	if user == "" || len(user) > 256 || len(password) > 1024 || !e.cfg.CheckPassword(user, password) {
		e.limiter.failed(addr)
		time.Sleep(e.cfg.FailedLoginDelay)
		e.cfg.Log.Warn("explorer login failed", "user", user, "remote", addr)
		// The words plumb serve's PostgreSQL login fails with.
		e.loginPage(w, r, http.StatusUnauthorized, "password authentication failed for user "+user)
		return
	}
	if old := e.sessions.get(r); old != nil {
		e.sessions.end(old)
	}
	s, err := e.sessions.open(r.Context(), e.cfg.DB, user, false)
	if err != nil {
		e.loginPage(w, r, http.StatusServiceUnavailable, err.Error())
		return
	}
	e.cfg.Log.Info("explorer login", "user", user, "remote", addr)
	http.SetCookie(w, &http.Cookie{Name: loginCookie, Path: "/login", MaxAge: -1})
	e.setSessionCookie(w, s.id, 0)
	http.Redirect(w, r, "/", http.StatusSeeOther)
}

func (e *Explorer) handleLogout(w http.ResponseWriter, r *http.Request) {
	e.sessions.end(sessionOf(r))
	e.setSessionCookie(w, "", -1)
	if e.cfg.Trust {
		http.Redirect(w, r, "/", http.StatusSeeOther)
		return
	}
	e.loginPage(w, r, http.StatusOK, "logged out")
}

// clientAddress is the request's remote IP (no port), the login limiter's key.
func clientAddress(r *http.Request) string {
	host, _, err := net.SplitHostPort(r.RemoteAddr)
	if err != nil {
		return r.RemoteAddr
	}
	return strings.TrimSpace(host)
}

// loginLimiter allows each address a number of failed logins per window;
// past that, logins from it are refused until the window has passed. It
// keeps at most maxTracked addresses (the oldest windows are dropped).
type loginLimiter struct {
	mu       sync.Mutex
	attempts int
	window   time.Duration
	m        map[string]*failures
}

type failures struct {
	since time.Time
	count int
}

const maxTracked = 10000

func newLoginLimiter(attempts int, window time.Duration) *loginLimiter {
	return &loginLimiter{attempts: attempts, window: window, m: map[string]*failures{}}
}

// blocked returns how long addr must wait (0: it may try).
func (l *loginLimiter) blocked(addr string) time.Duration {
	l.mu.Lock()
	defer l.mu.Unlock()
	f := l.m[addr]
	if f == nil {
		return 0
	}
	left := l.window - time.Since(f.since)
	if left <= 0 {
		delete(l.m, addr)
		return 0
	}
	if f.count >= l.attempts {
		return left
	}
	return 0
}

func (l *loginLimiter) failed(addr string) {
	l.mu.Lock()
	defer l.mu.Unlock()
	f := l.m[addr]
	if f == nil || time.Since(f.since) > l.window {
		if len(l.m) >= maxTracked {
			for k, v := range l.m {
				if time.Since(v.since) > l.window {
					delete(l.m, k)
				}
			}
		}
		f = &failures{since: time.Now()}
		l.m[addr] = f
	}
	f.count++
}
