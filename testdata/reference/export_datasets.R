# Exports open datasets shipped with Debian's R (r-base-core 4.2.2, package
# "datasets") to datasets_r.csv, long format: dataset, t, value.
# Run by regenerate.sh; the output is committed so the Go tests need no R.
args <- commandArgs(trailingOnly = TRUE)
out <- if (length(args) > 0) args[1] else "datasets_r.csv"
series <- list(
  nile = as.numeric(Nile),
  lakehuron = as.numeric(LakeHuron),
  lynx = as.numeric(lynx),
  log_airpassengers = log(as.numeric(AirPassengers)),
  ukdriverdeaths = as.numeric(UKDriverDeaths),
  nottem = as.numeric(nottem),
  co2 = as.numeric(co2),
  sunspot_year = as.numeric(sunspot.year)
)
rows <- do.call(rbind, lapply(names(series), function(n) {
  data.frame(dataset = n, t = seq_along(series[[n]]), value = series[[n]])
}))
rows$value <- sprintf("%.17g", rows$value)
write.csv(rows, out, row.names = FALSE, quote = FALSE)
