# Reference values for plumb's differencing from R's own diff() (Debian's
# r-base-core 4.2.2) on open datasets shipped with R, read back from
# datasets_r.csv (written by export_datasets.R) so both sides difference the
# same numbers. Run by regenerate.sh after export_datasets.R; writes
# difference_r.csv with columns series, lag, times (R's diff arguments lag and
# differences), index (1-based position in the differenced series), value.
# Check values only.
args <- commandArgs(trailingOnly = TRUE)
dir <- if (length(args) > 0) args[1] else "."
d <- read.csv(file.path(dir, "datasets_r.csv"), stringsAsFactors = FALSE)
series <- split(d$value, factor(d$dataset, levels = unique(d$dataset)))
g <- function(v) sprintf("%.17g", v)
cases <- list(
  list("nile", 1, 1), list("lynx", 1, 2), list("lakehuron", 3, 1),
  list("ukdriverdeaths", 12, 1), list("nottem", 12, 2), list("co2", 12, 1),
  list("log_airpassengers", 1, 3), list("sunspot_year", 11, 2)
)
rows <- do.call(rbind, lapply(cases, function(c) {
  v <- diff(series[[c[[1]]]], lag = c[[2]], differences = c[[3]])
  data.frame(series = c[[1]], lag = c[[2]], times = c[[3]], index = seq_along(v), value = g(v))
}))
write.csv(rows, file.path(dir, "difference_r.csv"), row.names = FALSE, quote = FALSE)
