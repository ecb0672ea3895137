package bench

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/plumb-sql/plumb/udf"
)

// referenceScript is the loop practitioners write today: for each group
// run python3-statsmodels' adfuller (AIC lag choice) and kpss. It reads the
// first groups of the same Parquet file, exported to CSV by DuckDB (Debian
// has no Parquet reader for Python), times only the loop over groups, and
// prints the seconds per group.
const referenceScript = `
import sys, time, warnings
import pandas as pd
from statsmodels.tsa.stattools import adfuller, kpss
path = sys.argv[1]
table = pd.read_csv(path)
groups = table.groupby("g")
start = time.perf_counter()
with warnings.catch_warnings():
    warnings.simplefilter("ignore")
    for key, group in groups:
        x = group.sort_values("t")["v"].to_numpy()
        adfuller(x, autolag="AIC")
        kpss(x, regression="c", nlags="auto")
elapsed = time.perf_counter() - start
print(elapsed / groups.ngroups)
`

// referenceLoop runs referenceScript with Debian's /usr/bin/python3 on
// cfg.Reference groups and extrapolates per group to all of them.
func referenceLoop(ctx context.Context, cfg Config, file string) (Result, error) {
	script := filepath.Join(cfg.Dir, "reference_loop.py")
	if err := os.WriteFile(script, []byte(referenceScript), 0o644); err != nil {
		return Result{}, err
	}
	sample := filepath.Join(cfg.Dir, fmt.Sprintf("reference_%d_%d.csv", cfg.Reference, cfg.Length))
	if err := exportGroups(ctx, file, sample, cfg.Reference); err != nil {
		return Result{}, err
	}
	repeats := max(cfg.Repeats, 1)
	var perGroups []float64
	var rss int64
	for range repeats {
		_, r, out, err := Measure(ctx, []string{"/usr/bin/python3", script, sample})
		if err != nil {
			return Result{}, err
		}
		perGroup, err := strconv.ParseFloat(strings.TrimSpace(out), 64)
		if err != nil {
			return Result{}, fmt.Errorf("reference loop printed %q", out)
		}
		perGroups = append(perGroups, perGroup)
		rss = max(rss, r)
	}
	slices.Sort(perGroups)
	perGroup := perGroups[len(perGroups)/2]
	note := fmt.Sprintf("(extrapolated from %d groups, %.2f ms per group; one core", cfg.Reference, perGroup*1000)
	if repeats > 1 {
		note += fmt.Sprintf("; median of %d runs: %.2f-%.2f ms", repeats, perGroups[0]*1000, perGroups[len(perGroups)-1]*1000)
	}
	return Result{
		Phase:   "statsmodels adfuller+kpss loop",
		Wall:    time.Duration(perGroup * float64(cfg.Groups) * float64(time.Second)),
		PeakRSS: rss,
		Groups:  cfg.Groups,
		Note:    note + ")",
	}, nil
}

// exportGroups writes the first k groups of file to a CSV file.
func exportGroups(ctx context.Context, file, csv string, k int) error {
	db, err := udf.Open(ctx, udf.Options{})
	if err != nil {
		return err
	}
	defer db.Close()
	q := fmt.Sprintf("COPY (SELECT g, t, v FROM %s WHERE g < %d ORDER BY g, t) TO %s (HEADER)",
		udf.QuoteLiteral(file), k, udf.QuoteLiteral(csv))
	_, err = db.ExecContext(ctx, q)
	return err
}
