package explorer

import (
	"context"
	"fmt"
	"net/url"
	"testing"

	"github.com/plumb-sql/plumb/cmd/internal/diagnosis"
)

// benchRun makes a run over a diagnosis table of n groups without running
// diagnose n times: the demo shops are diagnosed once (96 real rows) and
// their rows repeated with new keys, scores and p-values drawn by SQL
// (seeded), then ranked and numbered as the explorer numbers a run.
func benchRun(b *testing.B, e *Explorer, s *session, n int) *run {
	b.Helper()
	ctx := context.Background()
	spec := diagnosis.Spec{Source: e.cfg.Files.Data() + "/shops.parquet", By: []string{"shop", "product"}, At: "day", Value: "units", Period: 7}
	if _, err := s.conn.ExecContext(ctx, "CREATE OR REPLACE TEMP TABLE bench_demo AS FROM "+spec.Call()); err != nil {
		b.Fatal(err)
	}
	table := fmt.Sprintf("bench_run_%d", n)
	q := fmt.Sprintf(`CREATE OR REPLACE TEMP TABLE %[1]s AS
		WITH rows AS (
			SELECT d.* REPLACE (d.shop || ' ' || r.i AS shop, random() * 3 AS score, random() AS kpss_p_value,
			       random() AS kpss_q_value, random() AS adf_p_value, random() AS mean_q_value)
			FROM bench_demo d, range(%[2]d // 96 + 1) r(i)
			LIMIT %[2]d
		), ranked AS (SELECT * REPLACE (rank() OVER (ORDER BY score DESC) AS rank) FROM rows)
		, d AS (SELECT row_number() OVER (ORDER BY rank, shop, product) AS plumb_id, * FROM ranked)
		SELECT *, %[3]s FROM d`, table, n, orderColumnsSQL(diagnoseSortColumns, spec.By))
	if _, err := s.conn.ExecContext(ctx, "SELECT setseed(0.24)"); err != nil {
		b.Fatal(err)
	}
	if _, err := s.conn.ExecContext(ctx, q); err != nil {
		b.Fatal(err)
	}
	r := &run{ID: 1, Spec: spec, table: table, done: make(chan struct{})}
	info := &runInfo{}
	var err error
	if info.Columns, info.Counts, err = describeTable(ctx, s.conn, table); err != nil {
		b.Fatal(err)
	}
	if info.Counts.Groups != n {
		b.Fatalf("made %d groups, want %d", info.Counts.Groups, n)
	}
	close(r.done)
	r.info = info
	return r
}

// BenchmarkListPage times one page of the list (the count of matching
// groups and the page's rows, as handleList reads them) on 100 and on
// 1,000,000 groups, for the queries the page makes most: the first page by
// rank, a filter sorted by score, a page deep in the list, a text match and
// a sort by a q-value.
func BenchmarkListPage(b *testing.B) {
	ts := newTestServer(b, demoFiles(b), false, false, nil)
	ctx := context.Background()
	s, err := ts.explorer.sessions.open(ctx, ts.explorer.cfg.DB, "bench", false)
	if err != nil {
		b.Fatal(err)
	}
	queries := []struct{ name, query string }{
		{"first-page", ""},
		{"level-shifts-by-score", "mean_cause=level_shift&sort=score"},
		{"deep-page-offset", "page=2000&size=50&sort=kpss_p_value"},
		{"deep-page-keyset", "page=2000&after=99950&size=50&sort=kpss_p_value"},
		{"text-match", "q=mill lane 12"},
		{"kpss-q-desc-not-cured", "sort=kpss_q_value&dir=desc&cured=no"},
	}
	for _, n := range []int{100, 1_000_000} {
		r := benchRun(b, ts.explorer, s, n)
		for _, c := range queries {
			v, _ := url.ParseQuery(c.query)
			q, err := parseList(v, r.info)
			if err != nil {
				b.Fatal(err)
			}
			if n == 100 && q.Page > 1 {
				q.Page, q.After = 1, nil
			}
			b.Run(fmt.Sprintf("groups=%d/%s", n, c.name), func(b *testing.B) {
				for b.Loop() {
					p, err := readPage(ctx, s.conn, r, q)
					if err != nil {
						b.Fatal(err)
					}
					if p.Matching > 0 && len(p.Rows) == 0 {
						b.Fatalf("%d groups match but the page is empty", p.Matching)
					}
				}
			})
		}
	}
}
