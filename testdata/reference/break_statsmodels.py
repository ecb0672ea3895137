"""Reference values for plumb's Zivot-Andrews test from python3-statsmodels 0.13.5.

Run with Debian's /usr/bin/python3 by regenerate.sh, after export_datasets.R and
unit_root_statsmodels.py (it reads datasets_r.csv, datasets_statsmodels.csv and
simulated.csv from the output folder). It writes
  break_simulated.csv   100 seeded series with one planted break (numpy
                        default_rng), long format, rounded to six decimals so
                        that both sides read exactly the same numbers
  break_statsmodels.csv zivot_andrews on R's datasets, log realgdp, every other
                        series of simulated.csv and every series above
Columns of break_statsmodels.csv (plumb's names): series; kind (what breaks:
level, slope, level_and_slope; statsmodels' regression "c", "t", "ct"); trim;
lag_rule (aic, bic, drop_insignificant: statsmodels' autolag "AIC", "BIC",
"t-stat"; given: autolag None); max_lag (always passed explicitly: plumb's
default min(floor(12 (T/100)^(1/4)), T//2 - 3, (T - 6)//2) for the automatic
rules); statistic; p_value; lags (statsmodels' baselag); break_index
(statsmodels' break index, unconverted); cutoff_01, cutoff_05, cutoff_10 (the
critical values at 1%, 5% and 10%). A statistic "failed" means statsmodels
raised an error or returned NaN (see run below).

statsmodels cannot run with maxlag=0 (it treats 0 as "use the default"), so
given lags start at 1. Check values only: plumb computes its own and its tests
compare.
"""
import csv
import os
import sys
import warnings

# One BLAS thread: with OpenBLAS's default (a thread per core) the last digits
# of 312 of the 3,243 rows changed, so the output would depend on the machine.
os.environ["OPENBLAS_NUM_THREADS"] = "1"
import numpy as np  # noqa: E402 (after the thread setting)
import statsmodels  # noqa: E402
from statsmodels.tsa.stattools import zivot_andrews  # noqa: E402

from long_csv import read_long, write_long  # noqa: E402

out = sys.argv[1] if len(sys.argv) > 1 else "."
assert statsmodels.__version__.startswith("0.13.5"), statsmodels.__version__




def ar1(rng, n, phi):
    e = rng.standard_normal(n + 50)
    x = np.zeros_like(e)
    for t in range(1, len(e)):
        x[t] = phi * x[t - 1] + e[t]
    return x[50:]


def simulate():
    """100 series of length 80 to 800 with one break at a fraction in (0.2, 0.8):
    a level shift in an AR(1), a change of slope in a trend plus AR(1), both at
    once, a level shift in a random walk, and a plain random walk (no break)."""
    rng = np.random.default_rng(20261212)
    named = []
    for i in range(100):
        n = int(rng.integers(80, 801))
        b = int(rng.uniform(0.2, 0.8) * n)
        t = np.arange(n)
        kind = i % 5
        phi = rng.uniform(0.2, 0.8)
        size = rng.uniform(2, 6)
        if kind == 0:
            x = ar1(rng, n, phi) + size / np.sqrt(1 - phi ** 2) * (t >= b)
        elif kind == 1:
            x = ar1(rng, n, phi) + 0.02 * t + rng.uniform(0.02, 0.08) * np.maximum(0, t - b + 1)
        elif kind == 2:
            x = ar1(rng, n, phi) + 0.02 * t + size * (t >= b) - 0.03 * np.maximum(0, t - b + 1)
        elif kind == 3:
            x = np.cumsum(rng.standard_normal(n)) + 3 * size * (t >= b)
        else:
            x = np.cumsum(rng.standard_normal(n))
        named.append(("brk%03d" % i, np.round(x * 10, 6)))
    return named


def default_max_lag(T):
    return min(int(np.floor(12 * (T / 100) ** 0.25)), T // 2 - 3, (T - 6) // 2)


def fmt(v):
    return repr(float(v))


rows = []


# Cases on the edge of statsmodels' failure: whether its regression at the
# earliest candidate dates raises LinAlgError (or gives NaN) depends on the
# LAPACK build and CPU that numpy loads. Under Debian 12's reference LAPACK
# the first two failed and the third gave a value; under its OpenBLAS the
# first two gave a value and the third failed. They are written as "failed"
# on every machine, so that the output does not depend on which is loaded
# (plumb's test still requires a result from plumb on each).
LAPACK_DEPENDENT = {
    ("sim068", "level", 0.15, "aic"),
    ("sim068", "level", 0.15, "drop_insignificant"),
    ("log_airpassengers", "level", 0.05, "aic"),
}


def run(name, x, brk, reg, trim, rule, autolag, maxlag):
    if (name, brk, trim, rule) in LAPACK_DEPENDENT:
        rows.append([name, brk, trim, rule, maxlag, "failed", "", "", "", "", "", ""])
        return
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        try:
            stat, p, crit, lags, break_index = zivot_andrews(x, trim=trim, maxlag=maxlag, regression=reg, autolag=autolag)
        except (np.linalg.LinAlgError, ValueError):
            # statsmodels fails when a candidate date lies before the
            # regression sample starts (a break column constant or linear over
            # the sample: numpy's LinAlgError, or a ValueError while it builds
            # the column). plumb skips such dates.
            rows.append([name, brk, trim, rule, maxlag, "failed", "", "", "", "", "", ""])
            return
    if not np.isfinite(stat):
        # The same cause can give NaN instead of an error.
        rows.append([name, brk, trim, rule, maxlag, "failed", "", "", "", "", "", ""])
        return
    rows.append([name, brk, trim, rule, maxlag, fmt(stat), fmt(p), lags, break_index,
                 fmt(crit["1%"]), fmt(crit["5%"]), fmt(crit["10%"])])


breaks = write_long(out + "/break_simulated.csv", simulate())
datasets = read_long(out + "/datasets_r.csv") + read_long(out + "/datasets_statsmodels.csv")
sims = read_long(out + "/simulated.csv")[::2] + read_long(out + "/break_simulated.csv")

for name, x in datasets + sims:
    T = len(x)
    mx = default_max_lag(T)
    for reg, brk in (("c", "level"), ("t", "slope"), ("ct", "level_and_slope")):
        for rule, autolag in (("aic", "AIC"), ("bic", "BIC"), ("drop_insignificant", "t-stat")):
            run(name, x, brk, reg, 0.15, rule, autolag, mx)
        for k in (1, 4):
            run(name, x, brk, reg, 0.15, "given", None, k)
for name, x in datasets:
    mx = default_max_lag(len(x))
    for reg, brk in (("c", "level"), ("t", "slope"), ("ct", "level_and_slope")):
        for trim in (0.05, 0.10, 0.25, 0.30):
            run(name, x, brk, reg, trim, "aic", "AIC", mx)

with open(out + "/break_statsmodels.csv", "w", newline="") as f:
    w = csv.writer(f)
    w.writerow(["series", "kind", "trim", "lag_rule", "max_lag", "statistic", "p_value", "lags", "break_index",
                "cutoff_01", "cutoff_05", "cutoff_10"])
    w.writerows(rows)
