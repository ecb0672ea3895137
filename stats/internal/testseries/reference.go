package testseries

import (
	"encoding/csv"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"testing"
)

// The reference values in testdata/reference (at the module's top) were
// produced by testdata/reference/regenerate.sh from Debian's
// python3-statsmodels 0.13.5, r-cran-urca 1.3-3 and r-cran-tseries 0.10-53;
// see the scripts there. The folder is found from this file's own path, so
// the tests of every package under stats read the same files whatever their
// working directory.
var referenceDir = func() string {
	_, file, _, _ := runtime.Caller(0)
	return filepath.Join(filepath.Dir(file), "..", "..", "..", "testdata", "reference")
}()

// ReadCSV reads a reference CSV file as maps from column name to text.
func ReadCSV(t testing.TB, name string) []map[string]string {
	t.Helper()
	f, err := os.Open(filepath.Join(referenceDir, name))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.FieldsPerRecord = -1
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var out []map[string]string
	for _, rec := range recs[1:] {
		if len(rec) < len(recs[0]) {
			continue
		}
		m := map[string]string{}
		for i, h := range recs[0] {
			m[h] = strings.TrimSpace(rec[i])
		}
		out = append(out, m)
	}
	return out
}

// Num parses a reference file's number; "NA" and an empty field read as 0.
func Num(t testing.TB, s string) float64 {
	t.Helper()
	if s == "NA" || s == "" {
		return 0
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("parse %q: %v", s, err)
	}
	return v
}

// ReferenceSeries reads every series the reference values were computed on:
// R's datasets, statsmodels' macrodata and the simulated series, in file order.
func ReferenceSeries(t testing.TB) (names []string, series map[string][]float64) {
	series = map[string][]float64{}
	for _, f := range []string{"datasets_r.csv", "datasets_statsmodels.csv", "simulated.csv"} {
		for _, row := range ReadCSV(t, f) {
			name := row["dataset"]
			if _, ok := series[name]; !ok {
				names = append(names, name)
			}
			series[name] = append(series[name], Num(t, row["value"]))
		}
	}
	return names, series
}
