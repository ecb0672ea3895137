package unitroot

import (
	"math"
	"sync"
)

// The asymptotic null distribution of the KPSS statistic.
//
// Under stationarity η converges to ∫₀¹ V(r)² dr, where V is a Brownian
// bridge (level) or a second-level Brownian bridge (trend) (Kwiatkowski,
// Phillips, Schmidt & Shin 1992, Theorem 1; MacNeill 1978). By the
// Karhunen-Loève expansion of V,
//
//	η = Σ_k Z_k² / λ_k,   Z_k independent standard normal,
//
// where the λ_k are the eigenvalues of V's covariance kernel, the zeros of
// its Fredholm determinant D(λ) = Π_k (1 - λ/λ_k):
//
//	level: D(λ) = sin √λ / √λ,                       λ_k = k²π²;
//	trend: D(λ) = 12·(2 - 2·cos √λ - √λ·sin √λ) / λ², λ = 4k²π² and λ = 4y²
//	       with y the positive roots of tan y = y
//
// (Nabeya & Tanaka 1988 derive both; the trend factorisation
// 2 - 2·cos s - s·sin s = 2·sin(s/2)·(2·sin(s/2) - s·cos(s/2)) gives its two
// families of zeros). The level limit is the Cramér-von Mises ω²
// distribution (Anderson & Darling 1952). The characteristic function is
// E exp(iuη) = D(2iu)^(-1/2); inverting it along the real axis (Imhof 1961)
// and folding the path onto the negative axis gives Smirnov's (1937)
// formula, which kpssLimit.survival evaluates:
//
//	P(η > x) = (1/π) Σ_{j≥0} (-1)^j ∫_{λ_{2j+1}}^{λ_{2j+2}} e^{-xy/2} / (y·√(-D(y))) dy.
//
// Each integral has inverse square-root singularities at its ends; with
// y = (a+b)/2 - (b-a)/2·cos φ it becomes a smooth periodic integral over
// φ ∈ [0, π] that the midpoint rule (Gauss-Chebyshev) converges on
// exponentially. imhofSurvival, the test's independent check, integrates
// the characteristic function directly instead.

// kpssLimit holds the eigenvalues of one deterministic case and a table of
// log P(η > x) and its derivative on a grid uniform in log x, for cubic
// Hermite interpolation.
type kpssLimit struct {
	eigen []float64 // λ_1 < λ_2 < ..., enough for the table's smallest x
	det   func(y float64) float64
	// x0, step: the grid x_i = x0·exp(i·step). Below x0, P(η > x) rounds
	// to 1 (1 - P < 1e-13); beyond the last point the formula is evaluated
	// directly.
	x0, step float64
	logS     []float64 // log P(η > x_i)
	dlogS    []float64 // d log P(η > x) / d log x at x_i, that is -x·density/P
	// floor is where P(η > x) falls to kpssSmallestP; beyond it the p-value
	// is reported as that bound.
	floor float64
	// critical holds the 1, 5 and 10% upper quantiles.
	critical [3]float64
}

// kpssSmallestP is the smallest p-value KPSS reports as an estimate; a
// statistic beyond its quantile gets it with PValueAtMost.
const kpssSmallestP = 1e-300

// kpssEigenCount eigenvalues suffice down to x0: the terms left out are
// below exp(-x0·λ/2) < 1e-30.
const kpssEigenCount = 400

var (
	kpssLimits     map[Deterministic]*kpssLimit
	kpssLimitsOnce sync.Once
)

// kpssLimitFor returns the distribution for d (level or level_and_slope), building
// the tables once per process (their cost is in DEVELOPERS.md, "P-value tables").
func kpssLimitFor(d Deterministic) *kpssLimit {
	kpssLimitsOnce.Do(func() {
		level := &kpssLimit{eigen: levelEigenvalues(kpssEigenCount), det: levelDeterminant, x0: 0.004, step: 0.02}
		trend := &kpssLimit{eigen: trendEigenvalues(kpssEigenCount), det: trendDeterminant, x0: 0.0015, step: 0.02}
		level.tabulate(12) // P(η > 12) ≈ 1e-27
		trend.tabulate(3)  // P(η > 3) ≈ 1e-27
		kpssLimits = map[Deterministic]*kpssLimit{DeterministicLevel: level, DeterministicLevelAndSlope: trend}
	})
	return kpssLimits[d]
}

// levelEigenvalues returns k²π², k = 1..n.
func levelEigenvalues(n int) []float64 {
	out := make([]float64, n)
	for k := range out {
		a := float64(k+1) * math.Pi
		out[k] = a * a
	}
	return out
}

// trendEigenvalues returns the n smallest zeros of the trend determinant:
// 4k²π² and 4y_k², y_k ∈ (kπ, kπ + π/2) the roots of tan y = y, merged in
// increasing order (they alternate: 4π², 4y_1², 16π², 4y_2², ...).
func trendEigenvalues(n int) []float64 {
	out := make([]float64, 0, n)
	for k := 1; len(out) < n; k++ {
		a := 2 * float64(k) * math.Pi
		out = append(out, a*a)
		y := tanRoot(k)
		out = append(out, 4*y*y)
	}
	return out[:n]
}

