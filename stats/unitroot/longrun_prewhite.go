package unitroot

import (
	"math"

	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// PrewhitenedLongRunVariance estimates the long-run variance of the
// mean-zero series e by Andrews & Monahan's (1992) prewhitening: fit
// e_t = φ·e_{t-1} + v_t by least squares (φ kept within ±0.97), take the
// Bartlett long-run variance of v with the automatic bandwidth
// (HobijnBandwidth), and recolour: λ² = λ_v² / (1 - φ)². Prewhitening removes
// most of the downward bias that a kernel estimate alone shows for
// persistent series.
func PrewhitenedLongRunVariance(e []float64) float64 {
	phi, v := ar1Fit(e)
	if v == nil {
		return math.NaN()
	}
	defer numeric.PutScratch(v)
	return LongRunVariance(v, HobijnBandwidth(v)) / ((1 - phi) * (1 - phi))
}

// ar1Fit fits e_t = φ·e_{t-1} + v_t by least squares, φ kept within ±0.97,
// and returns φ and the residuals v (nil for fewer than 3 values), a
// scratch slice the caller puts back.
func ar1Fit(e []float64) (float64, []float64) {
	if len(e) < 3 {
		return 0, nil
	}
	phi := ar1Coefficient(numeric.Dot(e[1:], e[:len(e)-1]), numeric.Dot(e[:len(e)-1], e[:len(e)-1]))
	v := numeric.GetScratch(len(e) - 1)
	for t := 1; t < len(e); t++ {
		v[t-1] = e[t] - phi*e[t-1]
	}
	return phi, v
}

// ar1Coefficient is ar1Fit's φ from Σe_t·e_{t-1} and Σe_{t-1}²: least
// squares, kept within ±0.97.
func ar1Coefficient(cross, lagged float64) float64 {
	if !(lagged > 0) {
		return 0
	}
	return math.Max(-0.97, math.Min(0.97, cross/lagged))
}
