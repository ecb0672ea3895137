// Package testseries holds what the tests of every package under stats
// share: invented series and the reference files. It is a normal package so
// that each package's tests can import it, and it imports nothing under
// stats, so that importing it makes no cycle (TestImportGraph checks this).
// Only tests import it.
//
// # Contents
//
//   - testseries.go: [Series] (a random walk, a weekly sine, growing noise),
//     [RandomWalk], [AR1], [AR1Noise], [Abs].
//   - patterns.go: the planted patterns of the verdict's tests ([Pattern],
//     [AllPatterns], [PlantPanel]), each kind from its own seeded stream.
//   - reference.go: [ReadCSV], [Num] and [ReferenceSeries] read
//     testdata/reference at the module's top (found from this package's
//     own path), whose values Debian's python3-statsmodels, r-cran-urca,
//     r-cran-tseries and R produced (testdata/reference/regenerate.sh).
//   - simulation.go: the seeded simulations that check p-values far into
//     the tail ([SimulationSize]: CI size, a tenth with -short, full with
//     PLUMB_FULL_SIMULATIONS=1; [Rejections], [UniformityLevels],
//     [PoissonQuantile], [MeanSE], [ARSeries], [InParallel]).
package testseries
