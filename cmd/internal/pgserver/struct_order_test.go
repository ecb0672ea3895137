package pgserver

import (
	"bytes"
	"context"
	"testing"

	"github.com/jackc/pgx/v5"
)

// TestStructFieldsInDeclaredOrder: STRUCTs reach the client as JSON text
// with their fields in declared order (duckdb-go scans them as Go maps,
// which have none), nested ones too, through the simple and extended
// protocols and COPY TO STDOUT.
func TestStructFieldsInDeclaredOrder(t *testing.T) {
	ts := startServer(t, Config{})
	c := ts.connect(t)
	ctx := context.Background()
	const q = `SELECT struct_pack(b := 1, a := 2) AS s,
		struct_pack(o := struct_pack(n := 1, m := 2), "k k" := [struct_pack(z := 'x', y := 2.5)]) AS nested,
		MAP {'k': struct_pack(q := 1, p := 2)} AS m`
	want := []string{`{"b":1,"a":2}`, `{"o":{"n":1,"m":2},"k k":[{"z":"x","y":2.5}]}`, `{"k":{"q":1,"p":2}}`}
	for _, mode := range []pgx.QueryExecMode{pgx.QueryExecModeSimpleProtocol, pgx.QueryExecModeExec, pgx.QueryExecModeCacheDescribe} {
		got := make([]string, 3)
		if err := c.QueryRow(ctx, q, mode).Scan(&got[0], &got[1], &got[2]); err != nil {
			t.Fatalf("mode %v: %v", mode, err)
		}
		for i := range want {
			if got[i] != want[i] {
				t.Errorf("mode %v: column %d is %s, want %s", mode, i+1, got[i], want[i])
			}
		}
	}
	var out bytes.Buffer
	if _, err := c.PgConn().CopyTo(ctx, &out, "COPY (SELECT struct_pack(b := 1, a := 2)) TO STDOUT"); err != nil {
		t.Fatal(err)
	}
	if out.String() != `{"b":1,"a":2}`+"\n" {
		t.Errorf("COPY TO STDOUT wrote %q", out.String())
	}
}
