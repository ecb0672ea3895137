# Exports the open datasets the exact-likelihood ARMA checks use, shipped
# with Debian's R (r-base-core 4.2.2, package "datasets"), to
# datasets_arma_r.csv, long format: dataset, t, value (original units; the
# script arma_statsmodels.py applies each case's transform).
# A file of its own so that the scripts reading datasets_r.csv (every series
# in it) are unchanged. Run by regenerate.sh; the output is committed.
args <- commandArgs(trailingOnly = TRUE)
out <- if (length(args) > 0) args[1] else "datasets_arma_r.csv"
series <- list(
  lakehuron = as.numeric(LakeHuron),
  nile = as.numeric(Nile),
  lh = as.numeric(lh),
  ukgas = as.numeric(UKgas),
  airpassengers = as.numeric(AirPassengers),
  sunspot_year = as.numeric(sunspot.year),
  wwwusage = as.numeric(WWWusage)
)
rows <- do.call(rbind, lapply(names(series), function(n) {
  data.frame(dataset = n, t = seq_along(series[[n]]), value = series[[n]])
}))
rows$value <- sprintf("%.17g", rows$value)
write.csv(rows, out, row.names = FALSE, quote = FALSE)
