package explorer

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"regexp"
	"slices"
	"strings"
	"sync"
	"time"

	"github.com/plumb-sql/plumb/cmd/internal/diagnosis"
	"github.com/plumb-sql/plumb/udf"
)

// A run is one diagnosis a session keeps: diagnose's rows in a TEMP table
// of the session's own connection, numbered in rank order (plumb_id), so
// that the list, the group pages and the downloads read it without
// diagnosing again.
type run struct {
	ID    int
	Spec  diagnosis.Spec // Source is the source's SQL (a path under --data or a quoted table name)
	Src   source
	Saved string // the saved diagnosis file it was read from ("": diagnosed here)
	table string // the TEMP table

	started time.Time
	cancel  context.CancelFunc
	done    chan struct{}

	mu        sync.Mutex
	total     int64 // groups to diagnose (0 until counted)
	startDone int64 // udf.GroupsDone() when diagnose began
	err       error
	took      time.Duration
	info      *runInfo // filled when finished without error
}

// runInfo is what a finished run knows about its table: its columns (the
// allow-list of sort keys), the types of the group columns in the source
// (to select a group's rows), and the counts shown at the top.
type runInfo struct {
	Columns  []string
	KeyTypes []string
	Counts   counts
}

func (r *run) finished() bool {
	select {
	case <-r.done:
		return true
	default:
		return false
	}
}

// progress is groups done of total while diagnose runs. The counter is the
// process's (udf.GroupsDone), so with two diagnoses at once each sees the
// other's groups too; it is clipped to the run's total.
func (r *run) progress() (done, total int64) {
	r.mu.Lock()
	defer r.mu.Unlock()
	if r.total == 0 {
		return 0, 0
	}
	done = min(max(udf.GroupsDone()-r.startDone, 0), r.total)
	return done, r.total
}

func (r *run) result() (*runInfo, error) {
	r.mu.Lock()
	defer r.mu.Unlock()
	return r.info, r.err
}

// keyList is the run's group columns, quoted, comma-separated.
func (r *run) keyList(prefix string) string {
	parts := make([]string, len(r.Spec.By))
	for i, b := range r.Spec.By {
		parts[i] = prefix + udf.QuoteIdent(b)
	}
	return strings.Join(parts, ", ")
}

// requiredColumns are the diagnosis columns the pages read; a saved
// diagnosis file must have them all.
var requiredColumns = []string{"n", "status", "reason", "stationary", "violations", "mean_cause", "spread_cause",
	"seasonal_kind", "demand_class", "outliers", "cured", "score", "rank", "period",
	"adf_statistic", "adf_p_value", "kpss_statistic", "kpss_p_value", "mean_p_value", "spread_p_value", "ljung_box_p_value"}

// startRun begins diagnosing (or reading a saved diagnosis) in the
// background on the session's connection.
func (e *Explorer) startRun(s *session, src source, spec diagnosis.Spec, saved source) *run {
	ctx, cancel := context.WithCancel(context.Background())
	s.mu.Lock()
	s.nextRun++
	r := &run{ID: s.nextRun, Spec: spec, Src: src, table: fmt.Sprintf("plumb_explorer_run_%d", s.nextRun),
		started: time.Now(), cancel: cancel, done: make(chan struct{})}
	if saved.File {
		r.Saved = saved.Name
	}
	s.runs = append(s.runs, r)
	var dropped []*run
	for len(s.runs) > e.cfg.KeptRuns {
		dropped = append(dropped, s.runs[0])
		s.runs = s.runs[1:]
	}
	s.mu.Unlock()
	go func() {
		defer close(r.done)
		for _, old := range dropped {
			old.cancel()
			<-old.done
		}
		err := s.acquire(ctx)
		if err == nil {
			for _, old := range dropped {
				s.conn.ExecContext(ctx, "DROP TABLE IF EXISTS "+udf.QuoteIdent(old.table))
			}
			var info *runInfo
			info, err = e.materialize(ctx, s, r, saved)
			s.release()
			r.mu.Lock()
			r.info, r.took = info, time.Since(r.started)
			r.mu.Unlock()
		}
		if err != nil {
			// The page names a file as the page offered it, relative to --data.
			if src.File {
				err = errors.New(strings.ReplaceAll(err.Error(), src.SQL, src.Name))
			}
			r.mu.Lock()
			r.err = err
			r.mu.Unlock()
		}
		e.cfg.Log.Info("explorer diagnosis", "user", s.user, "source", src.Name, "took", time.Since(r.started).String(), "error", err)
	}()
	return r
}

var keyTypePattern = regexp.MustCompile(`^[A-Z][A-Z0-9_ ]*(\([0-9, ]+\))?$`)

