// Package verdict judges one series: is it stationary, and if not, what
// moves (the mean, the spread, a seasonal pattern), why, and which recipe of
// transforms cures it. It reads the tests of package unitroot and the
// transforms of package stats, and package forecast continues the recipe
// into forecasts.
//
// # Contents
//
// The verdict:
//
//   - [Stationarity] (verdict.go): the whole judgement of one series, from
//     the checks of its values to the recipe's output judged again;
//     [StationarityOptions], [StationarityResult], the causes
//     ([MeanCause], [SpreadCause], [SeasonalKind]) and [Violation]s;
//     [UnjudgedVerdict] for a series it cannot judge.
//   - verdict_judge.go: the decisions on one scale (seasonality at the
//     period, the cause of a moving mean from ADF, KPSS, the break tests
//     and a trend test, the spread).
//   - [StatusReason] (verdict_reason.go): the verdict in plain sentences.
//
// The recipe:
//
//   - [Recipe] (recipe.go): g_λ, a deterministic part (seasonal means, a
//     trend, a level shift) and differences, applied ([Recipe.Apply]) and
//     undone exactly ([Recipe.Restore], [Recipe.RestoreForecast]).
//
// The conditions the verdict judges:
//
//   - [Stability] (stability.go): equal means and equal spreads across
//     segments of an autocorrelated series, by a Wald statistic with a
//     long-run variance (segment_wald.go) and the spread of Brown &
//     Forsythe (1974); [MannKendall], the trend statistic.
//   - [Seasonality] (seasonality.go): the period, found or given, and how
//     strongly the series follows it; [STL] (stl.go), the decomposition of
//     Cleveland, Cleveland, McRae & Terpenning (1990), with
//     [SeasonalStrength] and [TrendStrength] (Wang, Smith & Hyndman 2006);
//     [SeasonalEffects] (seasonal_means.go), fixed seasonal means by
//     classical decomposition.
//   - [Demand] (demand.go): the demand pattern of Syntetos, Boylan & Croston
//     (2005); [Intermittent].
//   - [Outliers] (outliers.go): isolated outliers by a Hampel identifier
//     (Hampel 1974; Pearson 2002) on a residual that a change of level does
//     not produce.
package verdict
