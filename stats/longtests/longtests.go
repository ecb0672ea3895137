// Package longtests is the one switch for plumb's long tests: the load
// test, the client matrix, the Dask example and the full-size runs of
// tests that also have a quick default form. PLUMB_LONG_TESTS=1 turns them
// on; .ci/run sets it, so CI runs everything while a plain `go test ./...`
// stays quick. Only tests import this package. It lives under stats, the
// bottom of the import graph, so that the tests of every package (stats
// included) can import it; it is no mathematics.
package longtests

import (
	"os"
	"testing"
)

// Variable is the environment variable that turns the long tests on.
const Variable = "PLUMB_LONG_TESTS"

// Enabled reports whether PLUMB_LONG_TESTS is set to 1 (or true).
func Enabled() bool {
	v := os.Getenv(Variable)
	return v == "1" || v == "true"
}

// Require skips t, saying in one line what it is and how to run it, unless
// the long tests are on. what says what the test does and how long it
// takes, e.g. "32 clients × 200 statements, about 45 s".
func Require(t testing.TB, what string) {
	t.Helper()
	if !Enabled() {
		t.Skipf("long test (%s): run it with %s=1 go test ...; CI does", what, Variable)
	}
}
