package unitroot

import (
	"math"
	"math/rand/v2"
	"sort"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// The null distribution of the Zivot-Andrews statistic, from plumb's own
// Monte Carlo (testdata/zivot_andrews/simulate.go): for each break kind,
// each trimming in zivotAndrewsTrims and each probability level in
// zivotAndrewsLevels, zivotAndrewsTable holds {a, b, c} of the quantile's
// response surface in the regression's number of observations n,
//
//	q(n) = a + b/√n + c/n,
//
// fitted by least squares to the quantiles simulated at
// zivotAndrewsLengths. The distribution moves with n (for a break in the
// intercept the median goes from -3.59 at n = 49 to -3.73 at n = 3,199),
// so the p-value is taken at the series' own length, n clamped to the
// simulated range [49, 3199]: the surface is not extrapolated.
var (
	zivotAndrewsLevels = []float64{
		0.001, 0.0025, 0.005, 0.01, 0.025, 0.05, 0.075, 0.10, 0.125, 0.15, 0.175, 0.20,
		0.25, 0.30, 0.35, 0.40, 0.45, 0.50, 0.55, 0.60, 0.65, 0.70, 0.75, 0.80,
		0.85, 0.90, 0.925, 0.95, 0.975, 0.99, 0.995, 0.999,
	}
	zivotAndrewsTrims   = []float64{0.05, 0.10, 0.15, 0.20, 0.25, 0.30}
	zivotAndrewsLengths = []int{50, 100, 200, 400, 800, 1600, 3200}
)

// zivotAndrewsPublished holds Zivot & Andrews' (1992) asymptotic critical
// values of the minimum t-statistic at 1, 5 and 10%, for break fractions λ
// in [0.15, 0.85]: Table 2 (model A, a break in the intercept), Table 3
// (model B, the trend) and Table 4 (model C, both). From memory; r-cran-urca
// 1.3-3's ur.za reports the same values, and TestZivotAndrewsTableMatchesPaper
// checks plumb's own simulation against them.
var zivotAndrewsPublished = map[BreakKind][3]float64{
	BreakLevel:         {-5.34, -4.80, -4.58},
	BreakSlope:         {-4.93, -4.42, -4.11},
	BreakLevelAndSlope: {-5.57, -5.08, -4.82},
}

// zivotAndrewsCritical returns the 1, 5 and 10% critical values: the
// paper's asymptotic ones at the default trimming, plumb's simulated ones
// for n observations at any other.
func zivotAndrewsCritical(kind BreakKind, trim float64, n int) [3]float64 {
	if trim == DefaultBreakTrim {
		return zivotAndrewsPublished[kind]
	}
	q := zivotAndrewsQuantiles(kind, trim, n)
	var out [3]float64
	for i, p := range [3]float64{0.01, 0.05, 0.10} {
		out[i] = q[sort.SearchFloat64s(zivotAndrewsLevels, p)]
	}
	return out
}

// zivotAndrewsQuantiles returns the simulated quantiles at zivotAndrewsLevels
// for n observations (clamped to the simulated lengths), linear in the
// trimming between the table's rows.
func zivotAndrewsQuantiles(kind BreakKind, trim float64, n int) []float64 {
	lengths := zivotAndrewsLengths
	n = min(max(n, lengths[0]-1), lengths[len(lengths)-1]-1)
	nf := float64(n)
	at := func(row [][3]float64, j int) float64 {
		c := row[j]
		return c[0] + c[1]/math.Sqrt(nf) + c[2]/nf
	}
	rows := zivotAndrewsTable[kind]
	trims := zivotAndrewsTrims
	i := sort.SearchFloat64s(trims, trim) // first row with trims[i] >= trim
	i = min(max(i, 1), len(trims)-1)
	w := (trim - trims[i-1]) / (trims[i] - trims[i-1])
	out := make([]float64, len(zivotAndrewsLevels))
	for j := range out {
		out[j] = (1-w)*at(rows[i-1], j) + w*at(rows[i], j)
	}
	return out
}

// zivotAndrewsP returns the p-value of a Zivot-Andrews statistic from a
// regression on n observations: the probability level interpolated linearly
// between the two simulated quantiles around it. Below the 0.1% quantile it
// returns 0.001 as an upper bound, above the 99.9% quantile 0.999 as a
// lower bound.
func zivotAndrewsP(stat float64, kind BreakKind, trim float64, n int) (float64, PValueBound) {
	if math.IsNaN(stat) {
		return math.NaN(), PValueEstimate
	}
	q := zivotAndrewsQuantiles(kind, trim, n)
	levels := zivotAndrewsLevels
	last := len(q) - 1
	switch {
	case stat <= q[0]:
		return levels[0], PValueAtMost
	case stat >= q[last]:
		return levels[last], PValueAtLeast
	}
	j := sort.SearchFloat64s(q, stat) // q[j-1] < stat <= q[j]
	w := (stat - q[j-1]) / (q[j] - q[j-1])
	return levels[j-1] + w*(levels[j]-levels[j-1]), PValueEstimate
}

// SimulateZivotAndrews draws reps random walks of length T (standard normal
// steps; seed, kind and T fix the stream), computes the Zivot-Andrews
// statistic with no lagged differences for the given break at every
// trimming in ZivotAndrewsTrims (one scan of the break dates serves them
// all), and returns its quantiles at ZivotAndrewsLevels, one row per
// trimming. The statistic does not depend on the walk's start, drift or
// scale, so these are draws from its null distribution for T-1
// observations. testdata/zivot_andrews/simulate.go builds
// zivot_andrews_table.go from it.
func SimulateZivotAndrews(kind BreakKind, T, reps int, seed uint64) ([][]float64, error) {
	kind, err := kind.normalize()
	if err != nil {
		return nil, err
	}
	if T < 20 || reps < 1 {
		return nil, numeric.Errorf("zivot-andrews simulation needs T >= 20 and reps >= 1, got T = %d, reps = %d", T, reps)
	}
	rng := rand.New(rand.NewPCG(seed, uint64(T)<<8|uint64(len(kind))))
	trims := zivotAndrewsTrims
	lo, hi := breakRange(kind, T, trims[0])
	lo = max(lo, 2)
	draws := make([][]float64, len(trims))
	y := make([]float64, T)
	path := make([]float64, hi-lo+1)
	for len(draws[0]) < reps {
		v := 0.0
		for t := range y {
			v += rng.NormFloat64()
			y[t] = v
		}
		a := newADFDesign(y, DeterministicLevelAndSlope)
		st := breakScan(a, 0, kind, lo, path)
		a.release()
		if st != stats.StatusOK {
			continue
		}
		for i, trim := range trims {
			l, h := breakRange(kind, T, trim)
			l = max(l, 2)
			best := math.Inf(1)
			for _, t := range path[l-lo : h-lo+1] {
				if t < best { // NaN marks a skipped date
					best = t
				}
			}
			draws[i] = append(draws[i], best)
		}
	}
	out := make([][]float64, len(trims))
	for i, d := range draws {
		sort.Float64s(d)
		out[i] = make([]float64, len(zivotAndrewsLevels))
		for j, p := range zivotAndrewsLevels {
			out[i][j] = d[int(p*float64(len(d)-1)+0.5)]
		}
	}
	return out, nil
}

// ZivotAndrewsTrims returns the trimming fractions that plumb's p-value
// table covers, in increasing order.
func ZivotAndrewsTrims() []float64 { return append([]float64(nil), zivotAndrewsTrims...) }

// ZivotAndrewsLevels returns the probability levels of plumb's p-value table.
func ZivotAndrewsLevels() []float64 { return append([]float64(nil), zivotAndrewsLevels...) }

// ZivotAndrewsLengths returns the series lengths at which the p-value table
// was simulated.
func ZivotAndrewsLengths() []int { return append([]int(nil), zivotAndrewsLengths...) }
