package verdict

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// TestVerdictNumbersThatCannotBeComputed: a series whose numbers overflow
// on the way (values whose squares or differences pass float64's range) or
// that holds NaN is status non_finite, with NaN results, no score and
// never stationary; a series merely large (1e100) is judged exactly as the
// same series at ordinary size.
func TestVerdictNumbersThatCannotBeComputed(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 21))
	alternating := make([]float64, 120) // ±1e308: each difference is ±Inf
	noise := make([]float64, 730)       // white noise of scale 1e200: its squares overflow
	walk := make([]float64, 730)        // a random walk of scale 1e300
	nearMax := make([]float64, 200)     // values up to 1.7e308
	withNaN := make([]float64, 200)
	w := 0.0
	for i := range walk {
		w += rng.NormFloat64()
		walk[i] = 1e300 * w
		noise[i] = 1e200 * rng.NormFloat64()
	}
	for i := range alternating {
		alternating[i] = 1e308 * float64(1-2*(i%2))
	}
	for i := range nearMax {
		nearMax[i] = math.MaxFloat64 * (2*rng.Float64() - 1)
		withNaN[i] = 10 + rng.NormFloat64()
	}
	withNaN[100] = math.NaN()
	for _, test := range []struct {
		name   string
		x      []float64
		period int
		reason string
	}{
		{"alternating ±1e308", alternating, 0, tooLargeReason},
		{"noise of scale 1e200", noise, 7, tooLargeReason},
		{"random walk of scale 1e300", walk, 7, tooLargeReason},
		{"values up to the largest double", nearMax, 0, tooLargeReason},
		{"a NaN in the middle", withNaN, 0, StatusReason(stats.StatusNonFinite)},
	} {
		v, err := Stationarity(test.x, StationarityOptions{Period: test.period})
		if err != nil {
			t.Fatalf("%s: %v", test.name, err)
		}
		if v.Status != stats.StatusNonFinite || v.Stationary || !math.IsNaN(v.Score) || v.Reason != test.reason {
			t.Errorf("%s: status %s, stationary %v, score %v, reason %q; want non_finite, not stationary, no score, %q",
				test.name, v.Status, v.Stationary, v.Score, v.Reason, test.reason)
		}
		if !math.IsNaN(v.ADF.Statistic) && v.ADF.Status == stats.StatusOK && v.Status != stats.StatusOK {
			t.Errorf("%s: an ADF statistic %v beside status %s", test.name, v.ADF.Statistic, v.Status)
		}
	}
	// Large but computable: the verdict is scale-free, so 1e100 times a
	// series must give the same decisions and score (plumb's own check).
	base := make([]float64, 730)
	w = 0
	for i := range base {
		w += rng.NormFloat64()
		base[i] = 500 + w
	}
	big := make([]float64, len(base))
	for i, v := range base {
		big[i] = 1e100 * v
	}
	a, _ := Stationarity(base, StationarityOptions{Period: 7})
	b, _ := Stationarity(big, StationarityOptions{Period: 7})
	if a.Status != b.Status || a.MeanCause != b.MeanCause || a.Differences != b.Differences || a.Stationary != b.Stationary ||
		math.Abs(a.Score-b.Score) > 1e-9 {
		t.Errorf("1e100 × a random walk: %s %s d=%d score %v; at ordinary size %s %s d=%d score %v",
			b.Status, b.MeanCause, b.Differences, b.Score, a.Status, a.MeanCause, a.Differences, a.Score)
	}
}

// TestLjungBoxLargeValues: Ljung-Box is scale-free, so values whose
// squares overflow give the statistic of the same series scaled down.
func TestLjungBoxLargeValues(t *testing.T) {
	rng := rand.New(rand.NewPCG(22, 22))
	small := testseries.AR1(rng, 300, 0, 0.3, 1)
	huge := make([]float64, len(small))
	for i, v := range small {
		huge[i] = 1e300 * v
	}
	a, _ := stats.LjungBox(small, 10, 0)
	b, _ := stats.LjungBox(huge, 10, 0)
	if b.Status != stats.StatusOK || math.Abs(a.Statistic-b.Statistic) > 1e-9*a.Statistic {
		t.Errorf("Ljung-Box at 1e300: %v (%s), at ordinary size %v", b.Statistic, b.Status, a.Statistic)
	}
	if _, err := stats.LjungBox(small, 5, 5); err == nil {
		t.Error("Ljung-Box with as many fitted parameters as lags: no error")
	}
}
