package unitroot

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// TestZivotAndrewsSizeAndPower checks by seeded simulation (plumb's own;
// common practice for validating a test) that the Zivot-Andrews test,
// default options (AIC lag choice up to Schwert's maximum, trimming 0.15),
// rejects at 5% about as often as its level promises on random walks, and
// nearly always on a stationary AR(1) with a level shift, whose date it
// finds:
//
//   - random walks of length 200 and 730, standard normal steps, every break
//     kind: size within [0.02, 0.09] (the table is for no lagged
//     differences; AIC's lag choice moves the size a little, as for ADF,
//     most on short series);
//   - AR(1), φ = 0.5, shifted by 4 marginal standard deviations (4/√0.75) at
//     a date drawn uniformly in the middle 70% of 730 observations: with a
//     break in the intercept, power above 0.90, and the break date within 10
//     observations of the truth in more than 0.80 of the series.
//
// reps series per cell (1,000; 200 with -short); the counts are printed.
func TestZivotAndrewsSizeAndPower(t *testing.T) {
	reps := 1000
	if testing.Short() {
		reps = 200
	}
	rng := rand.New(rand.NewPCG(1992, 730))
	kinds := []BreakKind{BreakLevel, BreakSlope, BreakLevelAndSlope}
	for _, T := range []int{200, 730} {
		x := make([]float64, T)
		rejected := map[BreakKind]int{}
		for r := 0; r < reps; r++ {
			w := 0.0
			for i := range x {
				w += rng.NormFloat64()
				x[i] = w
			}
			for _, k := range kinds {
				res, err := ZivotAndrews(x, ZivotAndrewsOptions{Break: k})
				if err != nil || res.Status != stats.StatusOK {
					t.Fatalf("random walk T=%d %s: %v %s", T, k, err, res.Status)
				}
				if res.PValue < 0.05 {
					rejected[k]++
				}
			}
		}
		for _, k := range kinds {
			rate := float64(rejected[k]) / float64(reps)
			t.Logf("random walks, T = %d, break %s: rejected at 5%% in %d of %d (%.3f)", T, k, rejected[k], reps, rate)
			if rate < 0.02 || rate > 0.09 {
				t.Errorf("size %.3f for break %s at T = %d, want within [0.02, 0.09]", rate, k, T)
			}
		}
	}

	const T, phi = 730, 0.5
	shift := 4 / math.Sqrt(1-phi*phi)
	x := make([]float64, T)
	var rejected, near, nearOfRejected int
	for r := 0; r < reps; r++ {
		b := T*15/100 + rng.IntN(T*70/100) // first shifted observation, in the middle 70%
		a := rng.NormFloat64() / math.Sqrt(1-phi*phi)
		for i := range x {
			a = phi*a + rng.NormFloat64()
			x[i] = a
			if i >= b {
				x[i] += shift
			}
		}
		res, err := ZivotAndrews(x, ZivotAndrewsOptions{})
		if err != nil || res.Status != stats.StatusOK {
			t.Fatalf("AR(1) with a shift: %v %s", err, res.Status)
		}
		close := testseries.Abs(res.BreakIndex-b) <= 10
		if res.PValue < 0.05 {
			rejected++
			if close {
				nearOfRejected++
			}
		}
		if close {
			near++
		}
	}
	t.Logf("AR(1) φ = 0.5 with a shift of 4 marginal SDs, T = %d: rejected at 5%% in %d of %d; break within 10 observations of the truth in %d of %d (%d of the %d rejected)",
		T, rejected, reps, near, reps, nearOfRejected, rejected)
	if rate := float64(rejected) / float64(reps); rate < 0.90 {
		t.Errorf("power %.3f, want above 0.90", rate)
	}
	if rate := float64(near) / float64(reps); rate < 0.80 {
		t.Errorf("break found within 10 observations in %.3f, want above 0.80", rate)
	}
}

// TestZivotAndrewsPValueCalibrated: under the null hypothesis the p-value
// is uniform, so at each level l the share of random walks with p < l is l
// within 3.5 binomial standard deviations. Random walks of length 60, 100
// and 400 (seeded; other lengths and seeds than the table's), no lagged
// differences (the table's own setting), every break kind, 3,000 walks
// each (1,000 with -short). The table at its longest length, used at every
// length as statsmodels' single table is, is printed beside: at 60
// observations it puts 42% of the walks below p = 0.5.
func TestZivotAndrewsPValueCalibrated(t *testing.T) {
	reps := 3000
	if testing.Short() {
		reps = 1000
	}
	levels := []float64{0.01, 0.05, 0.10, 0.25, 0.50, 0.75, 0.90}
	zero := 0
	for _, T := range []int{60, 100, 400} {
		for _, kind := range []BreakKind{BreakLevel, BreakSlope, BreakLevelAndSlope} {
			rng := rand.New(rand.NewPCG(6, uint64(T)))
			x := make([]float64, T)
			own := make([]int, len(levels))
			large := make([]int, len(levels))
			for r := 0; r < reps; r++ {
				w := 0.0
				for i := range x {
					w += rng.NormFloat64()
					x[i] = w
				}
				res, err := ZivotAndrews(x, ZivotAndrewsOptions{Break: kind, LagRule: LagGiven, MaxLag: &zero})
				if err != nil || res.Status != stats.StatusOK {
					t.Fatalf("T=%d %s: %v %s", T, kind, err, res.Status)
				}
				pl, _ := zivotAndrewsP(res.Statistic, kind, DefaultBreakTrim, 3199)
				for i, l := range levels {
					if res.PValue < l {
						own[i]++
					}
					if pl < l {
						large[i]++
					}
				}
			}
			share := func(c []int) []float64 {
				out := make([]float64, len(c))
				for i, v := range c {
					out[i] = float64(v) / float64(reps)
				}
				return out
			}
			t.Logf("T = %d, break %s, shares of p below %v: %.3f (the table at n = 3,199: %.3f)", T, kind, levels, share(own), share(large))
			for i, l := range levels {
				if sd := math.Sqrt(l * (1 - l) / float64(reps)); math.Abs(share(own)[i]-l) > 3.5*sd {
					t.Errorf("T = %d, break %s: %d of %d walks have p < %v", T, kind, own[i], reps, l)
				}
			}
		}
	}
}
