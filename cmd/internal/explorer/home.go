package explorer

import (
	"context"
	"fmt"
	"net/http"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/plumb-sql/plumb/cmd/internal/diagnosis"
)

type homeData struct {
	Runs          []runLine
	Files, Tables []string
	Source        string
	Columns       []columnChoice
	Period        string
}

type runLine struct {
	ID                              int
	Source, By, Groups, State, Took string
}

type columnChoice struct {
	Name, Type    string
	By, At, Value bool
}

// handleHome lists the sources and the session's diagnoses; with ?source=
// it offers that source's columns for diagnose.
func (e *Explorer) handleHome(w http.ResponseWriter, r *http.Request) {
	s := sessionOf(r)
	for name := range r.URL.Query() {
		if name != "source" {
			e.fail(w, r, http.StatusBadRequest, fmt.Errorf("unknown parameter %q", name))
			return
		}
	}
	ctx, cancel, ok := e.useSession(w, r, s)
	if !ok {
		return
	}
	defer cancel()
	defer s.release()
	var d homeData
	var err error
	files, err := listFiles(e.cfg.Files.Data())
	if err != nil {
		e.fail(w, r, http.StatusInternalServerError, err)
		return
	}
	for _, f := range files { // what the file policy would refuse is not offered
		if _, err := e.cfg.Files.Resolve(f); err == nil {
			d.Files = append(d.Files, f)
		}
	}
	if d.Tables, err = listTables(ctx, s.conn); err != nil {
		e.fail(w, r, http.StatusInternalServerError, err)
		return
	}
	for _, run := range s.allRuns() {
		d.Runs = append(d.Runs, describeRun(run))
	}
	if name := r.URL.Query().Get("source"); name != "" {
		src, err := e.resolveSource(ctx, s.conn, name)
		if err != nil {
			e.fail(w, r, http.StatusBadRequest, err)
			return
		}
		cols, err := sourceColumns(ctx, s.conn, src)
		if err != nil {
			e.fail(w, r, http.StatusBadRequest, err)
			return
		}
		d.Source, d.Columns = src.Name, guessColumns(cols)
	}
	e.page(w, r, "home", "Sources", d)
}

func describeRun(r *run) runLine {
	l := runLine{ID: r.ID, Source: r.Src.Name, By: strings.Join(r.Spec.By, ", ")}
	info, err := r.result()
	switch {
	case err != nil:
		l.State = "failed: " + err.Error()
	case info != nil:
		l.State, l.Groups = "done", strconv.Itoa(info.Counts.Groups)
		r.mu.Lock()
		l.Took = r.took.Round(time.Millisecond).String()
		r.mu.Unlock()
	default:
		done, total := r.progress()
		l.State = fmt.Sprintf("running: %d of %d groups", done, total)
	}
	return l
}

// guessColumns preselects the likely columns: the first date or time
// column as at, the last numeric one as the value, text columns as groups.
func guessColumns(cols []column) []columnChoice {
	out := make([]columnChoice, len(cols))
	at, value := -1, -1
	for i, c := range cols {
		out[i] = columnChoice{Name: c.Name, Type: c.Type}
		t := strings.ToUpper(c.Type)
		if at < 0 && (strings.HasPrefix(t, "DATE") || strings.HasPrefix(t, "TIMESTAMP")) {
			at = i
		}
		if isNumeric(t) {
			value = i
		}
	}
	for i, c := range cols {
		t := strings.ToUpper(c.Type)
		out[i].By = i != at && i != value && (t == "VARCHAR" || strings.HasPrefix(t, "ENUM"))
	}
	if at >= 0 {
		out[at].At = true
	}
	if value >= 0 {
		out[value].Value = true
	}
	return out
}

func isNumeric(t string) bool {
	return slices.Contains([]string{"TINYINT", "SMALLINT", "INTEGER", "BIGINT", "HUGEINT", "UTINYINT", "USMALLINT",
		"UINTEGER", "UBIGINT", "FLOAT", "DOUBLE"}, t) || strings.HasPrefix(t, "DECIMAL")
}

