package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestForecastCommand: plumb forecast prints its rows and writes every row
// (12 groups × 5 steps) to --out; with --holdout it summarises the
// held-out accuracy; a bad horizon is one line of error.
func TestForecastCommand(t *testing.T) {
	dir := demoFiles(t)
	shops := filepath.Join(dir, "shops.parquet")
	out, err := run(t, "", "forecast", shops, "--by", "shop,product", "--at", "day", "--value", "units", "--period", "7",
		"--horizon", "5", "--top", "4", "--out", filepath.Join(dir, "f.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(out, "forecast") || !strings.Contains(out, "lower") || !strings.Contains(out, "(4 rows)") {
		t.Errorf("forecast printed:\n%s", out)
	}
	csv, err := os.ReadFile(filepath.Join(dir, "f.csv"))
	if err != nil || strings.Count(string(csv), "\n") != 61 {
		t.Errorf("f.csv: %v, %d lines, want a header and 60 rows", err, strings.Count(string(csv), "\n"))
	}
	out, err = run(t, "", "forecast", shops, "--by", "shop,product", "--at", "day", "--value", "units", "--period", "7", "--holdout", "14")
	if err != nil || !strings.Contains(out, "median_mase") || !strings.Contains(out, "actual") {
		t.Errorf("forecast --holdout: %v\n%s", err, out)
	}
	_, err = run(t, "", "forecast", shops, "--by", "shop,product", "--at", "day", "--value", "units", "--horizon", "0")
	if err == nil || !strings.Contains(err.Error(), "horizon must be between 1") || strings.Contains(err.Error(), "\n") {
		t.Errorf("--horizon 0: %v", err)
	}
}
