package pgserver

import (
	"context"
	"io"
	"testing"
)

// BenchmarkCopyOut times COPY (query) TO STDOUT of 1,000,000 rows of four
// columns (integer, double, text, date) to a pgx client on loopback, in
// PostgreSQL's text format and as CSV. Run it with
// go test ./cmd/internal/pgserver -run XXX -bench CopyOut -benchtime 3x
func BenchmarkCopyOut(b *testing.B) {
	const query = "(SELECT i, i * 0.5 AS x, 'row ' || i AS s, DATE '2025-01-01' + (i % 1000)::INTEGER AS d FROM range(1000000) t(i))"
	t := &testing.T{}
	ts := startServer(t, Config{})
	c := ts.connect(t)
	defer c.Close(context.Background())
	for _, format := range []struct{ name, options string }{{"text", ""}, {"csv", " WITH CSV"}} {
		b.Run(format.name, func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				tag, err := c.PgConn().CopyTo(context.Background(), io.Discard, "COPY "+query+" TO STDOUT"+format.options)
				if err != nil || tag.RowsAffected() != 1_000_000 {
					b.Fatalf("%v %v", tag, err)
				}
			}
		})
	}
}

// BenchmarkAllowList times what the allow-list's token checks and the file
// policy add to one statement before DuckDB sees it: the rewrite with its
// checks, then the check of the statement as it will run. Run it with
// go test ./cmd/internal/pgserver -run XXX -bench AllowList
func BenchmarkAllowList(b *testing.B) {
	g := testGate(b.TempDir())
	const sql = "SELECT shop, product, rank FROM diagnose('shops.parquet', by := ['shop', 'product'], at := 'day', value := 'units') JOIN read_csv('in/x.csv') USING (shop) WHERE rank <= 5 ORDER BY rank"
	for i := 0; i < b.N; i++ {
		out, _, err := rewriteSQL(sql, g)
		if err == nil {
			err = g.check(out)
		}
		if err != nil {
			b.Fatal(err)
		}
	}
}