// handleStartRun checks the form (the source through resolveSource, the
// columns against the source's own) and starts diagnose.
func (e *Explorer) handleStartRun(w http.ResponseWriter, r *http.Request) {
	s := sessionOf(r)
	f := r.PostForm
	for name := range f {
		if !slices.Contains([]string{"csrf", "source", "by", "at", "value", "period", "saved"}, name) {
			e.fail(w, r, http.StatusBadRequest, fmt.Errorf("unknown parameter %q", name))
			return
		}
	}
	ctx, cancel, ok := e.useSession(w, r, s)
	if !ok {
		return
	}
	defer cancel()
	src, spec, saved, err := e.checkRunForm(ctx, s, f)
	s.release()
	if err != nil {
		e.fail(w, r, http.StatusBadRequest, err)
		return
	}
	run := e.startRun(s, src, spec, saved)
	http.Redirect(w, r, "/runs/"+strconv.Itoa(run.ID), http.StatusSeeOther)
}

func (e *Explorer) checkRunForm(ctx context.Context, s *session, f map[string][]string) (source, diagnosis.Spec, source, error) {
	get := func(k string) string {
		if v := f[k]; len(v) > 0 {
			return v[0]
		}
		return ""
	}
	src, err := e.resolveSource(ctx, s.conn, get("source"))
	if err != nil {
		return source{}, diagnosis.Spec{}, source{}, err
	}
	cols, err := sourceColumns(ctx, s.conn, src)
	if err != nil {
		return source{}, diagnosis.Spec{}, source{}, err
	}
	names := make([]string, len(cols))
	for i, c := range cols {
		names[i] = c.Name
	}
	spec := diagnosis.Spec{Source: src.SQL, By: f["by"], At: get("at"), Value: get("value")}
	if len(spec.By) == 0 || spec.At == "" || spec.Value == "" {
		return src, spec, source{}, fmt.Errorf("name the group columns (by), the time column (at) and the value column")
	}
	for _, c := range append(append([]string{}, spec.By...), spec.At, spec.Value) {
		if !slices.Contains(names, c) {
			return src, spec, source{}, fmt.Errorf("%s has no column %q; its columns are: %s", src.Name, c, strings.Join(names, ", "))
		}
	}
	if p := strings.TrimSpace(get("period")); p != "" {
		n, err := strconv.Atoi(p)
		if err != nil || n < 1 || n > 100000 {
			return src, spec, source{}, fmt.Errorf("the period must be a whole number from 1 to 100000, or blank to detect it; not %q", p)
		}
		spec.Period = n
	}
	var saved source
	if name := get("saved"); name != "" {
		if saved, err = e.resolveSource(ctx, s.conn, name); err != nil {
			return src, spec, source{}, err
		}
		if !saved.File {
			return src, spec, source{}, fmt.Errorf("a saved diagnosis is a file under --data")
		}
	}
	return src, spec, saved, nil
}

type progressData struct {
	Source               string
	Done, Total, Seconds int64
}

// handleRun shows a run's progress (the page refreshes itself), its error
// in diagnose's own words, or sends the browser on to the list.
func (e *Explorer) handleRun(w http.ResponseWriter, r *http.Request, s *session, run *run, info *runInfo) {
	_, err := run.result()
	switch {
	case err != nil:
		e.fail(w, r, http.StatusOK, err)
	case run.finished():
		http.Redirect(w, r, fmt.Sprintf("/runs/%d/groups", run.ID), http.StatusSeeOther)
	default:
		done, total := run.progress()
		e.page(w, r, "progress", "Diagnosing", progressData{Source: run.Src.Name, Done: done, Total: total,
			Seconds: int64(time.Since(run.started).Seconds())})
	}
}