// tanRoot returns the root of tan y = y in (kπ, kπ + π/2), k ≥ 1, by
// Newton's method on sin y - y·cos y (derivative y·sin y) from the
// asymptotic start (k+½)π - 1/((k+½)π).
func tanRoot(k int) float64 {
	c := (float64(k) + 0.5) * math.Pi
	y := c - 1/c
	for range 50 {
		s, co := math.Sincos(y)
		step := (s - y*co) / (y * s)
		y -= step
		if math.Abs(step) < 1e-15*y {
			break
		}
	}
	return y
}

// levelDeterminant is D(λ) = sin √λ / √λ.
func levelDeterminant(y float64) float64 {
	s := math.Sqrt(y)
	return math.Sin(s) / s
}

// trendDeterminant is D(λ) = 12·(2 - 2·cos √λ - √λ·sin √λ) / λ², written
// through the factorisation 2·sin(s/2)·(2·sin(s/2) - s·cos(s/2)) so that it
// keeps its precision near the zeros.
func trendDeterminant(y float64) float64 {
	s := math.Sqrt(y)
	sh, ch := math.Sincos(s / 2)
	return 24 * sh * (2*sh - s*ch) / (y * y)
}

// survival returns P(η > x) by Smirnov's formula, and the density at x
// (the same sum with an extra factor y/2).
func (l *kpssLimit) survival(x float64) (p, density float64) {
	if x <= 0 {
		return 1, 0
	}
	for j := 0; j+1 < len(l.eigen); j += 2 {
		a, b := l.eigen[j], l.eigen[j+1]
		lead := math.Exp(-x * a / 2)
		if lead == 0 || lead < 1e-17*math.Abs(p) {
			break
		}
		// The integrand in φ behaves like exp(c·cos φ), c = x(b-a)/4, whose
		// Fourier coefficients fall off like (c/2)^n/n!: about 1.5·c nodes
		// beyond a base of 24 reach double precision.
		c := x * (b - a) / 4
		n := 24 + int(1.5*c)
		var s, sd float64
		for i := range n {
			phi := (float64(i) + 0.5) * math.Pi / float64(n)
			y := (a+b)/2 - (b-a)/2*math.Cos(phi)
			w := math.Sqrt((y-a)*(b-y)/(-l.det(y))) / y * math.Exp(-x*(y-a)/2)
			s += w
			sd += w * y / 2
		}
		sign := 1.0
		if j%4 == 2 {
			sign = -1
		}
		p += sign * lead * s / float64(n)
		density += sign * lead * sd / float64(n)
	}
	return p, density
}

// tabulate fills the grid from x0 to xmax.
func (l *kpssLimit) tabulate(xmax float64) {
	n := int(math.Ceil(math.Log(xmax/l.x0)/l.step)) + 1
	l.logS = make([]float64, n)
	l.dlogS = make([]float64, n)
	for i := range n {
		x := l.x0 * math.Exp(float64(i)*l.step)
		p, f := l.survival(x)
		l.logS[i] = math.Log(p)
		l.dlogS[i] = -x * f / p
	}
	l.floor = l.quantile(kpssSmallestP)
	for i, level := range [3]float64{0.01, 0.05, 0.10} {
		l.critical[i] = l.quantile(level)
	}
}

// pValueBound returns pValue(x), or kpssSmallestP with PValueAtMost
// beyond floor.
func (l *kpssLimit) pValueBound(x float64) (float64, PValueBound) {
	if x > l.floor {
		return kpssSmallestP, PValueAtMost
	}
	return l.pValue(x), PValueEstimate
}

// quantile returns the x with P(η > x) = p by bisection on pValue.
func (l *kpssLimit) quantile(p float64) float64 {
	lo, hi := l.x0, l.x0
	for l.pValue(hi) > p {
		lo, hi = hi, 2*hi
	}
	for hi-lo > 1e-13*hi {
		mid := (lo + hi) / 2
		if l.pValue(mid) > p {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}

// pValue returns P(η > x): 1 below the grid, cubic Hermite interpolation of
// log P on it, and the formula itself beyond it.
func (l *kpssLimit) pValue(x float64) float64 {
	if math.IsNaN(x) {
		return math.NaN()
	}
	if x <= l.x0 {
		return 1
	}
	t := math.Log(x/l.x0) / l.step
	i := int(t)
	if i >= len(l.logS)-1 {
		p, _ := l.survival(x)
		return p
	}
	u := t - float64(i)
	h := l.step
	y0, y1 := l.logS[i], l.logS[i+1]
	d0, d1 := l.dlogS[i]*h, l.dlogS[i+1]*h
	u2, u3 := u*u, u*u*u
	logP := (2*u3-3*u2+1)*y0 + (u3-2*u2+u)*d0 + (-2*u3+3*u2)*y1 + (u3-u2)*d1
	return math.Min(1, math.Exp(logP))
}

// KPSSPValue returns the asymptotic p-value P(η > stat) of a KPSS statistic
// under the null hypothesis of stationarity around a level (constant) or a
// trend, computed from the limiting distribution (see kpssLimit). It is
// NaN for a NaN statistic or deterministic terms other than constant or
// trend.
func KPSSPValue(stat float64, d Deterministic) float64 {
	d, err := d.normalize()
	if err != nil || d == DeterministicNone {
		return math.NaN()
	}
	return kpssLimitFor(d).pValue(stat)
}
