# RPostgreSQL 0.7 (Debian's r-cran-rpostgresql) against plumb serve:
# dbGetQuery of diagnose with list and json columns, without warnings, and
# dbWriteTable and back.
suppressPackageStartupMessages(library(RPostgreSQL))
env <- Sys.getenv
rows <- list()
check <- function(operation, fn) {
  warned <- character(0)
  result <- tryCatch(withCallingHandlers(fn(), warning = function(w) {
    warned <<- c(warned, conditionMessage(w))
    invokeRestart("muffleWarning")
  }), error = function(e) structure(conditionMessage(e), class = "failure"))
  if (inherits(result, "failure")) {
    rows[[length(rows) + 1]] <<- c(operation, "FAIL", paste("error:", result))
  } else if (length(warned) > 0) {
    rows[[length(rows) + 1]] <<- c(operation, "FAIL", paste("warning:", warned[1]))
  } else {
    rows[[length(rows) + 1]] <<- c(operation, "ok", paste(format(result), collapse = " "))
  }
}
expect <- function(got, want) {
  if (!identical(got, want)) stop(sprintf("got %s, want %s", deparse(got), deparse(want)))
  got
}
con <- dbConnect(PostgreSQL(), host = env("PLUMB_HOST"), port = as.integer(env("PLUMB_PORT")),
                 user = env("PLUMB_USER"), password = env("PLUMB_PASSWORD"), dbname = "plumb")
shops <- env("PLUMB_SHOPS")
check("dbGetQuery(diagnose) with list and json columns", function() {
  d <- dbGetQuery(con, sprintf("SELECT shop, product, rank, violations, {'a': 1} AS extra FROM diagnose('%s', by := ['shop', 'product'], at := 'day', value := 'units') ORDER BY rank", shops))
  expect(nrow(d), 12L)
  sprintf("%d rows; violations %s", nrow(d), class(d$violations))
})
check("dbWriteTable and back", function() {
  df <- data.frame(k = 1:3, x = c(1.5, NA, 3), s = c("a", NA, "c"), stringsAsFactors = FALSE)
  invisible(dbWriteTable(con, "r_frame", df, row.names = FALSE))
  back <- dbGetQuery(con, "SELECT k, x, s FROM r_frame ORDER BY k")
  expect(back$k, 1:3)
  expect(back$x, c(1.5, NA, 3))
  expect(back$s, c("a", NA, "c"))
  "3 rows round-tripped"
})
check("dbListTables", function() {
  t <- dbListTables(con)
  if (!("r_frame" %in% t)) stop(paste("no r_frame in", paste(t, collapse = ",")))
  paste(t, collapse = ",")
})
check("dbExistsTable", function() expect(dbExistsTable(con, "r_frame"), TRUE))
check("dbGetQuery of a date and a timestamp", function() {
  d <- dbGetQuery(con, "SELECT DATE '2025-03-04' AS d, TIMESTAMP '2025-03-04 05:06:07' AS t")
  expect(format(d$d), "2025-03-04")
  format(d$t)
})
dbDisconnect(con)
width <- max(9, max(sapply(rows, function(r) nchar(r[1]))))
cat(sprintf("%-*s | result | detail\n", width, "operation"))
cat(strrep("-", width), "-+--------+-------\n", sep = "")
failed <- 0
for (r in rows) {
  if (r[2] != "ok") failed <- failed + 1
  cat(sprintf("%-*s | %-6s | %s\n", width, r[1], r[2], substr(r[3], 1, 160)))
}
cat(sprintf("RPostgreSQL: %d passed, %d failed\n", length(rows) - failed, failed))
quit(status = if (failed > 0) 1 else 0)
