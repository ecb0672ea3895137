"""Reading and writing the long CSV format the reference scripts share.

A long file has the columns dataset, t, value: one row per observation,
the series in file order. Imported by the reference scripts in this
folder (Python puts a script's own folder first on its path).
"""
import csv

import numpy as np


def read_long(path):
    """Returns [(dataset, values as a numpy array)] of a long file, in file order."""
    named = {}
    with open(path) as f:
        for row in csv.DictReader(f):
            named.setdefault(row["dataset"].strip(), []).append(float(row["value"]))
    return [(k, np.array(v)) for k, v in named.items()]


def write_long(path, named):
    """Writes [(dataset, values)] as a long file, values in full precision."""
    with open(path, "w", newline="") as f:
        w = csv.writer(f)
        w.writerow(["dataset", "t", "value"])
        for name, x in named:
            for i, v in enumerate(x, 1):
                w.writerow([name, i, repr(float(v))])
