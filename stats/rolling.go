package stats

import (
	"math"

	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// RollingResult holds trailing-window statistics, one value per observation;
// the first width-1 values are NaN (the window is not yet full).
type RollingResult struct {
	Mean, SD []float64
	// MeanRatio is the rolling mean over the global mean (NaN when the
	// global mean is 0); SDRatio the rolling standard deviation over the
	// global one. A stable series keeps both near 1.
	MeanRatio, SDRatio []float64
	// MeanDeviation is (rolling mean - global mean) / global SD, which stays
	// readable when the global mean is near 0.
	MeanDeviation []float64
}

// Rolling computes the trailing rolling mean and standard deviation (n-1
// divisor) of x over windows of width values, and their ratios to the
// whole series' mean and standard deviation. NaN values make the windows
// that contain them NaN. It is an error for width to be below 2.
func Rolling(x []float64, width int) (RollingResult, error) {
	if width < 2 {
		return RollingResult{}, numeric.Errorf("rolling: the width must be at least 2, got %d", width)
	}
	n := len(x)
	r := RollingResult{
		Mean: make([]float64, n), SD: make([]float64, n),
		MeanRatio: make([]float64, n), SDRatio: make([]float64, n), MeanDeviation: make([]float64, n),
	}
	gMean, gSD := numeric.MeanSD(x)
	for i := 0; i < n; i++ {
		if i+1 < width {
			r.Mean[i], r.SD[i], r.MeanRatio[i], r.SDRatio[i], r.MeanDeviation[i] = numeric.NaN(), numeric.NaN(), numeric.NaN(), numeric.NaN(), numeric.NaN()
			continue
		}
		// Two-pass per window keeps it exact; width·n work is cheap next to
		// the tests.
		m, s := numeric.MeanSD(x[i+1-width : i+1])
		r.Mean[i], r.SD[i] = m, s
		r.MeanRatio[i] = m / gMean
		if gMean == 0 {
			r.MeanRatio[i] = math.NaN()
		}
		r.SDRatio[i] = s / gSD
		r.MeanDeviation[i] = (m - gMean) / gSD
	}
	return r, nil
}
