"""Reference values for plumb's white-noise, seasonality and multiple-testing
code from python3-statsmodels 0.13.5. Run with /usr/bin/python3 by
regenerate.sh after export_datasets.R; writes conditions_statsmodels.csv with
columns check, series, option, value. Check values only."""
import csv
import sys

import numpy as np
import statsmodels
from statsmodels.stats.diagnostic import acorr_ljungbox
from statsmodels.stats.multitest import multipletests
from statsmodels.tsa.seasonal import STL

from long_csv import read_long

out = sys.argv[1] if len(sys.argv) > 1 else "."
assert statsmodels.__version__.startswith("0.13.5"), statsmodels.__version__

series = dict(read_long(out + "/datasets_r.csv") + read_long(out + "/datasets_statsmodels.csv"))

rows = []
for name, x in series.items():
    x = np.asarray(x)
    for lags in (5, 10, 20):
        r = acorr_ljungbox(x, lags=[lags], return_df=True)
        rows.append(["ljung_box_q", name, lags, repr(float(r["lb_stat"].iloc[0]))])
        rows.append(["ljung_box_p", name, lags, repr(float(r["lb_pvalue"].iloc[0]))])
    # Ljung-Box of the first difference, with 2 fitted parameters.
    r = acorr_ljungbox(np.diff(x), lags=[10], model_df=2, return_df=True)
    rows.append(["ljung_box_diff_df2_p", name, 10, repr(float(r["lb_pvalue"].iloc[0]))])

for name in ("co2", "nottem", "ukdriverdeaths", "log_airpassengers"):
    x = np.asarray(series[name])
    for inner in (2, 5):
        r = STL(x, period=12, seasonal=7, robust=False,
                seasonal_jump=1, trend_jump=1, low_pass_jump=1).fit(inner_iter=inner, outer_iter=0)
        fs = max(0.0, 1 - np.var(r.resid, ddof=1) / np.var(r.seasonal + r.resid, ddof=1))
        ft = max(0.0, 1 - np.var(r.resid, ddof=1) / np.var(r.trend + r.resid, ddof=1))
        rows.append(["stl_seasonal_strength", name, inner, repr(float(fs))])
        rows.append(["stl_trend_strength", name, inner, repr(float(ft))])
        rows.append(["stl_seasonal_first", name, inner, repr(float(r.seasonal[0]))])
        rows.append(["stl_trend_last", name, inner, repr(float(r.trend[-1]))])

rng = np.random.default_rng(7)
p = np.concatenate([rng.uniform(0, 1, 40), rng.uniform(0, 0.01, 10)])
q = multipletests(p, method="fdr_bh")[1]
for i, (pi, qi) in enumerate(zip(p, q)):
    rows.append(["bh_p", "uniform_mix", i, repr(float(pi))])
    rows.append(["bh_q", "uniform_mix", i, repr(float(qi))])

with open(out + "/conditions_statsmodels.csv", "w", newline="") as fh:
    w = csv.writer(fh)
    w.writerow(["check", "series", "option", "value"])
    w.writerows(rows)
