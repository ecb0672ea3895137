// Package forecast continues a series past its end: the stationary part
// that a verdict's recipe leaves is fitted by an autoregression or an exact
// ARMA model, forecast with intervals, and taken back through the recipe to
// the original units.
//
// # Contents
//
//   - [FitAR], [FitAROrder] (ar.go): least-squares autoregressions with a
//     constant (Box, Jenkins & Reinsel, §7.1), the order by AIC (Akaike
//     1974) or BIC (Schwarz 1978) on a common sample.
//   - [FitARMA], [ARMAAt] (arma_fit.go): multiplicative seasonal ARMA models
//     by exact Gaussian likelihood, from the Kalman filter of their
//     state-space form (arma_statespace.go; Harvey 1989, Durbin & Koopman
//     2012), over parameters kept stationary and invertible
//     (arma_transform.go; Barndorff-Nielsen & Schou 1973, Monahan 1984);
//     [ChooseARMA] (arma_select.go), the model search by AICc;
//     [ForecastARMA] (arma_forecast.go), forecasts and exact error variances
//     from the same filter, the differencing included.
//   - [ForecastAR], [PsiWeights], [ForecastSeries] (forecast.go): ψ-weight
//     forecasts of an autoregression on the differenced scale
//     ([Integration]).
//   - [ForecastByRecipe] (forecast_recipe.go): the forecasts of a series
//     judged by package verdict, through its [verdict.Recipe].
//   - [ToOriginalUnits] (forecast_units.go): forecasts and intervals back
//     through the Box-Cox transform, the mean by the lognormal formula or
//     the delta method ([BackTransform]).
//   - [MeanAbsoluteScaledError], [IntervalCoverage] (accuracy.go): accuracy
//     on a held-out stretch (Hyndman & Koehler 2006).
package forecast
