"""Reference values for plumb's exact-likelihood ARMA fits and forecasts
(stats/forecast/arma_*.go) from python3-statsmodels 0.13.5. Run with Debian's
/usr/bin/python3 by regenerate.sh after export_arma_datasets.R; writes
arma_statsmodels.csv with columns
  case, dataset, log, p, d, q, P, D, Q, s, mean, check, index, value.
Check values only: plumb computes its own and stats/forecast/arma_reference_test.go
compares.

Each case is an open dataset of Debian's R (datasets_arma_r.csv), optionally
logged (log = 1), and an order. z is the (logged) series, w = (1-B)^d
(1-B^s)^D z its stationary part.

  fit:      SARIMAX(z, order=(p, d, q), seasonal_order=(P, D, Q, s),
            trend="c" if mean else "n", simple_differencing=True,
            enforce_stationarity=True, enforce_invertibility=True,
            concentrate_scale=True), fitted by method="nm" (xtol=1e-12,
            ftol=1e-14) and then method="lbfgs" (pgtol=1e-12, factr=10)
            from Nelder-Mead's result: the exact Gaussian likelihood of w
            from the stationary initial covariance, σ² concentrated out.
            lbfgs alone from statsmodels' start stopped short of the
            optimum on LakeHuron (1,0,1) by 0.26 in log L; the two-stage
            fit reaches it (both fits warn that they stopped at their
            iteration limits while the likelihood no longer changed).
            Rows: loglik, sigma2 (its scale), constant (its intercept),
            mean (intercept / (φ(1)Φ(1))), ar, ma, seasonal_ar, seasonal_ma
            (index = lag number - 1, statsmodels' sign convention, which is
            plumb's: φ(B) = 1 - φ_1 B - ..., θ(B) = 1 + θ_1 B + ...).
  shrunk_loglik: the same model's loglike at the optimum's ARMA
            coefficients times 0.8 (the intercept kept): the likelihood away
            from any optimum, at parameters both sides hold exactly.
  forecast, lower, upper: 24 steps of z from SARIMAX(z, same orders and
            trend, simple_differencing=False, concentrate_scale=False)
            filtered at the fit's parameters with sigma2 = its scale
            (get_forecast(24).summary_frame(alpha=0.05)); its states for the
            differences start diffuse, so the forecasts condition on all of z.
"""
import csv
import sys
import warnings

import numpy as np
import statsmodels
from statsmodels.tsa.statespace.sarimax import SARIMAX

from long_csv import read_long

out = sys.argv[1] if len(sys.argv) > 1 else "."
assert statsmodels.__version__.startswith("0.13.5"), statsmodels.__version__

series = dict(read_long(out + "/datasets_arma_r.csv"))

# case, dataset, log, (p, d, q), (P, D, Q, s), mean
CASES = [
    ("lakehuron_101_mean", "lakehuron", 0, (1, 0, 1), (0, 0, 0, 0), 1),
    ("lakehuron_200_mean", "lakehuron", 0, (2, 0, 0), (0, 0, 0, 0), 1),
    ("nile_011", "nile", 0, (0, 1, 1), (0, 0, 0, 0), 0),
    ("nile_101_mean", "nile", 0, (1, 0, 1), (0, 0, 0, 0), 1),
    ("lh_101_mean", "lh", 0, (1, 0, 1), (0, 0, 0, 0), 1),
    ("sunspot_year_201_mean", "sunspot_year", 0, (2, 0, 1), (0, 0, 0, 0), 1),
    ("wwwusage_111", "wwwusage", 0, (1, 1, 1), (0, 0, 0, 0), 0),
    ("wwwusage_111_drift", "wwwusage", 0, (1, 1, 1), (0, 0, 0, 0), 1),
    ("ukgas_log_011_011_4", "ukgas", 1, (0, 1, 1), (0, 1, 1, 4), 0),
    ("ukgas_log_110_110_4", "ukgas", 1, (1, 1, 0), (1, 1, 0, 4), 0),
    ("airpassengers_log_011_011_12", "airpassengers", 1, (0, 1, 1), (0, 1, 1, 12), 0),
    ("airpassengers_log_210_100_12_drift", "airpassengers", 1, (2, 1, 0), (1, 0, 0, 12), 1),
]
HORIZON = 24

rows = []
for case, dataset, log, order, sorder, mean in CASES:
    z = np.log(series[dataset]) if log else series[dataset]
    trend = "c" if mean else "n"
    common = dict(order=order, seasonal_order=sorder, trend=trend,
                  enforce_stationarity=True, enforce_invertibility=True)
    model = SARIMAX(z, simple_differencing=True, concentrate_scale=True, **common)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        first = model.fit(method="nm", disp=False, maxiter=20000, xtol=1e-12, ftol=1e-14)
        res = model.fit(start_params=first.params, method="lbfgs", disp=False, maxiter=5000, pgtol=1e-12, factr=10)
    names = list(model.param_names)
    params = np.asarray(res.params)

    def block(prefix):
        return [params[i] for i, n in enumerate(names) if n.startswith(prefix)]

    ar, ma = block("ar.L"), block("ma.L")
    sar, sma = block("ar.S.L"), block("ma.S.L")
    c = params[names.index("intercept")] if mean else 0.0
    meanw = c / ((1 - sum(ar)) * (1 - sum(sar)))
    key = [case, dataset, log, order[0], order[1], order[2], sorder[0], sorder[1], sorder[2], sorder[3], mean]

    def put(check, values):
        for i, v in enumerate(np.atleast_1d(values)):
            rows.append(key + [check, i, repr(float(v))])

    put("loglik", res.llf)
    put("sigma2", res.scale)
    put("constant", c)
    put("mean", meanw)
    put("ar", ar)
    put("ma", ma)
    put("seasonal_ar", sar)
    put("seasonal_ma", sma)
    shrunk = params.copy()
    for i, n in enumerate(names):
        if n != "intercept":
            shrunk[i] *= 0.8
    put("shrunk_loglik", model.loglike(shrunk))

    level = SARIMAX(z, simple_differencing=False, concentrate_scale=False, **common)
    fres = level.filter(np.append(params, res.scale))
    frame = fres.get_forecast(HORIZON).summary_frame(alpha=0.05)
    put("forecast", frame["mean"])
    put("lower", frame["mean_ci_lower"])
    put("upper", frame["mean_ci_upper"])

with open(out + "/arma_statsmodels.csv", "w", newline="") as f:
    w = csv.writer(f)
    w.writerow(["case", "dataset", "log", "p", "d", "q", "P", "D", "Q", "s", "mean", "check", "index", "value"])
    w.writerows(rows)
