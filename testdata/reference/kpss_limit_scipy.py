"""Reference values for the asymptotic distribution of plumb's KPSS statistic.

Run with Debian's /usr/bin/python3 by regenerate.sh. Under level
stationarity the KPSS statistic converges to the integral of a squared
Brownian bridge, which is the limit of the Cramer-von Mises statistic.
scipy 1.10.1 (Debian's python3-scipy, installed with python3-statsmodels)
computes that limit's distribution function by the series of Csorgo &
Faraway (1996, eq. 1.2), a method independent of the one plumb uses
(Smirnov's formula, stats/unitroot/kpss_limit.go). It writes
  kpss_limit_scipy.csv  statistic, P(limit > statistic)
on a grid where scipy's series is accurate (it stops adding terms below
1e-7 and warns that it is not accurate above about 4). The values are check
values only: plumb computes its own and its tests compare.
"""
import csv
import sys

import numpy as np
import scipy
from scipy.stats._hypotests import _cdf_cvm_inf

out = sys.argv[1] if len(sys.argv) > 1 else "."
assert scipy.__version__.startswith("1.10.1"), scipy.__version__

grid = [round(float(x), 4) for x in np.arange(0.02, 0.2, 0.01)] + \
       [round(float(x), 4) for x in np.arange(0.2, 3.0001, 0.05)] + \
       [0.3473, 0.46136, 0.58062, 0.74346]
with open(out + "/kpss_limit_scipy.csv", "w", newline="") as f:
    w = csv.writer(f)
    w.writerow(["statistic", "p_value"])
    for x in sorted(set(grid)):
        w.writerow([repr(x), repr(float(1 - _cdf_cvm_inf(x)))])
