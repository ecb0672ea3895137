package udf

import (
	"fmt"
	"testing"
)

// TestDiagnoseShiftAt: diagnose reports a level shift's shift_at as the
// at value of the first observation after the break, in the at column's own
// type (DATE, TIMESTAMP, integer), also when the rows arrive out of order
// and when gaps are filled; and it judges each group once (the verdict is
// computed in a subquery whose result the shift_at lookup reads, and
// DuckDB must not call the Go function twice).
func TestDiagnoseShiftAt(t *testing.T) {
	db := openTest(t)
	for _, test := range []struct {
		name, at, want, fill, where string
	}{
		{"date", "DATE '2025-01-01' + i::INTEGER", "2025-06-30", "none", ""},
		{"timestamp", "TIMESTAMP '2025-01-01 00:00:00' + INTERVAL (i) HOUR", "2025-01-08 12:00:00", "none", ""},
		{"integer", "1000 + 2 * i", "1360", "none", ""},
		// Points 100-104 missing and filled linearly: positions stay those
		// of the regular grid.
		{"gaps filled", "DATE '2025-01-01' + i::INTEGER", "2025-06-30", "linear", "WHERE i NOT BETWEEN 100 AND 104"},
	} {
		exec(t, db, fmt.Sprintf(`CREATE OR REPLACE TABLE shifted AS
			SELECT g, %[1]s AS at,
			       10 + ((hash(g, i) %% 1000) / 1000.0 - 0.5) * 2 + CASE WHEN i >= 180 THEN 8 ELSE 0 END AS v
			FROM range(4) a(g), range(300) b(i) %[2]s
			ORDER BY hash(i * 7 + g)`, test.at, test.where))
		before := GroupsDone()
		rows, err := db.Query(fmt.Sprintf(`SELECT g, mean_cause, shift_at::VARCHAR, differences, typeof(shift_at) = typeof(first_at)
			FROM diagnose('shifted', by := 'g', at := 'at', value := 'v', fill := '%s') ORDER BY g`, test.fill))
		if err != nil {
			t.Fatalf("%s: %v", test.name, err)
		}
		n := 0
		for rows.Next() {
			var g, d int
			var cause, shiftAt string
			var sameType bool
			if err := rows.Scan(&g, &cause, &shiftAt, &d, &sameType); err != nil {
				t.Fatal(err)
			}
			n++
			if cause != "level_shift" || shiftAt != test.want || d != 0 || !sameType {
				t.Errorf("%s, group %d: cause %s, shift_at %s (same type as at: %v), d = %d; want level_shift at %s, d = 0",
					test.name, g, cause, shiftAt, sameType, d, test.want)
			}
		}
		rows.Close()
		if n != 4 {
			t.Errorf("%s: %d groups", test.name, n)
		}
		if calls := GroupsDone() - before; calls != 4 {
			t.Errorf("%s: the verdict ran %d times for 4 groups", test.name, calls)
		}
	}
}
