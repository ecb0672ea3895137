package explorer

import (
	"context"
	"io"
	"log/slog"
	"net/http"
	"net/http/cookiejar"
	"net/http/httptest"
	"net/url"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/plumb-sql/plumb/cmd/internal/demodata"
	"github.com/plumb-sql/plumb/cmd/internal/pgserver"
)

// testUsers are the logins of every test server.
var testUsers = map[string]string{"ana": "s3cret-ana", "bob": "s3cret-bob"}

var (
	demoOnce sync.Once
	demoDir  string
	demoErr  error
)

func TestMain(m *testing.M) {
	code := m.Run()
	if demoDir != "" {
		os.RemoveAll(demoDir)
	}
	os.Exit(code)
}

// demoFiles writes the demo scenario (seed 1, default sizes) once per test
// binary into a folder of its own.
func demoFiles(t testing.TB) string {
	demoOnce.Do(func() {
		demoDir, demoErr = os.MkdirTemp("", "plumb-explorer-demo-")
		if demoErr == nil {
			_, demoErr = demodata.WriteFiles(context.Background(), demoDir, 1, demodata.DefaultSizes)
		}
	})
	if demoErr != nil {
		t.Fatal(demoErr)
	}
	return demoDir
}

type testServer struct {
	*httptest.Server
	explorer *Explorer
	dataDir  string
}

// newTestServer starts plumb serve's database (sandboxed, the test users)
// with the explorer on an httptest server; dataDir is --data. tweak may
// change the explorer's configuration.
func newTestServer(t testing.TB, dataDir string, trust, tls bool, tweak func(*Config)) *testServer {
	t.Helper()
	cfg := pgserver.Config{Addr: "127.0.0.1:0", DataDir: dataDir, Users: testUsers, Auth: "scram"}
	if trust {
		cfg.Auth, cfg.Users = "trust", nil
	}
	log := slog.New(slog.DiscardHandler)
	srv, err := pgserver.New(context.Background(), cfg, log)
	if err != nil {
		t.Fatal(err)
	}
	ec := Config{DB: srv.DB(), Files: srv.Files(), Trust: srv.Trust(), CheckPassword: srv.CheckPassword, TLS: tls,
		Log: log, FailedLoginDelay: time.Millisecond}
	if tweak != nil {
		tweak(&ec)
	}
	e, err := New(ec)
	if err != nil {
		t.Fatal(err)
	}
	ts := &testServer{explorer: e, dataDir: dataDir}
	if tls {
		ts.Server = httptest.NewTLSServer(e)
	} else {
		ts.Server = httptest.NewServer(e)
	}
	t.Cleanup(func() {
		ts.Close()
		e.Close()
		srv.Shutdown()
	})
	return ts
}

// browser is an HTTP client with its own cookies, as one browser has.
type browser struct {
	t      testing.TB
	ts     *testServer
	client *http.Client
	csrf   string
}

func (ts *testServer) browser(t testing.TB) *browser {
	jar, _ := cookiejar.New(nil)
	c := ts.Client()
	c.Jar = jar
	c.CheckRedirect = nil
	return &browser{t: t, ts: ts, client: &http.Client{Transport: c.Transport, Jar: jar}}
}

var csrfField = regexp.MustCompile(`name="csrf" value="([^"]*)"`)

// get fetches a page and remembers its CSRF token.
func (b *browser) get(path string) (int, string) {
	b.t.Helper()
	resp, err := b.client.Get(b.ts.URL + path)
	if err != nil {
		b.t.Fatal(err)
	}
	defer resp.Body.Close()
	body, _ := io.ReadAll(resp.Body)
	if m := csrfField.FindSubmatch(body); m != nil {
		b.csrf = string(m[1])
	}
	return resp.StatusCode, string(body)
}

// post sends a form as the page would (with its Origin), with the last
// CSRF token unless form sets one.
func (b *browser) post(path string, form url.Values, header map[string]string) (int, string) {
	b.t.Helper()
	if _, ok := form["csrf"]; !ok {
		form.Set("csrf", b.csrf)
	}
	return b.postRaw(path, form, header)
}

// postRaw sends form exactly as given.
func (b *browser) postRaw(path string, form url.Values, header map[string]string) (int, string) {
	b.t.Helper()
	req, _ := http.NewRequest(http.MethodPost, b.ts.URL+path, strings.NewReader(form.Encode()))
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Origin", b.ts.URL)
	for k, v := range header {
		if v == "" {
			req.Header.Del(k)
		} else {
			req.Header.Set(k, v)
		}
	}
	resp, err := b.client.Do(req)
	if err != nil {
		b.t.Fatal(err)
	}
	defer resp.Body.Close()
	body, _ := io.ReadAll(resp.Body)
	if m := csrfField.FindSubmatch(body); m != nil {
		b.csrf = string(m[1])
	}
	return resp.StatusCode, string(body)
}

func (b *browser) login(user, password string) {
	b.t.Helper()
	b.get("/login")
	code, body := b.post("/login", url.Values{"user": {user}, "password": {password}}, nil)
	if code != http.StatusOK || !strings.Contains(body, "Pick a source") {
		b.t.Fatalf("login as %s: %d %s", user, code, firstLine(body))
	}
}

// diagnoseShops runs diagnose on the demo shops and waits for the list.
func (b *browser) diagnoseShops() string {
	b.t.Helper()
	b.get("/?source=shops.parquet")
	code, body := b.post("/runs", url.Values{"source": {"shops.parquet"}, "by": {"shop", "product"}, "at": {"day"},
		"value": {"units"}, "period": {"7"}}, nil)
	for i := 0; i < 600 && code == http.StatusOK && strings.Contains(body, `id="progress"`); i++ {
		time.Sleep(100 * time.Millisecond)
		code, body = b.get("/runs/1")
	}
	if code != http.StatusOK || !strings.Contains(body, `id="counts"`) {
		b.t.Fatalf("diagnose the shops: %d %s", code, body)
	}
	return body
}

func writeFile(t testing.TB, path, text string) {
	t.Helper()
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}
