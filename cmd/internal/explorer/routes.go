package explorer

import (
	"bytes"
	"embed"
	"html/template"
	"net/http"
	"strconv"
	"strings"
)

//go:embed web/*.html web/keys.js
var web embed.FS

var pages = template.Must(template.New("").Funcs(template.FuncMap{"join": strings.Join}).ParseFS(web, "web/*.html"))

var keysJS, _ = web.ReadFile("web/keys.js")

// pageData is what every page template gets; Data is the page's own.
type pageData struct {
	Title, CSRF, Message, Error, User string
	Trust                             bool
	Data                              any
}

// routes: every page but the login needs a session (authed); nothing is
// served from anywhere else, and the one script comes from this server.
func (e *Explorer) routes() {
	m := http.NewServeMux()
	m.HandleFunc("/login", e.handleLogin)
	m.HandleFunc("POST /logout", e.authed(e.handleLogout))
	m.HandleFunc("GET /static/keys.js", e.authed(func(w http.ResponseWriter, r *http.Request) {
		w.Header().Set("Content-Type", "text/javascript; charset=utf-8")
		w.Write(keysJS)
	}))
	m.HandleFunc("GET /{$}", e.authed(e.handleHome))
	m.HandleFunc("POST /runs", e.authed(e.handleStartRun))
	m.HandleFunc("GET /runs/{run}", e.authed(e.withRun(e.handleRun, false)))
	m.HandleFunc("GET /runs/{run}/groups", e.authed(e.withRun(e.handleList, true)))
	m.HandleFunc("GET /runs/{run}/groups.csv", e.authed(e.withRun(e.handleListDownload("csv"), true)))
	m.HandleFunc("GET /runs/{run}/groups.parquet", e.authed(e.withRun(e.handleListDownload("parquet"), true)))
	m.HandleFunc("GET /runs/{run}/groups/{group}", e.authed(e.withRun(e.handleGroup, true)))
	m.HandleFunc("GET /runs/{run}/groups/{group}/{part}", e.authed(e.withRun(e.handleGroupDownload, true)))
	m.HandleFunc("/", e.authed(func(w http.ResponseWriter, r *http.Request) {
		e.fail(w, r, http.StatusNotFound, errorf("no such page: %s", r.URL.Path))
	}))
	e.mux = m
}

// render writes a page with the headers every page carries: no caching,
// no framing, no sniffing, and a content policy that allows nothing from
// elsewhere (inline styles only for the pictures' SVG).
func (e *Explorer) render(w http.ResponseWriter, status int, name string, d pageData) {
	var b bytes.Buffer
	if err := pages.ExecuteTemplate(&b, name, d); err != nil {
		e.cfg.Log.Error("explorer template", "page", name, "error", err)
		http.Error(w, "internal error", http.StatusInternalServerError)
		return
	}
	secureHeaders(w)
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	w.WriteHeader(status)
	w.Write(b.Bytes())
}

func secureHeaders(w http.ResponseWriter) {
	h := w.Header()
	h.Set("Content-Security-Policy", "default-src 'none'; script-src 'self'; style-src 'unsafe-inline'; img-src 'self' data:; form-action 'self'; frame-ancestors 'none'; base-uri 'none'")
	h.Set("X-Content-Type-Options", "nosniff")
	h.Set("X-Frame-Options", "DENY")
	h.Set("Referrer-Policy", "same-origin")
	h.Set("Cache-Control", "no-store")
}

// page renders a logged-in page.
func (e *Explorer) page(w http.ResponseWriter, r *http.Request, name, title string, data any) {
	s := sessionOf(r)
	e.render(w, http.StatusOK, name, pageData{Title: title, CSRF: s.csrf, User: s.user, Trust: e.cfg.Trust, Data: data})
}

// fail shows an error on a page, in the words the SQL and the CLI use.
func (e *Explorer) fail(w http.ResponseWriter, r *http.Request, status int, err error) {
	d := pageData{Title: "Error", Error: err.Error(), Trust: e.cfg.Trust}
	if s := sessionOf(r); s != nil {
		d.CSRF, d.User = s.csrf, s.user
	}
	e.render(w, status, "error", d)
}

type runHandler func(w http.ResponseWriter, r *http.Request, s *session, run *run, info *runInfo)

// withRun finds the session's run named in the path; finished requires
// it to have finished without error (else the run's own page, which shows
// progress or the error).
func (e *Explorer) withRun(h runHandler, finished bool) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		s := sessionOf(r)
		id, err := strconv.Atoi(r.PathValue("run"))
		var run *run
		if err == nil {
			run = s.findRun(id)
		}
		if run == nil {
			e.fail(w, r, http.StatusNotFound, errorf("no diagnosis %q in this session", r.PathValue("run")))
			return
		}
		info, rerr := run.result()
		if finished && (info == nil || rerr != nil) {
			http.Redirect(w, r, "/runs/"+strconv.Itoa(run.ID), http.StatusSeeOther)
			return
		}
		h(w, r, s, run, info)
	}
}
