"""Reference values for plumb's unit-root tests from python3-statsmodels 0.13.5.

Run with Debian's /usr/bin/python3 by regenerate.sh. It writes
  datasets_statsmodels.csv  statsmodels' bundled macrodata realgdp (log), long format
  simulated.csv             200 seeded simulated series (numpy default_rng), long format
  unit_root_statsmodels.csv adfuller and kpss on every series above and in datasets_r.csv
Columns carry plumb's names: deterministic none, level, level_and_slope
(statsmodels' regression "n", "c", "ct"); lag_rule aic, bic,
drop_insignificant, given (adfuller's autolag "AIC", "BIC", "t-stat", None;
for kpss auto or given nlags); cutoff_01, cutoff_05, cutoff_10 (the critical
values at 1%, 5% and 10%).
Values are check values only: plumb computes its own and its tests compare.
"""
import csv
import sys
import warnings

import numpy as np
import statsmodels
from statsmodels.datasets import macrodata
from statsmodels.tsa.stattools import adfuller, kpss

from long_csv import read_long, write_long

out = sys.argv[1] if len(sys.argv) > 1 else "."
assert statsmodels.__version__.startswith("0.13.5"), statsmodels.__version__



def simulate():
    """200 series: random walks, AR(1) with phi in (0.2, 0.95), trend plus AR(1),
    and random walks with drift, lengths 40 to 600; rounded to 6 decimals so that
    both sides read exactly the same numbers."""
    rng = np.random.default_rng(20261201)
    named = []
    for i in range(200):
        n = int(rng.integers(40, 601))
        e = rng.standard_normal(n + 50)
        kind = i % 4
        if kind == 0:
            x = np.cumsum(e)
        elif kind == 1:
            phi = rng.uniform(0.2, 0.95)
            x = np.zeros_like(e)
            for t in range(1, len(e)):
                x[t] = phi * x[t - 1] + e[t]
        elif kind == 2:
            phi = rng.uniform(0.2, 0.8)
            x = np.zeros_like(e)
            for t in range(1, len(e)):
                x[t] = phi * x[t - 1] + e[t]
            x = x + 0.05 * np.arange(len(e))
        else:
            x = np.cumsum(e + 0.1)
        named.append(("sim%03d" % i, np.round(x[50:] * 10, 6)))
    return named


macro = macrodata.load_pandas().data
realgdp = [("log_realgdp", np.log(macro["realgdp"].values))]
write_long(out + "/datasets_statsmodels.csv", realgdp)
sims = simulate()
write_long(out + "/simulated.csv", sims)

series = read_long(out + "/datasets_r.csv") + realgdp + sims


def fmt(v):
    return "" if v is None else repr(float(v))


rows = []
for name, x in series:
    T = len(x)
    schwert = int(np.floor(12 * (T / 100) ** 0.25))
    for reg, det in (("n", "none"), ("c", "level"), ("ct", "level_and_slope")):
        maxlag = min(schwert, T // 2 - {"n": 0, "c": 1, "ct": 2}[reg] - 1)
        for rule, autolag in (("aic", "AIC"), ("bic", "BIC"), ("drop_insignificant", "t-stat")):
            r = adfuller(x, maxlag=maxlag, regression=reg, autolag=autolag)
            rows.append([name, "adf", det, rule, maxlag, fmt(r[0]), fmt(r[1]), r[2], r[3],
                         fmt(r[4]["1%"]), fmt(r[4]["5%"]), fmt(r[4]["10%"])])
        for k in sorted({0, 1, 4, maxlag}):
            r = adfuller(x, maxlag=k, regression=reg, autolag=None)
            rows.append([name, "adf", det, "given", k, fmt(r[0]), fmt(r[1]), r[2], r[3],
                         fmt(r[4]["1%"]), fmt(r[4]["5%"]), fmt(r[4]["10%"])])
    for reg, det in (("c", "level"), ("ct", "level_and_slope")):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            for nlags in ("auto", 0, 4, 12):
                if nlags != "auto" and nlags >= T:
                    continue
                stat, p, lags, crit = kpss(x, regression=reg, nlags=nlags)
                rows.append([name, "kpss", det, "auto" if nlags == "auto" else "given", nlags if nlags != "auto" else "",
                             fmt(stat), fmt(p), lags, T, fmt(crit["1%"]), fmt(crit["5%"]), fmt(crit["10%"])])

with open(out + "/unit_root_statsmodels.csv", "w", newline="") as f:
    w = csv.writer(f)
    w.writerow(["series", "test", "deterministic", "lag_rule", "max_lag", "statistic", "p_value",
                "lags", "observations", "cutoff_01", "cutoff_05", "cutoff_10"])
    w.writerows(rows)

# MacKinnon (1994) p-values at a grid of statistics, for the p-value machinery.
with open(out + "/mackinnon_p_statsmodels.csv", "w", newline="") as f:
    from statsmodels.tsa.adfvalues import mackinnonp, mackinnoncrit
    w = csv.writer(f)
    w.writerow(["deterministic", "statistic", "p_value"])
    for reg, det in (("n", "none"), ("c", "level"), ("ct", "level_and_slope")):
        for s in np.arange(-20, 3.01, 0.25):
            w.writerow([det, repr(float(s)), repr(float(mackinnonp(s, regression=reg)))])
    w.writerow([])
with open(out + "/mackinnon_crit_statsmodels.csv", "w", newline="") as f:
    w = csv.writer(f)
    w.writerow(["deterministic", "observations", "cutoff_01", "cutoff_05", "cutoff_10"])
    for reg, det in (("n", "none"), ("c", "level"), ("ct", "level_and_slope")):
        for T in (25, 50, 100, 250, 500, "inf"):
            c = mackinnoncrit(N=1, regression=reg, nobs=np.inf if T == "inf" else T)
            w.writerow([det, T, repr(float(c[0])), repr(float(c[1])), repr(float(c[2]))])