// materialize fills the run's table: diagnose(...) on the source, or the
// saved diagnosis file, numbered by rank and the group columns.
func (e *Explorer) materialize(ctx context.Context, s *session, r *run, saved source) (*runInfo, error) {
	spec := r.Spec
	if err := spec.Check(ctx, s.conn); err != nil {
		return nil, err
	}
	from, err := udf.SourceSQL(spec.Source)
	if err != nil {
		return nil, err
	}
	cols, err := sourceColumns(ctx, s.conn, r.Src)
	if err != nil {
		return nil, err
	}
	info := &runInfo{}
	for _, b := range spec.By {
		for _, c := range cols {
			if c.Name == b {
				if !keyTypePattern.MatchString(c.Type) {
					return nil, fmt.Errorf("the group column %q is %s: the explorer takes group columns of plain types (text, numbers, dates)", b, c.Type)
				}
				info.KeyTypes = append(info.KeyTypes, c.Type)
			}
		}
	}
	order := "rank, " + r.keyList("")
	tableName := udf.QuoteIdent(r.table)
	if saved.File {
		savedFrom, err := udf.SourceSQL(saved.SQL)
		if err != nil {
			return nil, err
		}
		names, err := sourceColumns(ctx, s.conn, saved)
		if err != nil {
			return nil, err
		}
		have := map[string]bool{}
		for _, c := range names {
			have[c.Name] = true
		}
		for _, c := range append(append([]string{}, spec.By...), requiredColumns...) {
			if !have[c] {
				return nil, fmt.Errorf("%s is not a diagnosis of %s's groups: it has no column %q", saved.Name, r.Src.Name, c)
			}
		}
		q := fmt.Sprintf("CREATE OR REPLACE TEMP TABLE %s AS WITH d AS (SELECT row_number() OVER (ORDER BY %s) AS plumb_id, * FROM %s) SELECT *, %s FROM d",
			tableName, order, savedFrom, orderColumnsSQL(namesOf(names), spec.By))
		if _, err := s.conn.ExecContext(ctx, q); err != nil {
			return nil, fmt.Errorf("cannot read %s: %s", saved.Name, firstLine(err.Error()))
		}
	} else {
		var total int64
		q := fmt.Sprintf("SELECT count(*) FROM (SELECT DISTINCT %s FROM %s)", r.keyList(""), from)
		if err := s.conn.QueryRowContext(ctx, q).Scan(&total); err != nil {
			return nil, fmt.Errorf("cannot read %s: %s", r.Src.Name, firstLine(err.Error()))
		}
		r.mu.Lock()
		r.total, r.startDone = total, udf.GroupsDone()
		r.mu.Unlock()
		q = fmt.Sprintf("CREATE OR REPLACE TEMP TABLE %s AS WITH d AS (SELECT row_number() OVER (ORDER BY %s) AS plumb_id, * FROM %s) SELECT *, %s FROM d",
			tableName, order, spec.Call(), orderColumnsSQL(diagnoseSortColumns, spec.By))
		if _, err := s.conn.ExecContext(ctx, q); err != nil {
			// The words plumb diagnose and plumb report use (diagnosis.Spec.Materialize).
			return nil, fmt.Errorf("diagnose %s: %s", r.Src.Name, firstLine(err.Error()))
		}
	}
	if info.Columns, info.Counts, err = describeTable(ctx, s.conn, r.table); err != nil {
		return nil, err
	}
	return info, nil
}

// describeTable reads a run table's columns and counts.
func describeTable(ctx context.Context, conn *sql.Conn, table string) ([]string, counts, error) {
	rows, err := conn.QueryContext(ctx, "SELECT column_name FROM (DESCRIBE "+udf.QuoteIdent(table)+")")
	if err != nil {
		return nil, counts{}, err
	}
	var cols []string
	for rows.Next() {
		var c string
		if err := rows.Scan(&c); err != nil {
			rows.Close()
			return nil, counts{}, err
		}
		cols = append(cols, c)
	}
	rows.Close()
	if err := rows.Err(); err != nil {
		return nil, counts{}, err
	}
	c, err := countRun(ctx, conn, table)
	return cols, c, err
}

// diagnoseSortColumns are the columns of diagnose's rows that may sort the
// list (udf/diagnose.go: score, and a p- and a q-value per test).
var diagnoseSortColumns = []string{"score", "adf_p_value", "adf_q_value", "kpss_p_value", "kpss_q_value",
	"mean_p_value", "mean_q_value", "spread_p_value", "spread_q_value", "ljung_box_p_value", "ljung_box_q_value"}

func namesOf(cols []column) []string {
	out := make([]string, len(cols))
	for i, c := range cols {
		out[i] = c.Name
	}
	return out
}

// findRun returns the session's run with that id.
func (s *session) findRun(id int) *run {
	s.mu.Lock()
	defer s.mu.Unlock()
	i := slices.IndexFunc(s.runs, func(r *run) bool { return r.ID == id })
	if i < 0 {
		return nil
	}
	return s.runs[i]
}

func (s *session) allRuns() []*run {
	s.mu.Lock()
	defer s.mu.Unlock()
	return append([]*run{}, s.runs...)
}
