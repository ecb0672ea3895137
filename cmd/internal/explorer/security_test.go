package explorer

import (
	"context"
	"io"
	"net/http"
	"net/url"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/plumb-sql/plumb/udf"
)

// dataWithShops makes a --data folder holding the demo shops, and beside
// it (outside --data) a file an attacker would like to read, with a
// symbolic link to it inside --data.
func dataWithShops(t *testing.T) (data, outside string) {
	t.Helper()
	root := t.TempDir()
	data = filepath.Join(root, "data")
	b, err := os.ReadFile(filepath.Join(demoFiles(t), "shops.parquet"))
	if err != nil {
		t.Fatal(err)
	}
	if err := os.MkdirAll(filepath.Join(data, "sub"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(data, "shops.parquet"), b, 0o644); err != nil {
		t.Fatal(err)
	}
	outside = filepath.Join(root, "secret.parquet")
	if err := os.WriteFile(outside, b, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(outside, filepath.Join(data, "link.parquet")); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(root, filepath.Join(data, "sub", "up")); err != nil {
		t.Fatal(err)
	}
	return data, outside
}

// Every route answers a browser without a session with the login page and
// nothing else.
func TestUnauthenticatedGetsOnlyTheLoginPage(t *testing.T) {
	data, _ := dataWithShops(t)
	ts := newTestServer(t, data, false, false, nil)
	ana := ts.browser(t)
	ana.login("ana", testUsers["ana"])
	ana.diagnoseShops()

	routes := []struct{ method, path string }{
		{"GET", "/"}, {"GET", "/?source=shops.parquet"}, {"GET", "/runs/1"}, {"GET", "/runs/1/groups"},
		{"GET", "/runs/1/groups?mean_cause=level_shift"}, {"GET", "/runs/1/groups.csv"}, {"GET", "/runs/1/groups.parquet"},
		{"GET", "/runs/1/groups/1"}, {"GET", "/runs/1/groups/1/history.csv"}, {"GET", "/runs/1/groups/1/forecast.csv"},
		{"GET", "/static/keys.js"}, {"GET", "/no/such/page"}, {"POST", "/runs"}, {"POST", "/logout"}, {"HEAD", "/"},
		{"PUT", "/runs"}, {"DELETE", "/runs/1"},
	}
	stranger := ts.browser(t)
	for _, r := range routes {
		var code int
		var body string
		if r.method == "POST" {
			code, body = stranger.post(r.path, url.Values{"source": {"shops.parquet"}, "csrf": {"x"}}, nil)
		} else {
			req, _ := http.NewRequest(r.method, ts.URL+r.path, nil)
			resp, err := stranger.client.Do(req)
			if err != nil {
				t.Fatal(err)
			}
			b, _ := io.ReadAll(resp.Body)
			resp.Body.Close()
			code, body = resp.StatusCode, string(b)
		}
		if r.method == "HEAD" {
			if code != http.StatusUnauthorized {
				t.Errorf("%s %s: status %d, want 401", r.method, r.path, code)
			}
			continue
		}
		if code != http.StatusUnauthorized || !strings.Contains(body, `<form class="pick" method="post" action="/login" id="login">`) {
			t.Errorf("%s %s: status %d, want 401 and the login form; got %.200s", r.method, r.path, code, body)
		}
		for _, leak := range []string{"shops", "Kiln Street", "units", "Log out", "keydown", "diagnose"} {
			if strings.Contains(body, leak) {
				t.Errorf("%s %s: the answer to a stranger contains %q", r.method, r.path, leak)
			}
		}
	}
	// A session cookie that is not one the server gave gets the same.
	forged := ts.browser(t)
	u, _ := url.Parse(ts.URL)
	forged.client.Jar.SetCookies(u, []*http.Cookie{{Name: sessionCookie, Value: "AAAA" + strings.Repeat("A", 39)}})
	if code, body := forged.get("/runs/1/groups"); code != http.StatusUnauthorized || strings.Contains(body, "shops") {
		t.Errorf("forged session cookie: status %d", code)
	}
}

// The session cookie is HttpOnly and SameSite=Strict, and Secure over TLS.
func TestSessionCookieFlags(t *testing.T) {
	for _, tls := range []bool{false, true} {
		ts := newTestServer(t, demoFiles(t), false, tls, nil)
		b := ts.browser(t)
		b.get("/login")
		req, _ := http.NewRequest(http.MethodPost, ts.URL+"/login", strings.NewReader(url.Values{"user": {"ana"},
			"password": {testUsers["ana"]}, "csrf": {b.csrf}}.Encode()))
		req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
		req.Header.Set("Origin", ts.URL)
		client := *b.client
		client.CheckRedirect = func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }
		resp, err := client.Do(req)
		if err != nil {
			t.Fatal(err)
		}
		resp.Body.Close()
		var session *http.Cookie
		for _, c := range resp.Cookies() {
			if c.Name == sessionCookie {
				session = c
			}
		}
		if resp.StatusCode != http.StatusSeeOther || session == nil {
			t.Fatalf("TLS %v: login answered %d without a session cookie", tls, resp.StatusCode)
		}
		if !session.HttpOnly || session.SameSite != http.SameSiteStrictMode || session.Secure != tls || session.Path != "/" {
			t.Errorf("TLS %v: session cookie %+v, want HttpOnly, SameSite=Strict, Secure=%v, Path=/", tls, session, tls)
		}
		if strings.Contains(resp.Header.Get("Location"), "password") || strings.Contains(resp.Header.Get("Location"), "s3cret") {
			t.Errorf("the login's redirect carries credentials: %s", resp.Header.Get("Location"))
		}
	}
}

// A POST without this session's token, with a forged one, or from another
// site is refused and does nothing.
func TestForgedOrMissingCSRFRefused(t *testing.T) {
	ts := newTestServer(t, demoFiles(t), false, false, nil)
	b := ts.browser(t)
	b.login("ana", testUsers["ana"])
	b.get("/?source=shops.parquet")
	good := b.csrf
	form := func(token string) url.Values {
		v := url.Values{"source": {"shops.parquet"}, "by": {"shop", "product"}, "at": {"day"}, "value": {"units"}}
		if token != "-" {
			v.Set("csrf", token)
		}
		return v
	}
	cases := []struct {
		name   string
		form   url.Values
		header map[string]string
	}{
		{"forged token", form("forged" + good[6:]), nil},
		{"empty token", form(""), nil},
		{"missing token", form("-"), nil},
		{"another login's token", form(randomToken()), nil},
		{"other site's Origin", form(good), map[string]string{"Origin": "http://evil.example"}},
		{"no Origin nor Referer", form(good), map[string]string{"Origin": ""}},
		{"other site's Referer", form(good), map[string]string{"Origin": "", "Referer": "http://evil.example/x"}},
	}
	for _, c := range cases {
		code, body := b.postRaw("/runs", c.form, c.header)
		if code != http.StatusForbidden || !strings.Contains(body, "refused") {
			t.Errorf("%s: status %d, want 403 refused; %.200s", c.name, code, body)
		}
	}
	if runs := ts.explorer.sessions.get(sessionRequest(t, b)).allRuns(); len(runs) != 0 {
		t.Errorf("a refused POST started %d diagnoses", len(runs))
	}
	// Logout with a forged token does not log out.
	if code, _ := b.post("/logout", url.Values{"csrf": {"forged"}}, nil); code != http.StatusForbidden {
		t.Errorf("logout with a forged token: %d, want 403", code)
	}
	if code, _ := b.get("/"); code != http.StatusOK {
		t.Errorf("after a forged logout the session should live on: %d", code)
	}
	// The login form has its own token too.
	c := ts.browser(t)
	c.get("/login")
	if code, _ := c.post("/login", url.Values{"user": {"ana"}, "password": {testUsers["ana"]}, "csrf": {"forged"}}, nil); code != http.StatusForbidden {
		t.Errorf("login with a forged token: %d, want 403", code)
	}
	// The real token works.
	if code, body := b.post("/runs", form(good), nil); code != http.StatusOK || strings.Contains(body, "refused") {
		t.Errorf("the page's own token: %d %.200s", code, body)
	}
}

// sessionRequest is a request carrying b's session cookie.
func sessionRequest(t *testing.T, b *browser) *http.Request {
	req, _ := http.NewRequest(http.MethodGet, b.ts.URL, nil)
	u, _ := url.Parse(b.ts.URL)
	for _, c := range b.client.Jar.Cookies(u) {
		req.AddCookie(c)
	}
	return req
}

// Every path the page accepts goes through the --data sandbox: the source
// to show and to diagnose, and the saved diagnosis file.
func TestSandboxOnEveryPath(t *testing.T) {
	data, outside := dataWithShops(t)
	ts := newTestServer(t, data, false, false, nil)
	b := ts.browser(t)
	b.login("ana", testUsers["ana"])
	attacks := []string{
		"../secret.parquet",
		"sub/../../secret.parquet",
		outside,
		"/etc/passwd",
		"link.parquet",          // a symbolic link out of --data
		"sub/up/secret.parquet", // through a linked folder
		"..%2fsecret.parquet",
		"%2e%2e/secret.parquet",
		"*.parquet",
		"shops.parquet\x00.csv",
		"file:///etc/passwd",
		"~/secret.parquet",
		"(SELECT * FROM '" + outside + "')",
		"main.duckdb_settings()",
	}
	for _, a := range attacks {
		code, body := b.get("/?source=" + url.QueryEscape(a))
		if code != http.StatusBadRequest || !strings.Contains(body, "not a file under --data or a table of the database") {
			t.Errorf("show %q: status %d, want 400 and the sandbox's refusal; %.300s", a, code, body)
		}
		b.get("/")
		code, body = b.post("/runs", url.Values{"source": {a}, "by": {"shop", "product"}, "at": {"day"}, "value": {"units"}}, nil)
		if code != http.StatusBadRequest || !strings.Contains(body, "not a file under --data") {
			t.Errorf("diagnose %q: status %d; %.300s", a, code, body)
		}
		b.get("/")
		code, body = b.post("/runs", url.Values{"source": {"shops.parquet"}, "by": {"shop", "product"}, "at": {"day"},
			"value": {"units"}, "saved": {a}}, nil)
		if code != http.StatusBadRequest || !strings.Contains(body, "not a file under --data") {
			t.Errorf("saved diagnosis %q: status %d; %.300s", a, code, body)
		}
	}
	// Raw, undecoded escapes in the query string reach the check decoded once.
	code, _ := b.get("/?source=%2e%2e%2fsecret.parquet")
	if code != http.StatusBadRequest {
		t.Errorf("URL-encoded ../: status %d", code)
	}
	// The listing offers neither the link nor anything outside.
	_, home := b.get("/")
	if strings.Contains(home, "link.parquet") || strings.Contains(home, "secret") || !strings.Contains(home, "shops.parquet") {
		t.Errorf("the source list should offer shops.parquet only: %s", home)
	}
}

// Column and sort parameters must be in their allow-lists; so must every
// parameter name and filter value.
func TestParametersOutsideAllowListRefused(t *testing.T) {
	data, _ := dataWithShops(t)
	ts := newTestServer(t, data, false, false, nil)
	b := ts.browser(t)
	b.login("ana", testUsers["ana"])
	b.diagnoseShops()
	for _, q := range []string{
		"sort=status", "sort=reason", "sort=shop", "sort=no_such_column", `sort=score%22%20DESC%3B%20DROP%20TABLE%20x%3B--`,
		"sort=adf_p_value&dir=sideways", "mean_cause=volcano", "mean_cause=level_shift'%20OR%20'1'='1",
		"status=ok'--", "demand_class=imaginary", "verdict=maybe", "cured=perhaps", "evil=1", "page=0", "size=100000",
		"page=-1", "sort=rank&sort=score", "q=" + strings.Repeat("x", 201),
	} {
		for _, path := range []string{"/runs/1/groups?", "/runs/1/groups.csv?", "/runs/1/groups.parquet?", "/runs/1/groups/1?"} {
			if code, _ := b.get(path + q); code != http.StatusBadRequest {
				t.Errorf("%s%s: status %d, want 400", path, q, code)
			}
		}
	}
	// Diagnose's columns must be the source's own.
	b.get("/?source=shops.parquet")
	for _, form := range []url.Values{
		{"by": {"shop", "no_such"}, "at": {"day"}, "value": {"units"}},
		{"by": {"shop"}, "at": {`day" FROM x; --`}, "value": {"units"}},
		{"by": {"shop"}, "at": {"day"}, "value": {"units::VARCHAR"}},
	} {
		form.Set("source", "shops.parquet")
		if code, body := b.post("/runs", form, nil); code != http.StatusBadRequest || !strings.Contains(body, "has no column") {
			t.Errorf("diagnose with %v: status %d; %.200s", form, code, body)
		}
	}
	// Allowed ones work.
	for _, q := range []string{"sort=score", "sort=kpss_q_value&dir=desc", "mean_cause=level_shift", "status=ok", "q=kiln"} {
		if code, body := b.get("/runs/1/groups?" + q); code != http.StatusOK {
			t.Errorf("%s: status %d %.200s", q, code, body)
		}
	}
}

// One login's diagnosis (its TEMP table) is invisible to another's: the
// page does not show it and the other's DuckDB connection cannot read it.
func TestUserCannotSeeAnothersDiagnosis(t *testing.T) {
	data, _ := dataWithShops(t)
	ts := newTestServer(t, data, false, false, nil)
	ana, bob := ts.browser(t), ts.browser(t)
	ana.login("ana", testUsers["ana"])
	ana.diagnoseShops()
	bob.login("bob", testUsers["bob"])
	for _, path := range []string{"/runs/1", "/runs/1/groups", "/runs/1/groups/1", "/runs/1/groups.csv", "/runs/1/groups/1/history.csv"} {
		code, body := bob.get(path)
		if code != http.StatusNotFound || strings.Contains(body, "Kiln Street") {
			t.Errorf("bob %s: status %d, want 404; %.200s", path, code, body)
		}
	}
	if _, home := bob.get("/"); strings.Contains(home, "/runs/1") {
		t.Errorf("bob's page lists ana's diagnosis")
	}
	bobSession := ts.explorer.sessions.get(sessionRequest(t, bob))
	anaSession := ts.explorer.sessions.get(sessionRequest(t, ana))
	table := anaSession.findRun(1).table
	ctx := context.Background()
	var n int
	if err := anaSession.conn.QueryRowContext(ctx, "SELECT count(*) FROM "+table).Scan(&n); err != nil || n != 96 {
		t.Fatalf("ana's own table: %d rows, %v", n, err)
	}
	if err := bobSession.conn.QueryRowContext(ctx, "SELECT count(*) FROM "+table).Scan(&n); err == nil {
		t.Errorf("bob's connection reads ana's %s", table)
	}
	if err := bobSession.conn.QueryRowContext(ctx, "SELECT count(*) FROM duckdb_tables() WHERE temporary").Scan(&n); err != nil || n != 0 {
		t.Errorf("bob's connection sees %d TEMP tables (%v)", n, err)
	}
	// After ana logs out her table is gone with her connection.
	if code, _ := ana.post("/logout", url.Values{}, nil); code != http.StatusOK {
		t.Errorf("logout: %d", code)
	}
	if code, _ := ana.get("/runs/1/groups"); code != http.StatusUnauthorized {
		t.Errorf("after logout: %d, want 401", code)
	}
}

// Failed logins are limited per address: after the allowance even the
// right password is refused until the window passes.
func TestLoginAttemptsLimited(t *testing.T) {
	ts := newTestServer(t, demoFiles(t), false, false, func(c *Config) { c.LoginAttempts = 3 })
	b := ts.browser(t)
	for i := 0; i < 3; i++ {
		b.get("/login")
		code, body := b.post("/login", url.Values{"user": {"ana"}, "password": {"wrong"}}, nil)
		if code != http.StatusUnauthorized || !strings.Contains(body, "password authentication failed for user ana") {
			t.Fatalf("wrong password %d: %d %.200s", i, code, body)
		}
	}
	b.get("/login")
	code, body := b.post("/login", url.Values{"user": {"ana"}, "password": {testUsers["ana"]}}, nil)
	if code != http.StatusTooManyRequests || !strings.Contains(body, "too many failed logins") {
		t.Errorf("after 3 failures: %d, want 429; %.200s", code, body)
	}
	// An unknown user fails with the same words as a wrong password.
	ts2 := newTestServer(t, demoFiles(t), false, false, nil)
	c := ts2.browser(t)
	c.get("/login")
	if _, body := c.post("/login", url.Values{"user": {"mallory"}, "password": {"x"}}, nil); !strings.Contains(body, "password authentication failed for user mallory") {
		t.Errorf("unknown user: %.200s", body)
	}
}

var errorParagraph = regexp.MustCompile(`<p class="error"[^<]*`)

// With --auth trust (loopback only) a browser gets a session without a
// login, and a failing diagnose shows the words plumb diagnose uses.
func TestTrustNeedsNoLoginAndErrorsUseDiagnoseWords(t *testing.T) {
	data, _ := dataWithShops(t)
	ts := newTestServer(t, data, true, false, nil)
	b := ts.browser(t)
	code, body := b.get("/?source=shops.parquet")
	if code != http.StatusOK || !strings.Contains(body, `id="diagnose"`) {
		t.Fatalf("trust: %d %.300s", code, body)
	}
	code, body = b.post("/runs", url.Values{"source": {"shops.parquet"}, "by": {"shop"}, "at": {"day"}, "value": {"product"}}, nil)
	for i := 0; i < 100 && strings.Contains(body, `id="progress"`); i++ {
		time.Sleep(100 * time.Millisecond)
		code, body = b.get("/runs/1")
	}
	// diagnosis.Spec.Check's words, as plumb diagnose prints them.
	if want := `the value column &#34;product&#34; of shops.parquet is VARCHAR, not a number`; code != http.StatusOK || !strings.Contains(body, want) {
		t.Errorf("a text value column: %d, want %q in %s", code, want, errorParagraph.FindString(body))
	}
	if code, _ := b.get("/runs/1/groups"); code != http.StatusOK {
		t.Errorf("the failed run's list should lead back to its error page: %d", code)
	}
}

// Sessions are limited; with --auth trust, where every browser without a
// cookie gets one, the least recently used idle session makes room, so a
// client that drops its cookies cannot lock the page; with logins the
// limit refuses.
func TestSessionLimit(t *testing.T) {
	for _, trust := range []bool{true, false} {
		ts := newTestServer(t, demoFiles(t), trust, false, func(c *Config) { c.MaxSessions = 2 })
		var bs []*browser
		for i := 0; i < 3; i++ {
			b := ts.browser(t)
			if trust {
				if code, _ := b.get("/"); code != http.StatusOK {
					t.Errorf("trust, browser %d: %d", i, code)
				}
			} else if i < 2 {
				b.login([]string{"ana", "bob"}[i], testUsers[[]string{"ana", "bob"}[i]])
			} else {
				b.get("/login")
				code, body := b.post("/login", url.Values{"user": {"ana"}, "password": {testUsers["ana"]}}, nil)
				if code != http.StatusServiceUnavailable || !strings.Contains(body, "too many sessions") {
					t.Errorf("a third login over the limit: %d", code)
				}
			}
			bs = append(bs, b)
			time.Sleep(5 * time.Millisecond)
		}
		if trust {
			if ts.explorer.sessions.get(sessionRequest(t, bs[0])) != nil {
				t.Error("trust: the least recently used session should have made room")
			}
			if ts.explorer.sessions.get(sessionRequest(t, bs[2])) == nil {
				t.Error("trust: the newest browser has no session")
			}
		}
	}
}

// While diagnose runs, the run's page shows groups done of total and
// refreshes itself, without JavaScript.
func TestProgressPage(t *testing.T) {
	ts := newTestServer(t, demoFiles(t), false, false, nil)
	b := ts.browser(t)
	b.login("ana", testUsers["ana"])
	s := ts.explorer.sessions.get(sessionRequest(t, b))
	r := &run{ID: 7, Src: source{Name: "shops.parquet"}, started: time.Now(), cancel: func() {}, done: make(chan struct{}),
		total: 1000, startDone: udf.GroupsDone()}
	s.mu.Lock()
	s.runs = append(s.runs, r)
	s.mu.Unlock()
	code, body := b.get("/runs/7")
	if code != http.StatusOK || !strings.Contains(body, `<meta http-equiv="refresh" content="1">`) ||
		!regexp.MustCompile(`\d+ of 1000 groups done`).MatchString(body) {
		t.Errorf("progress page: %d %.600s", code, body)
	}
	if code, body := b.get("/runs/7/groups"); code != http.StatusOK || !strings.Contains(body, "of 1000 groups done") {
		t.Errorf("the list of a running diagnose leads to its progress: %d", code)
	}
	close(r.done)
}
