package verdict

import (
	"math"
	"testing"
)

// TestDemand: the classes of Syntetos, Boylan & Croston (2005) at their
// cut-offs (ADI 1.32, CV² 0.49), worked by hand: ADI = n / non-zero count,
// CV² = population variance / mean² of the non-zero values.
func TestDemand(t *testing.T) {
	for _, test := range []struct {
		name      string
		x         []float64
		zeros     float64
		adi, cv2  float64
		want      DemandClass
		intermitt bool
	}{
		// 8 of 8 non-zero: ADI 1; sizes 4,5,4,5,...: mean 4.5, variance 0.25, CV² 0.0123.
		{"smooth", []float64{4, 5, 4, 5, 4, 5, 4, 5}, 0, 1, 0.25 / 20.25, DemandSmooth, false},
		// sizes 1 and 9: mean 5, variance 16, CV² 0.64.
		{"erratic", []float64{1, 9, 1, 9, 1, 9, 1, 9}, 0, 1, 0.64, DemandErratic, false},
		// 2 of 6 non-zero: ADI 3; sizes 5, 5: CV² 0.
		{"intermittent", []float64{0, 0, 5, 0, 0, 5}, 4.0 / 6, 3, 0, DemandIntermittent, true},
		// sizes 1, 9: CV² 0.64.
		{"lumpy", []float64{0, 0, 1, 0, 0, 9}, 4.0 / 6, 3, 0.64, DemandLumpy, true},
		// A negative value: not demand, no class.
		{"negative", []float64{-1, 2, 3, 4}, 0, 1, 0, "", false},
	} {
		p := Demand(test.x)
		if p.Class != test.want || p.Intermittent() != test.intermitt || math.Abs(p.ZeroShare-test.zeros) > 1e-15 {
			t.Errorf("%s: %+v", test.name, p)
		}
		if test.want != "" && (math.Abs(p.AverageInterval-test.adi) > 1e-15 || math.Abs(p.SizeVariation-test.cv2) > 1e-12) {
			t.Errorf("%s: ADI %v CV² %v, want %v %v", test.name, p.AverageInterval, p.SizeVariation, test.adi, test.cv2)
		}
	}
	if p := Demand(make([]float64, 5)); p.Class != "" || p.ZeroShare != 1 || !math.IsNaN(p.AverageInterval) {
		t.Errorf("all zero: %+v", p)
	}
}

// TestSeasonalEffects: a fixed pattern on a straight line and on a random
// walk is recovered (centred to sum to zero) to within the noise; the
// moving average of order p (2×p for even p) removes any level that moves
// smoothly (classical decomposition).
func TestSeasonalEffects(t *testing.T) {
	for _, p := range []int{7, 12} {
		shape := make([]float64, p)
		for j := range shape {
			shape[j] = math.Sin(2*math.Pi*float64(j)/float64(p)) + 0.3*float64(j%3)
		}
		m := 0.0
		for _, v := range shape {
			m += v
		}
		for j := range shape {
			shape[j] -= m / float64(p)
		}
		x := make([]float64, 20*p)
		for i := range x {
			x[i] = 5 + 0.2*float64(i) + shape[i%p]
		}
		got := SeasonalEffects(x, p)
		for j := range shape {
			// Exact up to rounding: a centred moving average of a straight line is the line.
			if math.Abs(got[j]-shape[j]) > 1e-12 {
				t.Errorf("period %d, position %d: %v, want %v", p, j, got[j], shape[j])
			}
		}
	}
	if SeasonalEffects(make([]float64, 10), 7) != nil {
		t.Error("too short a series gave effects")
	}
}
