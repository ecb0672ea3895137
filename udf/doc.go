// Package udf registers plumb's SQL functions on an embedded DuckDB
// database and is the only package that talks to DuckDB's function API.
//
// Two layers make up every SQL function:
//
//   - a Go scalar function named plumb_<name>, registered once per database,
//     that takes positional arguments and calls the packages under stats
//     (unitroot, verdict, forecast, stats itself);
//   - a TEMP macro named <name>, created on every new connection, that gives
//     the function its named options and defaults and casts its inputs.
//
// Table functions (differenced, diagnose, ...) are TEMP table macros over
// query(plumb_<name>_sql(...)): a Go scalar function writes the SELECT, with
// every identifier quoted, and DuckDB scans, groups, orders and runs it on its
// own threads, a batch of groups at a time so that it completes under
// memory_limit (batches.go). Because they are macros, they see the caller's
// TEMP tables and open transaction. Macros are TEMP so that a database file opened by plumb is
// never written with definitions that plain DuckDB could not run.
//
// Each SQL function, or family of them, has a file of its name: <name>.go
// with its registration, argument checks and a line naming where its maths
// lives under stats (stats/unitroot/adf.go, ...), and sql/<name>.sql with its macros (families in
// open.go lists them). A STRUCT result is declared once as a layout
// (layout.go). The reach into duckdb-go's vectors is walled off in
// internal/vectors.
package udf
