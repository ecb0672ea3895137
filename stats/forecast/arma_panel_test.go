package forecast

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
	"strings"
	"sync"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
	"github.com/plumb-sql/plumb/stats/longtests"
	"github.com/plumb-sql/plumb/stats/verdict"
)

// Seeded panels for the ARMA model choice: the orders chosen and the
// coverage of the 95% intervals through the whole pipeline (verdict,
// recipe, model, forecast). They are long (about ten minutes on two
// cores) and run only with the long tests (stats/longtests):
//
//	PLUMB_LONG_TESTS=1 go test ./stats/forecast -run 'TestARMAPanel' -v -timeout 1h
//
// The README's tables come from that run; the tests check nothing beyond
// that every series gets a forecast, so that a change in the numbers is
// read, not asserted.

// armaPanelCase simulates one kind of series, in original units.
type armaPanelCase struct {
	name     string
	period   int // passed to the verdict: 1 declares the series non-seasonal
	simulate func(rng *rand.Rand, n int) []float64
}

// armaNoise returns n+burn standard normal innovations.
func armaNoise(rng *rand.Rand, n int) []float64 {
	e := make([]float64, n)
	for i := range e {
		e[i] = rng.NormFloat64()
	}
	return e
}

var armaPanelCases = []armaPanelCase{
	{"ARIMA(1,1,0)", 1, func(rng *rand.Rand, n int) []float64 {
		// (1 - 0.6B)(1 - B) z_t = 0.2 + e_t, z_0 = 100.
		return integrate(testseries.AR1(rng, n, 0.2, 0.6, 1), []float64{100})
	}},
	{"ARIMA(0,1,1)", 1, func(rng *rand.Rand, n int) []float64 {
		// (1 - B) z_t = e_t - 0.5 e_{t-1}, z_0 = 100.
		e := armaNoise(rng, n+1)
		w := make([]float64, n)
		for t := range w {
			w[t] = e[t+1] - 0.5*e[t]
		}
		return integrate(w, []float64{100})
	}},
	{"(0,1,1)(0,1,1)12", 12, func(rng *rand.Rand, n int) []float64 {
		// (1 - B)(1 - B^12) z_t = (1 - 0.4B)(1 - 0.6B^12) e_t, started on a
		// yearly pattern around 100.
		e := armaNoise(rng, n+13)
		w := make([]float64, n)
		for t := range w {
			w[t] = e[t+13] - 0.4*e[t+12] - 0.6*e[t+1] + 0.24*e[t]
		}
		year := make([]float64, 12)
		for i := range year {
			year[i] = 100 + 10*math.Sin(2*math.Pi*float64(i)/12)
		}
		// (1 - B^12) first, then (1 - B): u = (1-B)^{-1} w, z = (1-B^12)^{-1} u.
		u := integrate(w, []float64{0})
		return integrate(u, year)
	}},
	{"log ARIMA(1,1,0)", 1, func(rng *rand.Rand, n int) []float64 {
		// x = exp(z), (1 - 0.4B)(1 - B) z_t = 0.005 + 0.05 e_t, x_0 = 200.
		z := integrate(testseries.AR1(rng, n, 0.005, 0.4, 0.05), []float64{math.Log(200)})
		for i, v := range z {
			z[i] = math.Exp(v)
		}
		return z
	}},
}

// armaPanelRun is what one case's panel gave.
type armaPanelRun struct {
	series, forecast        int
	covered                 [2][2]int // [before, after][h = 1, last]
	noDifference            int       // series given d = 0 (and D = 0)
	coveredNoDifference     [2][2]int
	orderBefore, orderAfter map[string]int
	leastSquaresChosen      int
}

