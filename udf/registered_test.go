package udf

import (
	"fmt"
	"testing"
)

// TestSourceArguments: the list of source-taking table functions read from
// the registration (udf/*.go macros) has every table macro that takes one.
func TestSourceArguments(t *testing.T) {
	got := SourceArguments()
	want := map[string][]int{"diagnose": {1}, "differenced": {1}, "rolling_dispersion": {1}, "stationarize": {1},
		"stationarize_recipes": {1}, "restore": {1, 2}, "forecast": {1}, "forecast_models": {1}, "combine_diagnoses": {1}}
	if fmt.Sprint(got) != fmt.Sprint(want) {
		t.Errorf("SourceArguments() = %v, want %v", got, want)
	}
}

// TestQualifyCalls: calls of plumb's scalar functions are qualified;
// names inside literals, quoted identifiers and comments, qualified
// names, and names that are not calls are left alone.
func TestQualifyCalls(t *testing.T) {
	for _, test := range []struct{ in, want string }{
		{"SELECT plumb_difference(x, 1, 1)", "SELECT system.main.plumb_difference(x, 1, 1)"},
		{"plumb_diagnose_sql(a)", "system.main.plumb_diagnose_sql(a)"},
		{"f(plumb_q_values(plumb_difference(x)))", "f(system.main.plumb_q_values(system.main.plumb_difference(x)))"},
		{"SELECT 'plumb_difference(' AS s, \"plumb_difference\"(1)", "SELECT 'plumb_difference(' AS s, \"plumb_difference\"(1)"},
		{"SELECT system.main.plumb_difference(x) -- plumb_difference(y)", "SELECT system.main.plumb_difference(x) -- plumb_difference(y)"},
		{"FROM (SELECT 1) AS plumb_one(plumb_x), plumb_difference", "FROM (SELECT 1) AS plumb_one(plumb_x), plumb_difference"},
	} {
		if got := qualifyCalls(test.in); got != test.want {
			t.Errorf("qualifyCalls(%q)\n got %q\nwant %q", test.in, got, test.want)
		}
	}
	names := FunctionNames()
	has := map[string]bool{}
	for _, n := range names {
		has[n] = true
	}
	for _, n := range []string{"diagnose", "unit_root", "plumb_diagnose_sql", "difference", "forecast_models"} {
		if !has[n] {
			t.Errorf("FunctionNames() lacks %s", n)
		}
	}
}
