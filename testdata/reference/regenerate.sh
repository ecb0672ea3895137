#!/usr/bin/env bash
# Regenerates every reference value in this folder from Debian's packages:
#   r-base-core 4.2.2 (datasets, diff), r-cran-urca 1.3-3, r-cran-tseries 0.10-53,
#   r-cran-forecast 8.20,
#   python3-statsmodels 0.13.5 and python3-scipy 1.10.1 (run with
#   /usr/bin/python3; break_statsmodels.py reads what export_datasets.R and
#   unit_root_statsmodels.py wrote, arma_statsmodels.py what
#   export_arma_datasets.R wrote);
# and, with plain /usr/bin/python3, shard_keys.py (plumb's shard definition
# written again independently of the Go code).
# Usage: regenerate.sh [OUT_DIR]   (default: this folder)
# .ci/run writes into a temporary folder and compares it with the committed
# files value by value (compare.py).
set -euo pipefail
here=$(cd "$(dirname "$0")" && pwd)
out=${1:-$here}
mkdir -p "$out"
Rscript "$here/export_datasets.R" "$out/datasets_r.csv"
Rscript "$here/difference_r.R" "$out"
/usr/bin/python3 "$here/unit_root_statsmodels.py" "$out"
/usr/bin/python3 "$here/kpss_table_end_statsmodels.py" "$out"
/usr/bin/python3 "$here/kpss_limit_scipy.py" "$out"
Rscript "$here/unit_root_r.R" "$out"
/usr/bin/python3 "$here/conditions_statsmodels.py" "$out"
Rscript "$here/conditions_r.R" "$out"
/usr/bin/python3 "$here/forecast_statsmodels.py" "$out"
/usr/bin/python3 "$here/break_statsmodels.py" "$out"
Rscript "$here/export_arma_datasets.R" "$out/datasets_arma_r.csv"
OPENBLAS_NUM_THREADS=1 /usr/bin/python3 "$here/arma_statsmodels.py" "$out"
/usr/bin/python3 "$here/shard_keys.py" "$out"
