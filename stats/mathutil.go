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

// meanSD returns the mean and the sample standard deviation (n-1 divisor).
func meanSD(x []float64) (float64, float64) {
	n := float64(len(x))
	mean := 0.0
	for _, v := range x {
		mean += v
	}
	mean /= n
	ss := 0.0
	for _, v := range x {
		ss += (v - mean) * (v - mean)
	}
	if len(x) < 2 {
		return mean, math.NaN()
	}
	return mean, math.Sqrt(ss / (n - 1))
}

// minimum returns the smallest value of x.
func minimum(x []float64) float64 {
	m := math.Inf(1)
	for _, v := range x {
		m = math.Min(m, v)
	}
	return m
}

// isConstant reports whether every value of x equals the first.
func isConstant(x []float64) bool {
	for _, v := range x[1:] {
		if v != x[0] {
			return false
		}
	}
	return true
}

// maxSumOfSquares bounds Σ x_t² for a series the verdict judges. The
// unit-root tests scale the series first and so accept any finite values,
// but the verdict also works in original units (segment shares, the
// outlier fit, a trend or shift removed, Ljung-Box on the output, the
// recipe's forecasts), from sums of squares and cross products of the
// series or of its differences (a cross product is at most the sum of
// squares, by Cauchy-Schwarz); past this bound they overflow to ±Inf or
// NaN and would give a silently wrong verdict. A sixteenth of the largest
// double leaves room for two differences, whose values are at most four
// times as large (IEEE 754 double precision, common practice).
const maxSumOfSquares = math.MaxFloat64 / 16

// tooLarge reports whether x, free of NaN and ±Inf, has values so large
// that the sum of their squares exceeds maxSumOfSquares (for 1,000 values
// of one size, beyond about 4e151).
func tooLarge(x []float64) bool {
	ss := 0.0
	for _, v := range x {
		ss += v * v
	}
	return !(ss <= maxSumOfSquares)
}
