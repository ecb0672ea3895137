package udf

import (
	"os"
	"regexp"
	"slices"
	"strings"
	"testing"
)

// readmeFields returns the field names of the README table that follows
// the line starting with heading: the backquoted names of each row's first
// cell, in order.
func readmeFields(t *testing.T, heading string) []string {
	t.Helper()
	text, err := os.ReadFile("../README.md")
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(text), "\n")
	start := slices.IndexFunc(lines, func(l string) bool { return strings.HasPrefix(l, heading) })
	if start < 0 {
		t.Fatalf("README has no line starting %q", heading)
	}
	name := regexp.MustCompile("`([a-z_0-9]+)`")
	var fields []string
	inTable := false
	for _, l := range lines[start+1:] {
		if !strings.HasPrefix(l, "|") {
			if inTable {
				break
			}
			continue
		}
		inTable = true
		cells := strings.Split(l, "|")
		if len(cells) < 3 || strings.HasPrefix(strings.TrimSpace(cells[1]), "---") || strings.TrimSpace(cells[1]) == "field" {
			continue
		}
		for _, m := range name.FindAllStringSubmatch(cells[1], -1) {
			fields = append(fields, m[1])
		}
	}
	return fields
}

// readmeRow returns the README row of the function table whose first cell
// starts with call.
func readmeRow(t *testing.T, call string) string {
	t.Helper()
	text, err := os.ReadFile("../README.md")
	if err != nil {
		t.Fatal(err)
	}
	for _, l := range strings.Split(string(text), "\n") {
		if strings.HasPrefix(l, "| `"+call) {
			return l
		}
	}
	t.Fatalf("README has no row for %s", call)
	return ""
}

// TestREADMEFieldTables checks that the README documents each STRUCT as it
// is declared: the verdict's field table in the declared order, and every
// field of the smaller STRUCTs named in its function's row.
func TestREADMEFieldTables(t *testing.T) {
	if got := readmeFields(t, "The verdict's fields"); !slices.Equal(got, verdictLayout.names) {
		t.Errorf("README's verdict table lists\n%v\nbut the declaration (verdictLayout) is\n%v", got, verdictLayout.names)
	}
	if got := readmeFields(t, "The STRUCT's fields come in this order"); !slices.Equal(got, unitRootLayout.names) {
		t.Errorf("README's unit_root table lists\n%v\nbut the declaration (unitRootLayout) is\n%v", got, unitRootLayout.names)
	}
	for _, c := range []struct {
		call  string
		names []string
	}{
		{"stability(", stabilityLayout.names},
		{"seasonality(", seasonalityLayout.names},
		{"white_noise(", whiteNoiseLayout.names},
		{"demand_profile(", demandProfileLayout.names},
		{"mean_break(", meanBreakLayout.names},
		{"zivot_andrews(", zivotAndrewsLayout.names},
	} {
		row := readmeRow(t, c.call)
		for _, n := range c.names {
			if n == "status" {
				continue // documented once for every function
			}
			if !strings.Contains(row, "`"+n+"`") {
				t.Errorf("README's row for %s does not name its field %s", c.call, n)
			}
		}
	}
}

// TestDiagnoseColumnsPinned pins diagnose's column order, which is derived
// from diagnoseLayout: a change here is a change users see.
func TestDiagnoseColumnsPinned(t *testing.T) {
	want := []string{"status", "reason", "gaps", "missing", "n_used",
		"mean_stable", "spread_stable", "seasonal", "stationary", "violations",
		"mean_cause", "shift_at", "shift_size", "trend_slope", "spread_cause", "seasonal_kind", "second_period",
		"zero_share", "demand_class", "outliers",
		"differences", "seasonal_differences", "box_cox_lambda", "period", "seasonal_strength",
		"cured", "left_violations", "over_differenced", "score",
		"adf_statistic", "adf_p_value", "adf_lags", "kpss_statistic", "kpss_p_value", "kpss_lags",
		"mean_p_value", "spread_p_value", "ljung_box_p_value"}
	if !slices.Equal(diagnoseFields, want) {
		t.Errorf("diagnose's columns are\n%v\nwant\n%v", diagnoseFields, want)
	}
	for _, n := range verdictLayout.names {
		if !slices.Contains(diagnoseLayout.names, n) {
			t.Errorf("diagnose does not carry the verdict's field %s", n)
		}
	}
}