// runARMAPanel judges each simulated series of length n (period as the
// case says), forecasts horizon steps through its recipe before (the
// least-squares autoregression alone) and after (ChooseARMA), and counts
// the held-out values inside the 95% intervals.
func runARMAPanel(t *testing.T, c armaPanelCase, seed uint64, series, n, horizon int) armaPanelRun {
	run := armaPanelRun{series: series, orderBefore: map[string]int{}, orderAfter: map[string]int{}}
	var mu sync.Mutex
	var failure error
	testseries.InParallel(func(worker, workers int) {
		for i := worker; i < series; i += workers {
			rng := rand.New(rand.NewPCG(seed, uint64(i)))
			x := c.simulate(rng, n+horizon)
			history, held := x[:n], x[n:]
			v, err := verdict.Stationarity(history, verdict.StationarityOptions{Period: c.period})
			if err != nil {
				mu.Lock()
				failure = err
				mu.Unlock()
				return
			}
			if v.Status != stats.StatusOK && v.Status != stats.StatusSeasonUnknown {
				continue
			}
			rec := v.Recipe()
			var got [2]RecipeForecast
			for k, lsOnly := range []bool{true, false} {
				got[k], err = ForecastByRecipe(v.Judged(), rec, RecipeForecastOptions{Horizon: horizon, Coverage: 0.95,
					AR: AROptions{Period: rec.Period}, LeastSquaresOnly: lsOnly})
				if err != nil {
					mu.Lock()
					failure = err
					mu.Unlock()
					return
				}
			}
			mu.Lock()
			if got[0].Status == stats.StatusOK && got[1].Status == stats.StatusOK {
				run.forecast++
				flat := rec.Differences == 0 && rec.SeasonalDifferences == 0
				if flat {
					run.noDifference++
				}
				for k := range got {
					for j, h := range []int{0, horizon - 1} {
						if got[k].Lower[h] <= held[h] && held[h] <= got[k].Upper[h] {
							run.covered[k][j]++
							if flat {
								run.coveredNoDifference[k][j]++
							}
						}
					}
				}
				run.orderBefore[fmt.Sprintf("AR(%d)", got[0].Model.Order)]++
				o := got[1].Chosen.Order
				label := fmt.Sprintf("(%d,%d)", o.AR, o.MA)
				if o.SeasonalAR+o.SeasonalMA > 0 {
					label += fmt.Sprintf("(%d,%d)", o.SeasonalAR, o.SeasonalMA)
				}
				if got[1].Chosen.LeastSquares {
					label = fmt.Sprintf("AR(%d) least squares", o.AR)
					run.leastSquaresChosen++
				}
				run.orderAfter[label]++
			}
			mu.Unlock()
		}
	})
	if failure != nil {
		t.Fatal(failure)
	}
	return run
}

// topOrders renders the most frequent orders of a distribution.
func topOrders(counts map[string]int, k int) string {
	type kv struct {
		k string
		v int
	}
	var all []kv
	for key, v := range counts {
		all = append(all, kv{key, v})
	}
	sort.Slice(all, func(i, j int) bool { return all[i].v > all[j].v || (all[i].v == all[j].v && all[i].k < all[j].k) })
	var parts []string
	for i, e := range all {
		if i == k {
			parts = append(parts, "...")
			break
		}
		parts = append(parts, fmt.Sprintf("%s %d", e.k, e.v))
	}
	return strings.Join(parts, ", ")
}

// TestARMAPanel: 1,000 series of 300 values per case (seed 20261204),
// horizon 14.
func TestARMAPanel(t *testing.T) {
	longtests.Require(t, "4 × 1,000 simulated series through verdict, recipe and two forecasts each, about ten minutes")
	const series, n, horizon = 1000, 300, 14
	var out strings.Builder
	for ci, c := range armaPanelCases {
		run := runARMAPanel(t, c, 20261204+uint64(ci), series, n, horizon)
		if run.forecast < series*9/10 {
			t.Errorf("%s: only %d of %d series were forecast", c.name, run.forecast, series)
		}
		f := float64(run.forecast)
		pct := func(k int) float64 { return 100 * float64(k) / f }
		fmt.Fprintf(&out, "%s: %d of %d series forecast; d = 0 (and D = 0) for %d (%.1f%%)\n", c.name, run.forecast, series, run.noDifference, pct(run.noDifference))
		for k, label := range []string{"before (least-squares AR)", "after (ChooseARMA)"} {
			fmt.Fprintf(&out, "  %-26s covered h=1 %d (%.1f%%), h=%d %d (%.1f%%); on the d = 0 series h=1 %d, h=%d %d of %d\n", label,
				run.covered[k][0], pct(run.covered[k][0]), horizon, run.covered[k][1], pct(run.covered[k][1]),
				run.coveredNoDifference[k][0], horizon, run.coveredNoDifference[k][1], run.noDifference)
		}
		fmt.Fprintf(&out, "  orders before: %s\n  orders after: %s (least squares chosen %d)\n", topOrders(run.orderBefore, 8), topOrders(run.orderAfter, 8), run.leastSquaresChosen)
	}
	t.Logf("ARMA panel, %d series of %d values per case, seed 20261204:\n%s", series, n, out.String())
}
