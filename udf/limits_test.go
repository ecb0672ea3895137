package udf

import (
	"context"
	"errors"
	"strings"
	"testing"
	"time"
)

// TestListLengthLimit: under a memory limit a list argument longer than
// maxListValues is refused with an error naming the function and the
// limit, before it is copied; shorter ones are computed. Both ways of
// reading a chunk (direct and duckdb-go's iterator) check it.
func TestListLengthLimit(t *testing.T) {
	const limit = 1 << 20 // 1 MiB: at most 8192 values (1/16 of it as 8-byte values)
	if got := maxListValues(limit); got != 8192 {
		t.Fatalf("maxListValues(1 MiB) = %d, want 8192", got)
	}
	db, err := Open(context.Background(), Options{MemoryLimit: limit})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	for _, iterator := range []bool{false, true} {
		forceIterator = iterator
		var status string
		err := db.QueryRow("SELECT plumb_unit_root(list_transform(range(0, 10000 + r.range), x -> sin(x)), NULL, NULL, NULL, NULL).status FROM range(1) r").Scan(&status)
		if err == nil || !strings.Contains(err.Error(), "plumb_unit_root") || !strings.Contains(err.Error(), "longer than the 8192") {
			t.Errorf("iterator %v: a list of 10000 values: %v", iterator, err)
		}
		err = db.QueryRow("SELECT plumb_unit_root(list_transform(range(0, 500 + r.range), x -> sin(x)), NULL, NULL, NULL, NULL).status FROM range(1) r").Scan(&status)
		if err != nil || status == "" {
			t.Errorf("iterator %v: a list of 500 values: %q %v", iterator, status, err)
		}
	}
	forceIterator = false
}

// TestCancelStopsWithinAChunk: a cancelled query stops after the rows
// being computed, not after its whole chunk: 2048 verdicts on random walks
// of 20,000 values, one chunk of about 40 s of CPU (18 ms a row on this
// project's machine), cancelled after 1 s. The work must dwarf the delay
// on an idle machine too: 2048 unit-root tests finished within the second
// when nothing else ran.
func TestCancelStopsWithinAChunk(t *testing.T) {
	db, err := Open(context.Background(), Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	for _, iterator := range []bool{false, true} {
		forceIterator = iterator
		ctx, cancel := context.WithCancel(context.Background())
		time.AfterFunc(time.Second, cancel)
		start := time.Now()
		var n int64
		err := db.QueryRowContext(ctx, `WITH walk AS (SELECT list(s ORDER BY i) AS v
				FROM (SELECT range AS i, sum(random() - 0.5) OVER (ORDER BY range) AS s FROM range(20000)))
			SELECT count(plumb_stationarity(list_concat([r.range::DOUBLE], walk.v), 7, 0.05).status)
			FROM range(2048) r, walk`).Scan(&n)
		stoppedAfter := time.Since(start) - time.Second
		if err == nil {
			t.Fatalf("iterator %v: the query finished (%d rows) instead of being cancelled", iterator, n)
		}
		if !errors.Is(err, context.Canceled) && !strings.Contains(err.Error(), "nterrupt") && !strings.Contains(err.Error(), "canceled") {
			t.Errorf("iterator %v: %v, want a cancellation", iterator, err)
		}
		t.Logf("iterator %v: stopped %v after the cancel", iterator, stoppedAfter)
		if stoppedAfter > 10*time.Second {
			t.Errorf("iterator %v: stopped only %v after the cancel", iterator, stoppedAfter)
		}
	}
	forceIterator = false
}
