package pgserver

import (
	"bufio"
	"context"
	"fmt"
	"os"
	"sort"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/jackc/pgx/v5"
)

// TestLoad: 32 concurrent clients each run 200 mixed statements (diagnose
// over Parquet, small selects, and statements that fail on purpose) against
// a server on loopback. The loop is bounded and stops by itself. Only the
// intended errors may occur; p50 and p99 latency and the process's peak
// RSS are printed.
func TestLoad(t *testing.T) {
	if testing.Short() {
		t.Skip("load test")
	}
	ts := startServer(t, Config{MaxConns: 40})
	file := writeSeries(t, ts.data)
	const clients, each = 32, 200
	statements := []struct {
		sql  string
		fail bool
	}{
		{"SELECT count(*) FROM diagnose('" + file + "', by := 'grp', at := 'day', value := 'v')", false},
		{"SELECT 1 + 1", false},
		{"SELECT sum(range) FROM range(1000)", false},
		{"SELECT * FROM no_such_table", true},
		{"SELECT difference([1, 4, 9, 16])", false},
		{"SELECT 1 / 'x'::INTEGER", true},
		{"SELECT unit_root(list(v ORDER BY day)).p_value FROM '" + file + "' WHERE grp = 'g0'", false},
		{"VALUES (1), (2), (3)", false},
	}
	var mu sync.Mutex
	var latencies []time.Duration
	var unexpected []string
	var wg sync.WaitGroup
	ctx, cancel := context.WithTimeout(context.Background(), 3*time.Minute)
	defer cancel()
	for c := 0; c < clients; c++ {
		wg.Add(1)
		go func(c int) {
			defer wg.Done()
			conn, err := pgx.Connect(ctx, ts.url("ana", "s3cret"))
			if err != nil {
				mu.Lock()
				unexpected = append(unexpected, fmt.Sprintf("client %d connect: %v", c, err))
				mu.Unlock()
				return
			}
			defer conn.Close(context.Background())
			for i := 0; i < each && ctx.Err() == nil; i++ {
				st := statements[(c+i)%len(statements)]
				start := time.Now()
				rows, err := conn.Query(ctx, st.sql)
				if err == nil {
					for rows.Next() {
					}
					rows.Close()
					err = rows.Err()
				}
				d := time.Since(start)
				mu.Lock()
				latencies = append(latencies, d)
				if (err != nil) != st.fail {
					unexpected = append(unexpected, fmt.Sprintf("client %d: %s: %v", c, st.sql, err))
				}
				mu.Unlock()
			}
		}(c)
	}
	wg.Wait()
	if len(unexpected) > 0 {
		t.Errorf("%d unexpected outcomes, first: %s", len(unexpected), unexpected[0])
	}
	sort.Slice(latencies, func(i, j int) bool { return latencies[i] < latencies[j] })
	if len(latencies) != clients*each {
		t.Errorf("%d statements ran, want %d", len(latencies), clients*each)
	}
	p := func(q float64) time.Duration { return latencies[int(q*float64(len(latencies)-1))] }
	t.Logf("%d clients x %d statements: p50 %v, p99 %v, max %v; peak RSS of the test process (server and clients) %s",
		clients, each, p(0.50), p(0.99), latencies[len(latencies)-1], peakRSS())
}

// peakRSS reads VmHWM from /proc/self/status.
func peakRSS() string {
	f, err := os.Open("/proc/self/status")
	if err != nil {
		return "unknown"
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if strings.HasPrefix(sc.Text(), "VmHWM:") {
			return strings.TrimSpace(strings.TrimPrefix(sc.Text(), "VmHWM:"))
		}
	}
	return "unknown"
}
