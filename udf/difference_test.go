package udf

import (
	"strings"
	"testing"
)

func TestDifferenceSQL(t *testing.T) {
	db := openTest(t)
	for _, test := range []struct{ query, want string }{
		// Plain algebra, the examples: differences of squares, then second differences.
		{"SELECT difference([1,4,9,16]::DOUBLE[])", "[3.0, 5.0, 7.0]"},
		{"SELECT difference([1,4,9,16]::DOUBLE[], times := 2)", "[2.0, 2.0]"},
		{"SELECT difference([1,2,3,4,5]::DOUBLE[], lag := 2)", "[2.0, 2.0, 2.0]"},
		// Integer lists are cast to DOUBLE by the macro.
		{"SELECT difference([1,4,9,16])", "[3.0, 5.0, 7.0]"},
		// Too short for the lag: empty, not an error.
		{"SELECT difference([1.0], lag := 3)", "[]"},
		// A NULL element makes every difference that uses it NULL.
		{"SELECT difference([1, NULL, 4, 8])", "[NULL, NULL, 4.0]"},
		// A NULL list gives NULL.
		{"SELECT difference(NULL::DOUBLE[])", "NULL"},
		// Undifference: the running sum from the anchor; only the anchor's last lag values count.
		{"SELECT undifference([3, 5, 7], [1])", "[4.0, 9.0, 16.0]"},
		{"SELECT undifference([2, 2, 2], [0, 1, 2], lag := 2)", "[3.0, 4.0, 5.0]"},
		{"SELECT undifference([10, 20], [99, 5])", "[15.0, 35.0]"},
	} {
		if got := queryString(t, db, test.query); got != test.want {
			t.Errorf("%s = %s, want %s", test.query, got, test.want)
		}
	}
}

func TestDifferenceSQLRejectsBadOptions(t *testing.T) {
	db := openTest(t)
	for _, test := range []struct{ query, want string }{
		{"SELECT difference([1, 2, 3], lag := 0)", "lag must be at least 1"},
		{"SELECT difference([1, 2, 3], times := -1)", "times must be at least 1"},
		{"SELECT undifference([1, 2], [1], lag := 2)", "needs 2 anchor values"},
	} {
		if msg := queryError(t, db, test.query); !strings.Contains(msg, test.want) {
			t.Errorf("%s: error %q does not say %q", test.query, msg, test.want)
		}
	}
}
