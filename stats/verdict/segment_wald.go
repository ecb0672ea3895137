package verdict

import (
	"math"

	"github.com/plumb-sql/plumb/stats/internal/numeric"
	"gonum.org/v1/gonum/stat/distuv"
)

// The segment tests of Stability: equal means (on the series) and equal
// spreads (on absolute deviations from segment medians) across k
// consecutive segments of an autocorrelated series.
//
// The statistic is a Wald statistic with a long-run variance,
//
//	Q = Σ_j m_j (ȳ_j - ȳ)² / (c·λ̂²),
//
// and its p-value is P(F(k-1, ν) > Q/(k-1)). The pieces, and why each is
// there (DEVELOPERS.md, "P-value calibration", has the measurements behind
// them and the command that repeats them):
//
//   - λ̂² = σ̂_v² / (1 - φ̃)², an AR(1) approximation fitted to the
//     deviations e_t of y from its segment means (blockAR1Fit). Block
//     demeaning biases the pooled least-squares φ̂ down by (1 + φ)/m (the
//     part of Kendall's (1954) bias that comes from estimating each block's
//     mean) and the ratio estimator by another 2φ/n, so
//     φ̃ = (m·φ̂ + 1)/(m - 1 - 2m/n); Kendall's whole-series correction
//     (m·φ̂ + 1)/(m - 3) over-corrects here. σ̂_v² divides the residual
//     sum of squares by n - k - 1, the k means and φ being estimated.
//   - c corrects for short segments: for an AR(1) series a segment mean's
//     variance is λ²·g(m)/m with g(m) = 1 - 2φ(1 - φ^m)/(m(1 - φ²)) (the
//     sum of its autocovariances with Bartlett-type weights), so
//     E Σ m_j (ȳ_j - ȳ)² = λ²·(Σ_j g(m_j) - g(n)) = λ²·c·(k-1). Without it
//     the test under-rejects for persistent series.
//   - ν, the denominator's degrees of freedom, carries the uncertainty of
//     λ̂² (Satterthwaite 1946): by the delta method
//     Var(log λ̂²) ≈ 2/(n-k-1) + 4·Var(φ̃)/(1 - φ̃)², with Var(φ̃) the
//     AR(1) value (1 - φ²)/n times the bias correction's scale squared,
//     and ν = 2/Var(log λ̂²). Treating λ̂² as known (a χ²(k-1) reference)
//     gives the test a heavy tail, because the relative error of λ̂² is
//     far from negligible beside k-1 degrees of freedom. ν is evaluated one
//     standard error above φ̃: it falls steeply as φ rises, and at φ̃
//     itself it is largest exactly when φ̃ underestimates φ, which is when
//     λ̂² is too small.
//
// The spread test adds one small-sample correction: centring each segment
// at its own median adds the median's sampling error to every absolute
// deviation of that segment, which inflates the within-segment variation
// (and λ̂²) by about κ/m, while the segment means of the deviations move
// only at second order (the median minimises the sum of absolute
// deviations). κ is measured by simulation (TestSpreadCentringInflation).

// spreadCentringInflation is κ above.
const spreadCentringInflation = 2.5

// segmentWald returns Q and its p-value for y cut at bounds (k+1 boundaries,
// the oldest segment the longest); inflation is κ (0 for the means test).
// Both are NaN when the long-run variance or c is not positive.
func segmentWald(y []float64, bounds []int, inflation float64) (float64, float64) {
	k := len(bounds) - 1
	n := len(y)
	e := numeric.GetScratch(n)
	defer numeric.PutScratch(e)
	between := segmentDeviations(e, y, bounds)
	m := bounds[k] - bounds[k-1]
	fit := blockAR1Fit(e, m, k)
	lrv := fit.longRunVariance() / (1 + inflation/float64(m))
	if !(lrv > 0) {
		return math.NaN(), math.NaN()
	}
	c := -fit.meanVarianceRatio(n)
	c += fit.meanVarianceRatio(bounds[1]-bounds[0]) + float64(k-1)*fit.meanVarianceRatio(m)
	c /= float64(k - 1)
	if !(c > 0) { // E Q = λ²·c·(k-1) is positive; guard against rounding
		return math.NaN(), math.NaN()
	}
	q := between / (c * lrv)
	df := float64(k - 1)
	return q, distuv.F{D1: df, D2: fit.degreesOfFreedom()}.Survival(q / df)
}

