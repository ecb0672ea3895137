// Package stats is the bottom of plumb's mathematics: the Status every
// result carries, the transforms and their exact inverses, and the small
// series tools the other packages build on. The tests, the verdict and the
// forecasts live in packages of their own beneath it:
//
//   - [github.com/plumb-sql/plumb/stats/unitroot]: unit-root and
//     stationarity tests with their p-value tables (ADF, KPSS, PP, DF-GLS,
//     Zivot-Andrews, the break in the mean, OCSB), long-run variances;
//   - [github.com/plumb-sql/plumb/stats/verdict]: the per-series verdict
//     (judging, causes, reason), the recipe that cures a series, stability,
//     seasonality, STL, demand and outliers;
//   - [github.com/plumb-sql/plumb/stats/forecast]: autoregressions, exact
//     ARMA models, forecasts by recipe, back to original units, accuracy;
//   - stats/internal/numeric: the shared numerics (nested least squares,
//     lagged dot products, Gram matrices, FFT autocovariances, scratch
//     buffers); stats/internal/testseries: the tests' shared series and
//     reference files;
//   - [github.com/plumb-sql/plumb/stats/defaults]: the one table of option
//     defaults; [github.com/plumb-sql/plumb/stats/longtests]: the switch of
//     the long tests.
//
// The import graph runs one way: forecast → verdict → unitroot → stats →
// internal/numeric (TestImportGraph, imports_test.go, checks it).
//
// Everything here is plain Go over []float64: no I/O, no cgo, no DuckDB.
// Functions take an options struct whose zero value means the documented
// defaults and return a result struct carrying a Status. A statistical
// outcome such as "series too short" is a Status, never an error; errors are
// kept for programming mistakes such as an unknown option value.
//
// # Contents
//
//   - [Status] and [CheckFinite] (status.go): whether a result can be used,
//     and if not, why not.
//   - [Difference], [Undifference] (difference.go): (1 - B^lag)^d and its
//     exact inverse from the recorded anchors.
//   - [BoxCox], [InverseBoxCox] (boxcox.go; Box & Cox 1964), [GuerreroLambda]
//     and [LambdaOfChanges] (Guerrero's 1993 choice of λ).
//   - [Regularize] (gaps.go): a series on a regular time grid, gaps filled
//     by a [FillMethod], refused past [MaxFillFactor] grid steps per
//     observation.
//   - [BenjaminiHochberg] (fdr.go): q-values over many series (Benjamini &
//     Hochberg 1995).
//   - [Autocorrelation], [AutocorrelationAt] (acf.go): sample
//     autocorrelations.
//   - [LjungBox] (ljungbox.go): the portmanteau test of white noise (Ljung
//     & Box 1978).
//   - [Rolling] (rolling.go): rolling means and spreads.
package stats
