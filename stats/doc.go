// Package stats holds plumb's mathematics: unit-root and stationarity tests,
// their p-value machinery, stability and seasonality checks, transforms and
// their exact inverses, the per-series verdict and forecasts.
//
// Everything here is plain Go over []float64: no I/O, no cgo, no DuckDB.
// Functions take an options struct whose zero value means the documented
// defaults (package defaults holds those plumb's SQL functions and commands
// share) and return a result struct carrying a Status. A statistical
// outcome such as "series too short" is a Status, never an error; errors are
// kept for programming mistakes such as an unknown option value.
//
// # Contents, by concept
//
// Unit-root and stationarity tests, one a file, with their p-values:
//
//   - [ADF] (adf.go), [KPSS] (kpss.go; its limiting law and p-values,
//     [KPSSPValue], in kpss_limit.go), [PhillipsPerron] (pp.go), [DFGLS]
//     (dfgls.go, dfgls_table.go); the shared options and result,
//     [UnitRootResult], in options.go.
//   - MacKinnon's response surfaces: [MacKinnonP], [MacKinnonCritical]
//     (mackinnon.go).
//   - One break: [ZivotAndrews] (zivot_andrews*.go: the break scan, the
//     simulated tables and their p-values) and [MeanBreak] (meanbreak.go,
//     segment_wald.go, meanbreak_table.go).
//   - Seasonal unit roots: [OCSB] (ocsb.go, ocsb_table.go).
//   - White noise: [LjungBox] (ljungbox.go), [Autocorrelation] (acf.go).
//   - Long-run variances: [LongRunVariance], [HobijnBandwidth],
//     [PrewhitenedLongRunVariance] (longrun*.go).
//
// The conditions the verdict judges:
//
//   - Stability of mean and spread: [Stability], [MannKendall]
//     (stability.go, segment_wald.go), [Rolling] (rolling.go).
//   - Seasonality: [Seasonality] (seasonality.go), [STL],
//     [SeasonalStrength], [TrendStrength] (stl.go), [SeasonalEffects]
//     (seasonal_means.go).
//   - Demand and outliers: [Demand] (demand.go), [Outliers] (outliers.go).
//
// The verdict and its recipe:
//
//   - [Stationarity] (verdict.go; the decisions in verdict_judge.go, the
//     plain-language reason in verdict_reason.go, [StatusReason]).
//   - [Recipe] (recipe.go): the transform that cures a series, applied and
//     undone exactly; [Difference], [Undifference] (difference.go);
//     [BoxCox], [InverseBoxCox], [GuerreroLambda] (boxcox.go).
//   - Gaps: [Regularize] (gaps.go). Many series at once:
//     [BenjaminiHochberg] (fdr.go).
//
// Forecasting:
//
//   - [FitAR], [FitAROrder] (ar.go); [ForecastAR], [PsiWeights],
//     [ForecastSeries] (forecast.go); [ForecastByRecipe]
//     (forecast_recipe.go); back to original units, [ToOriginalUnits]
//     (forecast_units.go); accuracy, [MeanAbsoluteScaledError],
//     [IntervalCoverage] (accuracy.go).
//
// Shared numerics, unexported: nested least squares (nestedls.go), lagged
// dot products (lagdot.go), Gram matrices (gram.go), FFT autocovariances
// (autocov_fft.go), scratch buffers (scratch.go) and small helpers
// (mathutil.go, status.go).
package stats
