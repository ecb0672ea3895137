# Reference values from Debian's r-cran-forecast 8.20 (R 4.2.2) on open
# datasets shipped with R: Guerrero's (1993) Box-Cox lambda searched over
# plumb's range [-1, 2] (passed explicitly), and the OCSB
# seasonal unit-root test (ocsb.test with its defaults: its statistic and 5%
# critical value; the statistic below the critical value rejects a seasonal
# unit root). Run by regenerate.sh; writes conditions_r.csv. Check values only.
suppressMessages(library(forecast))
args <- commandArgs(trailingOnly = TRUE)
dir <- if (length(args) > 0) args[1] else "."
stopifnot(as.character(packageVersion("forecast")) == "8.20")
g <- function(v) sprintf("%.17g", v)
rows <- list()
add <- function(check, series, option, value) rows[[length(rows) + 1]] <<- data.frame(check, series, option, value = g(value))
for (s in list(list("airpassengers", AirPassengers), list("ukdriverdeaths", UKDriverDeaths),
               list("nottem_plus_10", nottem + 10), list("lynx", lynx))) {
  x <- s[[2]]
  add("guerrero_lambda", s[[1]], frequency(x), BoxCox.lambda(x, method = "guerrero", lower = -1, upper = 2))
}
for (s in list(list("nottem", nottem), list("co2", co2))) {
  r <- ocsb.test(s[[2]])
  add("ocsb_statistic", s[[1]], frequency(s[[2]]), r$statistics)
  add("ocsb_critical_value", s[[1]], frequency(s[[2]]), r$critical)
}
out <- do.call(rbind, rows)
write.csv(out, file.path(dir, "conditions_r.csv"), row.names = FALSE, quote = FALSE)
