# Reference values for plumb's Box-Cox lambda from Debian's r-cran-forecast
# 8.20 (R 4.2.2): Guerrero's (1993) method on open datasets shipped with R.
# Run by regenerate.sh; writes conditions_r.csv. Check values only.
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
  add("guerrero_lambda", s[[1]], frequency(x), BoxCox.lambda(x, method = "guerrero"))
}
out <- do.call(rbind, rows)
write.csv(out, file.path(dir, "conditions_r.csv"), row.names = FALSE, quote = FALSE)
