package unitroot

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// TestMeanBreakTable: the simulated limiting law against Andrews (1993,
// Table 1, p = 1, π0 = 0.15: 7.17, 8.85 and 12.35 at 10, 5 and 1%, from
// memory). plumb's table approximates the Brownian bridge by 1,000 steps,
// whose supremum over a grid falls a little short of the continuous one, so
// its quantiles run 1.5-3% below Andrews'; that is the size of the check.
func TestMeanBreakTable(t *testing.T) {
	for _, c := range []struct{ p, andrews float64 }{{0.10, 7.17}, {0.05, 8.85}, {0.01, 12.35}} {
		var q float64
		for _, pt := range meanBreakTable {
			if pt.p == c.p {
				q = pt.quantile
			}
		}
		if r := q / c.andrews; r < 0.96 || r > 1.0 {
			t.Errorf("quantile at %v: %v, Andrews %v (ratio %.3f)", c.p, q, c.andrews, r)
		}
	}
	for i := 1; i < len(meanBreakTable); i++ {
		a, b := meanBreakTable[i-1], meanBreakTable[i]
		if !(b.p < a.p && b.quantile > a.quantile) {
			t.Fatalf("table not monotone at %d", i)
		}
	}
	if p, bound := meanBreakPValue(100); p != 0.0001 || bound != PValueAtMost {
		t.Errorf("beyond the table: p %v %s", p, bound)
	}
}

// TestMeanBreakSizeAndPower: on 2,000 seeded AR(1) series (φ = 0.5, T =
// 730) without a break, the test rejects at 5% in 5% ± 2.5%; with a shift of
// 4 marginal standard deviations at a random date in the middle 60%, it
// rejects in more than 99% and dates the break within 10 observations in
// more than 95%.
func TestMeanBreakSizeAndPower(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	const reps, T = 2000, 730
	var rejected, power, dated int
	for r := 0; r < reps; r++ {
		x := testseries.AR1Noise(rng, T, 0.5, 1)
		if MeanBreak(x).PValue < 0.05 {
			rejected++
		}
		at := int(float64(T) * (0.2 + 0.6*rng.Float64()))
		for i := at; i < T; i++ {
			x[i] += 4
		}
		b := MeanBreak(x)
		if b.PValue < 0.05 {
			power++
		}
		if testseries.Abs(b.Index-at) <= 10 {
			dated++
		}
		if r == 0 && math.Abs(b.Size-4) > 0.5 {
			t.Errorf("size %v, want about 4", b.Size)
		}
	}
	t.Logf("size %d of %d, power %d of %d, dated within 10: %d", rejected, reps, power, reps, dated)
	if rate := float64(rejected) / reps; rate < 0.025 || rate > 0.075 {
		t.Errorf("size %d of %d", rejected, reps)
	}
	if power < reps*99/100 || dated < reps*95/100 {
		t.Errorf("power %d, dated %d of %d", power, dated, reps)
	}
}

// TestMeanBreakBadInput: statuses, never a panic.
func TestMeanBreakBadInput(t *testing.T) {
	for _, test := range []struct {
		x    []float64
		want stats.Status
	}{
		{[]float64{1, 2, 3}, stats.StatusTooShort},
		{make([]float64, 40), stats.StatusConstant},
		{append(make([]float64, 39), math.NaN()), stats.StatusNonFinite},
	} {
		if got := MeanBreak(test.x).Status; got != test.want {
			t.Errorf("%v: %s, want %s", test.x, got, test.want)
		}
	}
}
