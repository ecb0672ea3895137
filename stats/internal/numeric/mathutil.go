package numeric

import (
	"fmt"
	"math"
)

// Sqrt is math.Sqrt and NaN math.NaN, short for the formulas that use them.
func Sqrt(x float64) float64 { return math.Sqrt(x) }
func NaN() float64           { return math.NaN() }

// MaxAbs returns the largest |x_i|.
func MaxAbs(x []float64) float64 {
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

// Scaled returns x divided by its largest magnitude, so that sums of
// squares cannot overflow even for values near 1e300; every test statistic
// here is invariant to the scale of the series.
func Scaled(x []float64) []float64 {
	return ScaledInto(make([]float64, len(x)), x)
}

// ScaledInto writes x scaled as Scaled does into dst and returns it.
func ScaledInto(dst, x []float64) []float64 {
	m := MaxAbs(x)
	for i, v := range x {
		dst[i] = v / m
	}
	return dst
}

// ErrSingular reports a regression design that is numerically singular.
var ErrSingular = Errorf("singular design")

// Errorf is fmt.Errorf with the prefix "stats: " that every error of the
// statistics packages carries.
func Errorf(format string, args ...any) error { return fmt.Errorf("stats: "+format, args...) }

// MeanSD returns the mean and the sample standard deviation (n-1 divisor).
func MeanSD(x []float64) (float64, float64) {
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

// Minimum returns the smallest value of x.
func Minimum(x []float64) float64 {
	m := math.Inf(1)
	for _, v := range x {
		m = math.Min(m, v)
	}
	return m
}

// IsConstant reports whether every value of x equals the first.
func IsConstant(x []float64) bool {
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

// TooLarge reports whether x, free of NaN and ±Inf, has values so large
// that the sum of their squares exceeds maxSumOfSquares (for 1,000 values
// of one size, beyond about 4e151).
func TooLarge(x []float64) bool {
	ss := 0.0
	for _, v := range x {
		ss += v * v
	}
	return !(ss <= maxSumOfSquares)
}
