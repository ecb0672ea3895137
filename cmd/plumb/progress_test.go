package main

import (
	"context"
	"testing"

	"github.com/plumb-sql/plumb/cmd/internal/diagnosis"
	"github.com/plumb-sql/plumb/udf"
)

func TestProgressLine(t *testing.T) {
	for _, test := range []struct {
		done, total int64
		secs        float64
		want        string
	}{
		{77, 96, 2, "diagnosing: 77 of 96 groups, 38 groups/s, 2.0 s"},
		{77, 0, 2, "diagnosing: 77 groups done, 38 groups/s, 2.0 s"}, // not counted yet
		{0, 0, 0, "diagnosing: 0 groups done, 0 groups/s, 0.0 s"},
	} {
		if got := diagnosis.ProgressLine(test.done, test.total, test.secs); got != test.want {
			t.Errorf("diagnosis.ProgressLine(%d, %d, %v) = %q, want %q", test.done, test.total, test.secs, got, test.want)
		}
	}
}

// TestProgressCountsGroups: the total the progress shows is the number of rows
// diagnose returns, for the whole source and for each shard.
func TestProgressCountsGroups(t *testing.T) {
	ctx := context.Background()
	db, err := udf.Open(ctx, udf.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	// 37 groups of (a, b), one with a NULL key, 40 days each
	if _, err := db.Exec(`CREATE TABLE s AS SELECT CASE WHEN g = 3 THEN NULL ELSE g % 5 END AS a, 'b' || (g // 5) AS b,
		DATE '2025-01-01' + t::INTEGER AS day, sin(g + t) + t * (g % 3) AS v FROM range(37) gs(g), range(40) ts(t)`); err != nil {
		t.Fatal(err)
	}
	for _, spec := range []diagnosis.Spec{
		{Source: "s", By: []string{"a", "b"}, At: "day", Value: "v"},
		{Source: "s", By: []string{"a", "b"}, At: "day", Value: "v", Shard: 0, Shards: 3},
		{Source: "s", By: []string{"a", "b"}, At: "day", Value: "v", Shard: 2, Shards: 3},
	} {
		n, err := spec.CountGroups(ctx, db)
		if err != nil {
			t.Fatal(err)
		}
		var rows int64
		if err := db.QueryRow("SELECT count(*) FROM " + spec.Call()).Scan(&rows); err != nil {
			t.Fatal(err)
		}
		if n != rows || (spec.Shards == 0 && n != 37) {
			t.Errorf("shard %d of %d: counted %d groups, diagnose returns %d", spec.Shard, spec.Shards, n, rows)
		}
	}
}
