package unitroot

import (
	"math"

	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// LongRunVariance returns the Bartlett-kernel (Newey & West 1987) estimate of
// the long-run variance of the mean-zero series e with bandwidth l:
//
//	λ² = γ_0 + 2 Σ_{j=1..l} (1 - j/(l+1)) γ_j,
//
// where γ_j is the biased sample autocovariance. The weights keep the
// estimate non-negative.
func LongRunVariance(e []float64, l int) float64 {
	g := numeric.Autocovariances(e, l)
	if g == nil {
		return 0
	}
	s := g[0]
	for j := 1; j < len(g); j++ {
		s += 2 * (1 - float64(j)/float64(l+1)) * g[j]
	}
	return s
}

// HobijnBandwidth is the automatic Bartlett bandwidth of Hobijn, Franses &
// Ooms (1998), after Newey & West (1994): with n = floor(T^(2/9)),
//
//	ŝ(0) = γ_0 + 2 Σ_{i=1..n} γ_i,   ŝ(1) = 2 Σ_{i=1..n} i·γ_i,
//	l = floor(1.1447 · ((ŝ(1)/ŝ(0))²)^(1/3) · T^(1/3)),
//
// capped at T-1.
func HobijnBandwidth(e []float64) int {
	T := len(e)
	n := int(math.Pow(float64(T), 2.0/9.0))
	g := numeric.Autocovariances(e, n)
	if g == nil {
		return 0
	}
	s0 := g[0]
	s1 := 0.0
	for i := 1; i < len(g); i++ {
		s0 += 2 * g[i]
		s1 += 2 * float64(i) * g[i]
	}
	if s0 == 0 {
		return 0
	}
	gamma := 1.1447 * math.Cbrt((s1/s0)*(s1/s0))
	return min(int(gamma*math.Cbrt(float64(T))), T-1)
}
