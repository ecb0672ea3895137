"""Reference values for plumb's autoregressive fits and forecasts from
python3-statsmodels 0.13.5. Run with Debian's /usr/bin/python3 by
regenerate.sh after export_datasets.R and unit_root_statsmodels.py; writes
forecast_statsmodels.csv with columns
  check, case, dataset, lambda, d, D, s, order, index, value.
Check values only: plumb computes its own and stats/forecast/forecast_reference_test.go
compares.

Every case but one is an open dataset with a recipe; near_sine is a sine
wave of period 12 and amplitude 10 plus seeded normal noise of standard
deviation 0.01 (numpy default_rng(20260715), 240 values, written to the file
as "series" rows), whose lagged columns are nearly dependent: it exercises
plumb's QR fallback. A recipe is an optional Box-Cox transform
(lambda; "none" for no transform), then D seasonal differences at lag s and d
plain differences. z is the series after Box-Cox, w its differences.

  ar_*            AutoReg(w, lags=order, trend="c") fitted by OLS on its own
                  longest sample (the first `order` values of w are conditioned on)
  select_*        ar_select_order(w, maxlag=order, ic=..., trend="c"): every order
                  0..maxlag on the common sample that drops the first maxlag values
  fc_*            SARIMAX(z, order=(p, d, 0), seasonal_order=(0, D, 0, s), trend="c")
                  filtered at the AutoReg fit's parameters (intercept = AutoReg's
                  constant, ar.L1.. = its coefficients, sigma2 = its sigma2), with
                  p the order ar_select_order chose at maxlag 12; forecasts 24 steps
"""
import csv
import sys

import numpy as np
import statsmodels
from statsmodels.tsa.ar_model import AutoReg, ar_select_order
from statsmodels.tsa.statespace.sarimax import SARIMAX

from long_csv import read_long

out = sys.argv[1] if len(sys.argv) > 1 else "."
assert statsmodels.__version__.startswith("0.13.5"), statsmodels.__version__

series = dict(read_long(out + "/datasets_r.csv") + read_long(out + "/datasets_statsmodels.csv"))

rng = np.random.default_rng(20260715)
t = np.arange(240)
series["near_sine"] = list(10 * np.sin(2 * np.pi * t / 12) + 0.01 * rng.standard_normal(240))

# case, dataset, lambda (None: no Box-Cox), d, D, s
CASES = [
    ("nile_d1", "nile", None, 1, 0, 0),
    ("lakehuron_d1", "lakehuron", None, 1, 0, 0),
    ("lakehuron_d2", "lakehuron", None, 2, 0, 0),
    ("lynx_log", "lynx", 0.0, 0, 0, 0),
    ("sunspot_year", "sunspot_year", None, 0, 0, 0),
    ("log_realgdp_d1", "log_realgdp", None, 1, 0, 0),
    ("nottem_D12", "nottem", None, 0, 1, 12),
    ("ukdriverdeaths_bc_D12", "ukdriverdeaths", -0.5, 0, 1, 12),
    ("airpassengers_log_d1_D12", "log_airpassengers", 0.0, 1, 1, 12),
    ("co2_d1_D12", "co2", None, 1, 1, 12),
    ("co2_bc_d1_D12", "co2", 0.5, 1, 1, 12),
    ("near_sine", "near_sine", None, 0, 0, 0),
]
FIXED_ORDERS = range(0, 5)
SELECT_MAXLAGS = (4, 12)
FORECAST_MAXLAG = 12
HORIZON = 24
COVERAGES = (0.95, 0.80)


def box_cox(x, lam):
    if lam is None:
        return x
    if lam == 0:
        return np.log(x)
    return (x ** lam - 1) / lam


def inverse_box_cox(y, lam):
    if lam is None:
        return y
    if lam == 0:
        return np.exp(y)
    return (lam * y + 1) ** (1 / lam)


def difference(z, d, D, s):
    w = np.asarray(z, dtype=float)
    for _ in range(D):
        w = w[s:] - w[:-s]
    for _ in range(d):
        w = w[1:] - w[:-1]
    return w


rows = []
for case, dataset, lam, d, D, s in CASES:
    x = np.asarray(series[dataset])
    if dataset == "log_airpassengers":
        x = np.exp(x)  # the file holds log(AirPassengers); the recipe takes logs again
    z = box_cox(x, lam)
    w = difference(z, d, D, s)
    lam_text = "none" if lam is None else repr(lam)

    def emit(check, order, index, value):
        rows.append([check, case, dataset, lam_text, d, D, s, order, index, repr(float(value))])

    if dataset == "near_sine":
        for i, v in enumerate(x):
            emit("series", 0, i, v)

    def fit(order):
        return AutoReg(w, lags=order, trend="c", old_names=False).fit()

    for order in FIXED_ORDERS:
        r = fit(order)
        for i, v in enumerate(r.params):  # constant first, then lags 1..order
            emit("ar_param", order, i, v)
        emit("ar_sigma2", order, 0, r.sigma2)
        emit("ar_observations", order, 0, r.nobs)
        emit("ar_aic", order, 0, r.aic)
        emit("ar_bic", order, 0, r.bic)

    for maxlag in SELECT_MAXLAGS:
        for ic in ("aic", "bic"):
            sel = ar_select_order(w, maxlag=maxlag, ic=ic, trend="c", old_names=False)
            lags = sel.ar_lags or []
            emit("select_" + ic + "_order", maxlag, 0, len(lags))
            values = sel.aic if ic == "aic" else sel.bic
            for key, v in values.items():
                k = 0 if key == 0 else len(key)
                emit("select_" + ic + "_value", maxlag, k, v)

    sel = ar_select_order(w, maxlag=FORECAST_MAXLAG, ic="aic", trend="c", old_names=False)
    p = len(sel.ar_lags or [])
    r = fit(p)
    for i, v in enumerate(r.resid):
        emit("ar_resid", p, i, v)
    params = np.concatenate([r.params, [r.sigma2]])
    model = SARIMAX(z, order=(p, d, 0), seasonal_order=(0, D, 0, s if D else 0), trend="c")
    res = model.filter(params)
    fc = res.get_forecast(HORIZON)
    mean = np.asarray(fc.predicted_mean)
    se = np.asarray(fc.se_mean)
    for h in range(HORIZON):
        emit("fc_z_mean", p, h + 1, mean[h])
        emit("fc_z_se", p, h + 1, se[h])
        emit("fc_median", p, h + 1, inverse_box_cox(mean[h], lam))
    for cov in COVERAGES:
        bounds = np.asarray(fc.conf_int(alpha=1 - cov))
        tag = "%02d" % round(cov * 100)
        for h in range(HORIZON):
            emit("fc_lower_" + tag, p, h + 1, inverse_box_cox(bounds[h, 0], lam))
            emit("fc_upper_" + tag, p, h + 1, inverse_box_cox(bounds[h, 1], lam))

with open(out + "/forecast_statsmodels.csv", "w", newline="") as f:
    wr = csv.writer(f)
    wr.writerow(["check", "case", "dataset", "lambda", "d", "D", "s", "order", "index", "value"])
    wr.writerows(rows)