// segmentDeviations writes y's deviations from its segment means into e and
// returns the between-segment sum of squares Σ m_j (ȳ_j - ȳ)².
func segmentDeviations(e, y []float64, bounds []int) float64 {
	grand := numeric.Sum(y) / float64(len(y))
	between := 0.0
	for j := 0; j+1 < len(bounds); j++ {
		seg := y[bounds[j]:bounds[j+1]]
		m := numeric.Sum(seg) / float64(len(seg))
		for i, v := range seg {
			e[bounds[j]+i] = v - m
		}
		between += float64(len(seg)) * (m - grand) * (m - grand)
	}
	return between
}

// blockAR1 is an AR(1) fit to residuals demeaned in blocks of length m.
type blockAR1 struct {
	phi       float64 // bias-corrected, within ±0.97
	variance  float64 // σ̂_v², the innovation variance
	n, k, m   int
	phiVarFac float64 // the bias correction's scale, m/(m - 1 - 2m/n)
}

// blockAR1Fit fits e_t = φ·e_{t-1} + v_t to the block-demeaned residuals e
// (k blocks, the common length m), with the bias correction described
// above. It needs only three sums of products: the residual sum of squares
// is Σe_t² - 2φ·Σe_t·e_{t-1} + φ²·Σe_{t-1}².
func blockAR1Fit(e []float64, m, k int) blockAR1 {
	n := len(e)
	f := blockAR1{n: n, k: k, m: m, variance: math.NaN()}
	if n < k+3 {
		return f
	}
	cross := numeric.Dot(e[1:], e[:n-1])
	lagged := numeric.Dot(e[:n-1], e[:n-1])
	current := lagged - e[0]*e[0] + e[n-1]*e[n-1]
	if !(lagged > 0) {
		return f
	}
	mf, nf := float64(m), float64(n)
	scale := mf - 1 - 2*mf/nf
	f.phiVarFac = mf / scale
	f.phi = math.Max(-0.97, math.Min(0.97, (mf*cross/lagged+1)/scale))
	ssv := current - 2*f.phi*cross + f.phi*f.phi*lagged
	f.variance = math.Max(ssv, 0) / float64(n-k-1)
	return f
}

// longRunVariance is σ̂_v² / (1 - φ̃)².
func (f blockAR1) longRunVariance() float64 {
	return f.variance / ((1 - f.phi) * (1 - f.phi))
}

// meanVarianceRatio is g(m) = m·Var(ȳ_m)/λ² for an AR(1) series:
// 1 - 2φ(1 - φ^m)/(m(1 - φ²)).
func (f blockAR1) meanVarianceRatio(m int) float64 {
	phi := f.phi
	return 1 - 2*phi*(1-math.Pow(phi, float64(m)))/(float64(m)*(1-phi*phi))
}

// degreesOfFreedom is ν = 2/Var(log λ̂²) by the delta method, evaluated
// one standard error above φ̃ (see the package comment above).
func (f blockAR1) degreesOfFreedom() float64 {
	nf := float64(f.n)
	scale := f.phiVarFac * f.phiVarFac / nf
	phi := math.Min(0.97, f.phi+math.Sqrt((1-f.phi*f.phi)*scale))
	varPhi := (1 - phi*phi) * scale
	varLog := 2/float64(f.n-f.k-1) + 4*varPhi/((1-phi)*(1-phi))
	return 2 / varLog
}
