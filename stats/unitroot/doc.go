// Package unitroot holds plumb's unit-root and stationarity tests, one a
// file, with the p-value machinery each needs. Each test takes a series and
// an options struct whose zero value means the documented defaults, and
// returns a result with a [stats.Status]; the verdict
// (package verdict) reads them.
//
// # Contents
//
// The options and the result the tests share (options.go): [Deterministic]
// (level, or level and slope), [LagRule] (how lagged differences are
// chosen), [SchwertMaxLag] and [SchwertShortLag] (Schwert 1989),
// [PValueBound] and [UnitRootResult].
//
// Tests of one root at frequency zero:
//
//   - [ADF] (adf.go): the augmented Dickey-Fuller test (Dickey & Fuller
//     1979; Said & Dickey 1984), lags by AIC, BIC or dropping insignificant
//     ones, all from one factorisation.
//   - [KPSS] (kpss.go): the test with stationarity as its null hypothesis
//     (Kwiatkowski, Phillips, Schmidt & Shin 1992); its p-values from the
//     exact limiting law of the statistic, [KPSSPValue] (kpss_limit.go).
//   - [PhillipsPerron] (pp.go): Z(τ) with a long-run variance correction
//     (Phillips & Perron 1988).
//   - [DFGLS] (dfgls.go): ADF on a GLS-detrended series (Elliott,
//     Rothenberg & Stock 1996); the finite-sample table of its trend case
//     in dfgls_table.go (plumb's own simulation, testdata/dfgls).
//   - [MacKinnonP], [MacKinnonCritical] (mackinnon.go): MacKinnon's
//     response surfaces for the Dickey-Fuller τ (1994 p-values, 2010
//     critical values), shared by ADF, PP and DF-GLS.
//
// One break:
//
//   - [ZivotAndrews] (zivot_andrews.go): a unit root against stationarity
//     with one break in the level, the slope or both at an unknown date
//     (Zivot & Andrews 1992); the one-pass scan over the dates in
//     zivot_andrews_scan.go; p-values for the series' own length
//     ([SimulateZivotAndrews], zivot_andrews_pvalue.go) from plumb's
//     simulated table (zivot_andrews_table.go, testdata/zivot_andrews).
//   - [MeanBreak] (meanbreak.go): the sup-Wald test of one break in the mean
//     of an autocorrelated series (Andrews 1993), its limiting law
//     tabulated in meanbreak_table.go ([SimulateMeanBreak],
//     testdata/meanbreak); [FailedMeanBreak] for a series it cannot test.
//
// A seasonal root:
//
//   - [OCSB] (ocsb.go): the seasonal unit-root test of Osborn, Chui, Smith &
//     Birchenhall (1988), critical values from plumb's simulation
//     (ocsb_table.go, [SimulateOCSB], testdata/ocsb).
//
// Long-run variances (longrun.go, longrun_prewhite.go):
// [LongRunVariance] (Bartlett kernel, Newey & West 1987),
// [HobijnBandwidth] (Hobijn, Franses & Ooms 1998) and
// [PrewhitenedLongRunVariance] (Andrews & Monahan 1992).
package unitroot
