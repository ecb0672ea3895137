"""Which of statsmodels' KPSS p-values are only a table's end.

Run with Debian's /usr/bin/python3 by regenerate.sh, after
unit_root_statsmodels.py (it reads the series that script writes).
python3-statsmodels 0.13.5's kpss interpolates its p-value in KPSS (1992)
Table 1 and, when the statistic lies beyond the table, returns the table's
end (0.01 or 0.1) with an InterpolationWarning. This script records, for
every kpss case of unit_root_statsmodels.csv, whether that happened:
  kpss_table_end_statsmodels.csv  series, deterministic, lag_rule, max_lag,
                                  table_end (at_most, at_least or empty)
It holds no floating-point digits, so its output does not depend on the
BLAS library numpy happens to use. Check values only: plumb computes its
own p-values and its tests compare.
"""
import csv
import sys
import warnings

import statsmodels
from statsmodels.tools.sm_exceptions import InterpolationWarning
from statsmodels.tsa.stattools import kpss

out = sys.argv[1] if len(sys.argv) > 1 else "."
assert statsmodels.__version__.startswith("0.13.5"), statsmodels.__version__


def read_long(path):
    named = {}
    with open(path) as f:
        for row in csv.DictReader(f):
            named.setdefault(row["dataset"].strip(), []).append(float(row["value"]))
    return list(named.items())


series = read_long(out + "/datasets_r.csv") + read_long(out + "/datasets_statsmodels.csv") + \
    read_long(out + "/simulated.csv")
rows = []
for name, x in series:
    T = len(x)
    for reg, det in (("c", "level"), ("ct", "level_and_slope")):
        for nlags in ("auto", 0, 4, 12):
            if nlags != "auto" and nlags >= T:
                continue
            with warnings.catch_warnings(record=True) as caught:
                warnings.simplefilter("always")
                _, p, _, _ = kpss(x, regression=reg, nlags=nlags)
            beyond = any(issubclass(c.category, InterpolationWarning) for c in caught)
            end = ("at_most" if p <= 0.01 else "at_least") if beyond else ""
            rows.append([name, det, "auto" if nlags == "auto" else "given", nlags if nlags != "auto" else "", end])

with open(out + "/kpss_table_end_statsmodels.csv", "w", newline="") as f:
    w = csv.writer(f)
    w.writerow(["series", "deterministic", "lag_rule", "max_lag", "table_end"])
    w.writerows(rows)
