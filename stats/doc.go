// Package stats holds plumb's mathematics: unit-root and stationarity tests,
// their p-value machinery, stability and seasonality checks, transforms and
// their exact inverses, and the per-series verdict.
//
// Everything here is plain Go over []float64: no I/O, no cgo, no DuckDB.
// Functions take an options struct whose zero value means the documented
// defaults and return a result struct carrying a Status. A statistical
// outcome such as "series too short" is a Status, never an error; errors are
// kept for programming mistakes such as an unknown option value.
package stats
