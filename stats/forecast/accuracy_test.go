package forecast

import (
	"math"
	"testing"

	"github.com/plumb-sql/plumb/stats"
)

func TestMeanAbsoluteScaledError(t *testing.T) {
	nan := math.NaN()
	for _, test := range []struct {
		name                      string
		actual, forecast, history []float64
		m                         int
		want                      float64
		used                      int
		status                    stats.Status
	}{
		// By hand: naive errors |2-1|, |4-2|, |7-4| average 2; forecast
		// errors 1 and 2 average 1.5; 1.5 / 2 = 0.75.
		{"lag 1", []float64{8, 10}, []float64{7, 12}, []float64{1, 2, 4, 7}, 1, 0.75, 2, stats.StatusOK},
		// By hand: lag-2 naive errors 3, 5, 5 average 13/3; errors 1, 2 → 1.5/(13/3).
		{"lag 2", []float64{8, 10}, []float64{7, 12}, []float64{1, 2, 4, 7, 9}, 2, 1.5 / (13.0 / 3), 2, stats.StatusOK},
		// A NaN on either side skips the pair: only |10-12| = 2 is left.
		{"NaN skipped", []float64{nan, 10, 3}, []float64{7, 12, nan}, []float64{1, 2, 4, 7}, 1, 1, 1, stats.StatusOK},
		// Perfect forecasts.
		{"perfect", []float64{5, 6}, []float64{5, 6}, []float64{1, 3}, 1, 0, 2, stats.StatusOK},
		{"constant history", []float64{5}, []float64{6}, []float64{2, 2, 2}, 1, nan, 1, stats.StatusConstant},
		{"history too short", []float64{5}, []float64{6}, []float64{2, 3}, 2, nan, 0, stats.StatusTooShort},
		{"no pairs", []float64{nan}, []float64{6}, []float64{2, 3}, 1, nan, 0, stats.StatusTooShort},
		{"NaN in history", []float64{5}, []float64{6}, []float64{2, nan, 3}, 1, nan, 0, stats.StatusNonFinite},
	} {
		got, err := MeanAbsoluteScaledError(test.actual, test.forecast, test.history, test.m)
		if err != nil {
			t.Fatalf("%s: %v", test.name, err)
		}
		same := got.MASE == test.want || (math.IsNaN(test.want) && math.IsNaN(got.MASE)) || math.Abs(got.MASE-test.want) < 1e-15
		if !same || got.Used != test.used || got.Status != test.status {
			t.Errorf("%s: %+v, want MASE %v from %d pairs, status %s", test.name, got, test.want, test.used, test.status)
		}
	}
	if _, err := MeanAbsoluteScaledError([]float64{1}, []float64{1}, []float64{1, 2}, 0); err == nil {
		t.Error("lag 0 gave no error")
	}
	if _, err := MeanAbsoluteScaledError([]float64{1, 2}, []float64{1}, []float64{1, 2}, 1); err == nil {
		t.Error("slices of different lengths gave no error")
	}
}

func TestIntervalCoverage(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	// By hand: 1 in [0, 2], 5 outside [0, 2], 3 on the bound [3, 4],
	// 7 in [0, +Inf]; the NaN step is skipped: 3 of 4.
	share, used, err := IntervalCoverage(
		[]float64{1, 5, 3, nan, 7},
		[]float64{0, 0, 3, 0, 0},
		[]float64{2, 2, 4, 1, inf})
	if err != nil || share != 0.75 || used != 4 {
		t.Errorf("coverage %v of %d, %v; want 0.75 of 4", share, used, err)
	}
	share, used, _ = IntervalCoverage([]float64{nan}, []float64{0}, []float64{1})
	if !math.IsNaN(share) || used != 0 {
		t.Errorf("no usable step: %v of %d", share, used)
	}
	if _, _, err := IntervalCoverage([]float64{1}, []float64{0, 0}, []float64{1}); err == nil {
		t.Error("slices of different lengths gave no error")
	}
}
