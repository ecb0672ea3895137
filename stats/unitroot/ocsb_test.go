package unitroot

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/plumb-sql/plumb/stats"
)

// TestOCSBSizeAndPower: under the null (ΔΔ_12 y = white noise, T = 240) the
// test rejects at 5% in 5% ± 2.5% of 1,000 fresh replications (a seed the
// table was not estimated from); a fixed monthly pattern plus AR(1) noise
// (deterministic seasonality, no seasonal unit root) is rejected in more
// than 90%.
func TestOCSBSizeAndPower(t *testing.T) {
	if testing.Short() {
		t.Skip("a seeded simulation: runs without -short")
	}
	rng := rand.New(rand.NewPCG(41, 42))
	const reps, s, n = 1000, 12, 240
	var nullRej, detRej int
	y := make([]float64, n)
	for r := 0; r < reps; r++ {
		seasonalRandomWalk(rng, y, s)
		if res, _ := OCSB(y, s); res.Status == stats.StatusOK && !res.SeasonalUnitRoot {
			nullRej++
		}
		a := 0.0
		for i := range y {
			a = 0.5*a + rng.NormFloat64()
			y[i] = 3*math.Sin(2*math.Pi*float64(i)/s) + a
		}
		if res, _ := OCSB(y, s); res.Status == stats.StatusOK && !res.SeasonalUnitRoot {
			detRej++
		}
	}
	size, power := float64(nullRej)/reps, float64(detRej)/reps
	t.Logf("OCSB at 5%%: rejects %.3f under a seasonal unit root, %.3f under deterministic seasonality", size, power)
	if size < 0.025 || size > 0.075 {
		t.Errorf("size %.3f, want 0.05 ± 0.025", size)
	}
	if power < 0.90 {
		t.Errorf("power %.3f, want above 0.90", power)
	}
}

func TestOCSBBadInput(t *testing.T) {
	if r, _ := OCSB(make([]float64, 20), 12); r.Status != stats.StatusTooShort {
		t.Errorf("20 values at period 12: %s", r.Status)
	}
	if _, err := OCSB(make([]float64, 100), 1); err == nil {
		t.Error("period 1 gave no error")
	}
	x := make([]float64, 100)
	for i := range x {
		x[i] = 5
	}
	if r, _ := OCSB(x, 4); r.Status != stats.StatusConstant {
		t.Errorf("constant: %s", r.Status)
	}
}
