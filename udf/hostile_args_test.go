package udf

import (
	"strings"
	"testing"
)

// TestHostileSpans: arguments an attacker of plumb serve sent, each of
// which once reached a Go panic (recovered, as an internal error) or asked
// for an allocation the Go runtime could not survive. Each now gets a clear
// error or a per-group status.
func TestHostileSpans(t *testing.T) {
	db := openTest(t)
	for _, test := range []struct{ query, want string }{
		{"SELECT seasonality(range(100)::DOUBLE[], 9223372036854775807)", "period must be at most 2147483647"},
		{"SELECT stationarity(range(100)::DOUBLE[], 4611686018427387904, 0.05)", "period must be at most 2147483647"},
		{"SELECT * FROM diagnose('(SELECT ''a'' AS g, range AS t, random() AS v FROM range(50))', by := 'g', at := 't', value := 'v', period := 9223372036854775807)", "period must be at most"},
		{"SELECT * FROM differenced('(SELECT ''a'' AS g, range AS t, random() AS v FROM range(50))', by := 'g', at := 't', value := 'v', lag := 9223372036854775807)", "must be at most"},
		{"SELECT * FROM differenced('(SELECT ''a'' AS g, range AS t, random() AS v FROM range(50))', by := 'g', at := 't', value := 'v', lag := 65536, times := 65536)", "must be at most"},
	} {
		if msg := queryError(t, db, test.query); !strings.Contains(msg, test.want) || strings.Contains(msg, "runtime error") {
			t.Errorf("%s:\n got %q, want %q", test.query, msg, test.want)
		}
	}
	// difference() itself: a lag or count beyond the series gives an empty
	// list, whatever their product.
	var n int
	if err := db.QueryRow("SELECT len(difference([1, 2, 3], lag := 4611686018427387904, times := 4))").Scan(&n); err != nil || n != 0 {
		t.Errorf("difference with a huge lag: %d, %v", n, err)
	}
	// Four observations a billion steps apart: a fill would have allocated
	// the whole grid (8 GB; 8 TB at 1e12) and killed the process.
	for _, fill := range []string{"previous", "linear"} {
		var status string
		var reason string
		err := db.QueryRow(`SELECT status, reason FROM diagnose('(SELECT ''a'' AS g, unnest([0, 1, 2, 1000000000000]) AS t, 1.5 AS v)',
			by := 'g', at := 't', value := 'v', fill := '`+fill+`')`).Scan(&status, &reason)
		if err != nil || status != "too_sparse" || !strings.Contains(reason, "Too sparse") {
			t.Errorf("diagnose, fill %s: status %q, reason %q, %v", fill, status, reason, err)
		}
		err = db.QueryRow(`SELECT DISTINCT status FROM forecast('(SELECT ''a'' AS g, unnest([0, 1, 2, 1000000000000]) AS t, 1.5 AS v)',
			by := 'g', at := 't', value := 'v', fill := '` + fill + `')`).Scan(&status)
		if err != nil || status != "too_sparse" {
			t.Errorf("forecast, fill %s: status %q, %v", fill, status, err)
		}
	}
}
