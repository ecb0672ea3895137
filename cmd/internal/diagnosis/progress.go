package diagnosis

import (
	"context"
	"database/sql"
	"fmt"
	"io"
	"os"
	"sync"
	"sync/atomic"
	"time"

	"github.com/plumb-sql/plumb/udf"
)

// Progress shows, on a terminal, how many groups have been diagnosed so far
// (of how many, once CountGroups has counted them), refreshed a few times a
// second on one line; it is silent when w is not a terminal or quiet is
// set. Stop ends it and clears the line.
type Progress struct {
	stop   chan struct{}
	done   sync.WaitGroup
	shown  bool
	total  atomic.Int64 // 0: not counted (yet)
	cancel context.CancelFunc
}

// StartProgress begins showing progress on w.
func StartProgress(w io.Writer, quiet bool) *Progress {
	p := &Progress{stop: make(chan struct{}), cancel: func() {}}
	if quiet || !isTerminal(w) {
		return p
	}
	p.shown = true
	start := udf.GroupsDone()
	began := time.Now()
	p.done.Add(1)
	go func() {
		defer p.done.Done()
		tick := time.NewTicker(200 * time.Millisecond)
		defer tick.Stop()
		for {
			select {
			case <-p.stop:
				fmt.Fprint(w, "\r\033[K")
				return
			case <-tick.C:
				fmt.Fprint(w, "\r\033[K"+ProgressLine(udf.GroupsDone()-start, p.total.Load(), time.Since(began).Seconds()))
			}
		}
	}()
	return p
}

// ProgressLine is the progress shown after done groups of total (0: not
// known yet) in secs seconds.
func ProgressLine(done, total int64, secs float64) string {
	rate := float64(done) / max(secs, 1e-3)
	if total > 0 {
		return fmt.Sprintf("diagnosing: %d of %d groups, %.0f groups/s, %.1f s", done, total, rate, secs)
	}
	return fmt.Sprintf("diagnosing: %d groups done, %.0f groups/s, %.1f s", done, rate, secs)
}

// CountGroups counts, on a connection of its own from db, the groups spec
// will diagnose, and shows the count as the total. It runs beside the
// diagnosis (an extra read of the group columns only) and only while the
// progress is shown; Stop cancels it.
func (p *Progress) CountGroups(ctx context.Context, db *sql.DB, spec Spec) {
	if !p.shown {
		return
	}
	ctx, p.cancel = context.WithCancel(ctx)
	p.done.Add(1)
	go func() {
		defer p.done.Done()
		if n, err := spec.CountGroups(ctx, db); err == nil {
			p.total.Store(n)
		}
	}()
}

// Stop ends the display.
func (p *Progress) Stop() {
	p.cancel()
	close(p.stop)
	p.done.Wait()
}

func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}
