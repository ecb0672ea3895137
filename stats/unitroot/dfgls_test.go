package unitroot

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// TestDFGLSAgainstUrca compares the DF-GLS statistic with r-cran-urca 1.3-3,
// ur.ers(x, type = "DF-GLS", model = "constant" | "trend", lag.max = k), in
// testdata/reference/unit_root_r.csv, within 1e-6 relative, and the trend
// critical values with urca's (ERS 1996 Table 1).
func TestDFGLSAgainstUrca(t *testing.T) {
	_, series := testseries.ReferenceSeries(t)
	checked, worst := 0, 0.0
	for _, row := range testseries.ReadCSV(t, "unit_root_r.csv") {
		if row["test"] != "dfgls" {
			continue
		}
		k := int(testseries.Num(t, row["lags"]))
		d := Deterministic(row["deterministic"])
		got, err := DFGLS(series[row["series"]], DFGLSOptions{Deterministic: d, LagRule: LagGiven, MaxLag: &k})
		if err != nil {
			t.Fatal(err)
		}
		want := testseries.Num(t, row["statistic"])
		rel := math.Abs(got.Statistic-want) / math.Abs(want)
		worst = math.Max(worst, rel)
		if got.Status != stats.StatusOK || rel > 1e-6 {
			t.Errorf("%s %s k=%d: %.10g (%s), want %.10g", row["series"], d, k, got.Statistic, got.Status, want)
		}
		if d == DeterministicLevelAndSlope {
			for i, col := range []string{"cutoff_01", "cutoff_05", "cutoff_10"} {
				if c := testseries.Num(t, row[col]); math.Abs(got.CriticalValues[i]-c) > 1e-9 {
					t.Errorf("%s n=%d %s: %v, want %v", row["series"], len(series[row["series"]]), col, got.CriticalValues[i], c)
				}
			}
		}
		checked++
	}
	t.Logf("%d rows, largest relative difference %.3g", checked, worst)
	if checked < 600 {
		t.Errorf("only %d rows", checked)
	}
}

// TestDFGLSTrendPValueAgainstERS: at the critical values of Elliott,
// Rothenberg & Stock (1996), Table 1 (trend; rows T = 50, 100, 200, as
// ersTrend holds them), plumb's p-value from its own simulation
// (dfglsTrendQuantiles) is within 25% of the table's level; both are Monte
// Carlo estimates (ERS's with fewer replications), and the rows' own
// irregularity (the 1% value at T = 200 is below the asymptotic one) shows
// errors of that size in the table.
func TestDFGLSTrendPValueAgainstERS(t *testing.T) {
	for _, row := range ersTrend[:3] {
		for i, level := range []float64{0.01, 0.05, 0.10} {
			p, bound := dfglsTrendPValue(row.crit[i], int(row.T))
			t.Logf("T=%v: ERS %v point %.2f, plumb's p %.4f", row.T, level, row.crit[i], p)
			if bound != PValueEstimate || math.Abs(p/level-1) > 0.25 {
				t.Errorf("T=%v, τ=%v: p %v (%s), ERS Table 1 says %v", row.T, row.crit[i], p, bound, level)
			}
		}
	}
	if p, bound := dfglsTrendPValue(5, 100); bound != PValueAtLeast || p != 0.9999 {
		t.Errorf("τ = 5: %v %s", p, bound)
	}
	if p, bound := dfglsTrendPValue(-8, 100); bound != PValueEstimate || !(p > 0 && p < 1e-6) {
		t.Errorf("τ = -8: %v %s", p, bound)
	}
	if p, bound := dfglsTrendPValue(-1e6, 100); bound != PValueAtMost || p != 1e-300 {
		t.Errorf("τ = -1e6: %v %s", p, bound)
	}
	prev := 0.0
	for tau := -7.0; tau < 2; tau += 0.01 {
		p, _ := dfglsTrendPValue(tau, 300)
		if p < prev {
			t.Fatalf("p falls from %v to %v at τ = %v", prev, p, tau)
		}
		prev = p
	}
}

// TestDFGLSTrendUniform: on fresh random walks (seeds and lengths the
// simulation behind the table did not use: T = 150 and 300, 20,000 each,
// no lagged differences) the p-values fall below 0.05, 1e-3 and 1e-4 within
// a factor 1.5 of nominal (with the Poisson allowance of
// TestPValueUniformity).
func TestDFGLSTrendUniform(t *testing.T) {
	reps := 20000
	if testing.Short() {
		reps = 2000
	}
	zero := 0
	for _, T := range []int{150, 300} {
		counts := testseries.Rejections(reps, T, 977, func(rng *rand.Rand, x []float64) {
			w := 0.0
			for i := range x {
				w += rng.NormFloat64()
				x[i] = w
			}
		}, func(x []float64) []float64 {
			r, _ := DFGLS(x, DFGLSOptions{Deterministic: DeterministicLevelAndSlope, LagRule: LagGiven, MaxLag: &zero})
			return []float64{r.PValue}
		})
		for j, level := range testseries.UniformityLevels {
			c, nominal := counts[0][j], level*float64(reps)
			t.Logf("T=%d: %d of %d below %v (%.2f× nominal)", T, c, reps, level, float64(c)/nominal)
			if lo, hi := testseries.PoissonQuantile(nominal/1.5, 0.001), testseries.PoissonQuantile(nominal*1.5, 0.999); c < lo || c > hi {
				t.Errorf("T=%d: %d below %v, outside [%d, %d]", T, c, level, lo, hi)
			}
		}
	}
}
