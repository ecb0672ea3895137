package stats

import (
	"fmt"
	"math"
)

func sqrt(x float64) float64 { return math.Sqrt(x) }
func nan() float64           { return math.NaN() }

// maxAbs returns the largest |x_i|.
func maxAbs(x []float64) float64 {
	m := 0.0
	for _, v := range x {
		if v < 0 {
			v = -v
		}
		if v > m {
			m = v
		}
	}
	return m
}

// scaled returns x divided by its largest magnitude, so that sums of
// squares cannot overflow even for values near 1e300; every test statistic
// here is invariant to the scale of the series.
func scaled(x []float64) []float64 {
	return scaledInto(make([]float64, len(x)), x)
}

// scaledInto writes x scaled as scaled does into dst and returns it.
func scaledInto(dst, x []float64) []float64 {
	m := maxAbs(x)
	for i, v := range x {
		dst[i] = v / m
	}
	return dst
}

var errSingular = errorf("singular design")

func errorf(format string, args ...any) error { return fmt.Errorf("stats: "+format, args...) }
