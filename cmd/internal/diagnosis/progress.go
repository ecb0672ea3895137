package diagnosis

import (
	"fmt"
	"io"
	"os"
	"sync"
	"time"

	"github.com/plumb-sql/plumb/udf"
)

// Progress shows, on a terminal, how many groups have been diagnosed so far,
// refreshed a few times a second on one line; it is silent when w is not a
// terminal or quiet is set. Stop ends it and clears the line.
type Progress struct {
	stop chan struct{}
	done sync.WaitGroup
}

// StartProgress begins showing progress on w.
func StartProgress(w io.Writer, quiet bool) *Progress {
	p := &Progress{stop: make(chan struct{})}
	if quiet || !isTerminal(w) {
		return p
	}
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
				n := udf.GroupsDone() - start
				secs := time.Since(began).Seconds()
				fmt.Fprintf(w, "\r\033[Kdiagnosing: %d groups done, %.0f groups/s, %.1f s", n, float64(n)/secs, secs)
			}
		}
	}()
	return p
}

// Stop ends the display.
func (p *Progress) Stop() {
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
