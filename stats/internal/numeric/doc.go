// Package numeric holds the numerics that plumb's statistics packages
// share: nothing here knows about a test, a verdict or a forecast. It is
// internal to stats, so its names are exported for stats and its packages
// only.
//
// # Contents
//
//   - [NestedLS] (nestedls.go): one Householder QR factorisation of a
//     regression design from which every nested model (the first m columns)
//     gives its residual sum of squares, coefficient, standard error and
//     t-statistic of the last column (Golub & Van Loan, Matrix
//     Computations); the same from a Cholesky factor of the Gram
//     matrix ([NestedLS.FactorGram], [NestedLS.FactorCross], gram.go), with
//     [Dot] and [Sum], four running sums each.
//   - [LagDots] (lagdot.go): the dot products of a series with its shifts,
//     the cross products of a lagged design.
//   - [Autocovariances] (autocov_fft.go): the biased sample autocovariances,
//     directly or by the
//     Wiener-Khinchin route through the FFT for long lags.
//   - [GetScratch], [GetZeroed], [PutScratch] (scratch.go): reused buffers.
//   - mathutil.go: [MaxAbs], [Scaled], [ScaledInto] (a series scaled by its
//     largest magnitude, so sums of squares cannot overflow), [MeanSD],
//     [Minimum], [IsConstant], [TooLarge] (a sum of squares past
//     double precision's room), [Errorf] and [ErrSingular].
package numeric
