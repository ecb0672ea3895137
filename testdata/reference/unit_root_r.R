# Reference values for plumb's Phillips-Perron and DF-GLS tests from Debian's
# r-cran-urca 1.3-3 and r-cran-tseries 0.10-53 (R 4.2.2). Run by regenerate.sh
# after unit_root_statsmodels.py; reads the series from the CSV files beside
# it and writes unit_root_r.csv with plumb's column names (deterministic level
# or level_and_slope for urca's model "constant" or "trend"; cutoff_01,
# cutoff_05, cutoff_10 the critical values at 1%, 5% and 10%). Check values only.
suppressMessages({ library(urca); library(tseries) })
args <- commandArgs(trailingOnly = TRUE)
dir <- if (length(args) > 0) args[1] else "."
stopifnot(as.character(packageVersion("urca")) == "1.3.3",
          as.character(packageVersion("tseries")) == "0.10.53")
read_long <- function(f) {
  d <- read.csv(file.path(dir, f), stringsAsFactors = FALSE)
  split(d$value, factor(d$dataset, levels = unique(d$dataset)))
}
series <- c(read_long("datasets_r.csv"), read_long("datasets_statsmodels.csv"), read_long("simulated.csv"))
g <- function(v) sprintf("%.17g", v)
terms <- c(constant = "level", trend = "level_and_slope")
rows <- list()
add <- function(...) rows[[length(rows) + 1]] <<- data.frame(..., stringsAsFactors = FALSE)
for (name in names(series)) {
  x <- series[[name]]
  n <- length(x)
  for (model in c("constant", "trend")) {
    for (l in unique(c(0, 2, trunc(4 * (n / 100)^0.25), trunc(12 * (n / 100)^0.25)))) {
      for (type in c("Z-tau", "Z-alpha")) {
        r <- ur.pp(x, type = type, model = model, use.lag = l)
        cv <- if (type == "Z-tau") r@cval else c(NA, NA, NA)
        add(series = name, test = paste0("pp_", ifelse(type == "Z-tau", "tau", "alpha")), deterministic = terms[[model]],
            lags = l, statistic = g(r@teststat), p_value = "", cutoff_01 = g(cv[1]), cutoff_05 = g(cv[2]), cutoff_10 = g(cv[3]))
      }
    }
    for (k in unique(c(1, 4, trunc(4 * (n / 100)^0.25)))) {
      if (n < 50) next
      r <- ur.ers(x, type = "DF-GLS", model = model, lag.max = k)
      add(series = name, test = "dfgls", deterministic = terms[[model]], lags = k, statistic = g(r@teststat), p_value = "",
          cutoff_01 = g(r@cval[1]), cutoff_05 = g(r@cval[2]), cutoff_10 = g(r@cval[3]))
    }
  }
  # tseries: always a level and a slope; truncation lag trunc(4 (n/100)^0.25) (lshort = TRUE).
  r <- suppressWarnings(pp.test(x, type = "Z(t_alpha)", lshort = TRUE))
  add(series = name, test = "pp_tau_tseries", deterministic = "level_and_slope", lags = r$parameter, statistic = g(r$statistic),
      p_value = g(r$p.value), cutoff_01 = "", cutoff_05 = "", cutoff_10 = "")
  r <- suppressWarnings(kpss.test(x, null = "Level", lshort = TRUE))
  add(series = name, test = "kpss_tseries", deterministic = "level", lags = r$parameter, statistic = g(r$statistic),
      p_value = g(r$p.value), cutoff_01 = "", cutoff_05 = "", cutoff_10 = "")
}
out <- do.call(rbind, rows)
write.csv(out, file.path(dir, "unit_root_r.csv"), row.names = FALSE, quote = FALSE)
