package verdict

import (
	"math/rand/v2"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// TestVerdictLengthMonotone: the length the verdict needs grows with the
// series. For every length n from 8 to 200 and periods 1 (declared
// non-seasonal), 4, 7 and 12, the verdict on the first n values is
// too_short only below some length and never again above it. Series: R's
// co2, nottem and sunspot.year (Debian's r-base-core 4.2.2 datasets,
// testdata/reference/datasets_r.csv) and seeded white noise and a random
// walk (plumb's own).
func TestVerdictLengthMonotone(t *testing.T) {
	_, all := testseries.ReferenceSeries(t)
	named := map[string][]float64{"co2": all["co2"], "nottem": all["nottem"], "sunspot_year": all["sunspot_year"]}
	rng := rand.New(rand.NewPCG(20261204, 1))
	noise, walk := make([]float64, 200), make([]float64, 200)
	level := 0.0
	for i := range noise {
		noise[i] = rng.NormFloat64()
		level += rng.NormFloat64()
		walk[i] = level
	}
	named["white_noise"], named["random_walk"] = noise, walk
	for name, x := range named {
		if len(x) < 200 {
			t.Fatalf("%s has %d values, fewer than 200", name, len(x))
		}
		for _, period := range []int{1, 4, 7, 12} {
			firstOK := 0
			for n := 8; n <= 200; n++ {
				v, err := Stationarity(x[:n], StationarityOptions{Period: period})
				if err != nil {
					t.Fatalf("%s, period %d, n = %d: %v", name, period, n, err)
				}
				short := v.Status == stats.StatusTooShort
				if !short && firstOK == 0 {
					firstOK = n
				}
				if short && firstOK > 0 {
					t.Errorf("%s, period %d: too_short at n = %d but judged at n = %d", name, period, n, firstOK)
				}
			}
			if firstOK == 0 || firstOK > 40 {
				t.Errorf("%s, period %d: first judged at n = %d", name, period, firstOK)
			}
		}
	}
}

// TestVerdictDeclaredNonSeasonal: period 1 declares a series non-seasonal:
// no period is detected (R's monthly nottem, strongly seasonal, is judged
// as if it had none), the status is ok, not season_unknown, and the
// recipe has no seasonal step; a negative period is an error.
func TestVerdictDeclaredNonSeasonal(t *testing.T) {
	_, all := testseries.ReferenceSeries(t)
	x := all["nottem"] // Debian's r-base-core 4.2.2 datasets
	v, err := Stationarity(x, StationarityOptions{Period: 1})
	if err != nil {
		t.Fatal(err)
	}
	rec := v.Recipe()
	if v.Status != stats.StatusOK || v.Period != 0 || rec.SeasonalDifferences != 0 || rec.SeasonalMeans != nil {
		t.Errorf("period 1: status %s, period %d, D = %d, seasonal means %v", v.Status, v.Period, rec.SeasonalDifferences, rec.SeasonalMeans != nil)
	}
	detected, err := Stationarity(x, StationarityOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if detected.Period != 12 {
		t.Errorf("nottem with the period detected: period %d, want 12", detected.Period)
	}
	if _, err := Stationarity(x, StationarityOptions{Period: -1}); err == nil {
		t.Error("period -1: no error")
	}
}
