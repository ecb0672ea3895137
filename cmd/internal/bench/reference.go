package bench

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"
)

// referenceScript is the loop practitioners write today: read the same
// Parquet file, and for each group run python3-statsmodels' adfuller (AIC
// lag choice) and kpss. It times only the loop over groups, not the
// reading, and prints the seconds per group.
const referenceScript = `
import sys, time, warnings
import numpy as np
import pyarrow.parquet as pq
from statsmodels.tsa.stattools import adfuller, kpss
path, k = sys.argv[1], int(sys.argv[2])
table = pq.read_table(path, columns=["g", "t", "v"]).to_pandas()
groups = table.groupby("g")
keys = list(groups.groups.keys())[:k]
start = time.perf_counter()
with warnings.catch_warnings():
    warnings.simplefilter("ignore")
    for key in keys:
        x = groups.get_group(key).sort_values("t")["v"].to_numpy()
        adfuller(x, autolag="AIC")
        kpss(x, regression="c", nlags="auto")
elapsed = time.perf_counter() - start
print(elapsed / len(keys))
`

// referenceLoop runs referenceScript with Debian's /usr/bin/python3 on
// cfg.Reference groups and extrapolates per group to all of them.
func referenceLoop(ctx context.Context, cfg Config, file string) (Result, error) {
	script := filepath.Join(cfg.Dir, "reference_loop.py")
	if err := os.WriteFile(script, []byte(referenceScript), 0o644); err != nil {
		return Result{}, err
	}
	_, rss, out, err := Measure(ctx, []string{"/usr/bin/python3", script, file, strconv.Itoa(cfg.Reference)})
	if err != nil {
		return Result{}, err
	}
	perGroup, err := strconv.ParseFloat(strings.TrimSpace(out), 64)
	if err != nil {
		return Result{}, fmt.Errorf("reference loop printed %q", out)
	}
	return Result{
		Phase:   "statsmodels adfuller+kpss loop",
		Wall:    time.Duration(perGroup * float64(cfg.Groups) * float64(time.Second)),
		PeakRSS: rss,
		Groups:  cfg.Groups,
		Note:    fmt.Sprintf("(extrapolated from %d groups, %.2f ms per group; one core)", cfg.Reference, perGroup*1000),
	}, nil
}
