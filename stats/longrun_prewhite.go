package stats

import "math"

// PrewhitenedLongRunVariance estimates the long-run variance of the
// mean-zero series e by Andrews & Monahan's (1992) prewhitening: fit
// e_t = φ·e_{t-1} + v_t by least squares (φ kept within ±0.97), take the
// Bartlett long-run variance of v with the automatic bandwidth
// (HobijnBandwidth), and recolour: λ² = λ_v² / (1 - φ)². Prewhitening removes
// most of the downward bias that a kernel estimate alone shows for
// persistent series.
func PrewhitenedLongRunVariance(e []float64) float64 {
	if len(e) < 3 {
		return math.NaN()
	}
	var num, den float64
	for t := 1; t < len(e); t++ {
		num += e[t] * e[t-1]
		den += e[t-1] * e[t-1]
	}
	phi := 0.0
	if den > 0 {
		phi = math.Max(-0.97, math.Min(0.97, num/den))
	}
	v := make([]float64, len(e)-1)
	for t := 1; t < len(e); t++ {
		v[t-1] = e[t] - phi*e[t-1]
	}
	lrv := LongRunVariance(v, HobijnBandwidth(v))
	return lrv / ((1 - phi) * (1 - phi))
}
