package unitroot

import (
	"math"
	"math/rand/v2"
	"sort"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// OCSBResult is the outcome of the seasonal unit-root test.
type OCSBResult struct {
	// Statistic is the t-statistic of β2 (see OCSB).
	Statistic float64
	// Critical5 is the 5% critical value for this period and length, and
	// Critical holds the 1, 5 and 10% values.
	Critical  [3]float64
	Critical5 float64
	// SeasonalUnitRoot is true when the test does not reject the seasonal
	// unit root at 5% (Statistic ≥ Critical5).
	SeasonalUnitRoot bool
	Lags             int
	Observations     int
	Status           stats.Status
}

// OCSB performs the seasonal unit-root test of Osborn, Chui, Smith &
// Birchenhall (1988) for period s. It fits
//
//	Δ Δ_s y_t = β1·Δ_s y_{t-1} + β2·Δ y_{t-s} + Σ_{i=1..p} α_i·Δ Δ_s y_{t-i} + e_t
//
// (Δ = 1 - B, Δ_s = 1 - B^s) with p from 0 to 3 chosen by AIC on a common
// sample and the chosen model re-fitted on its own sample. Under the null
// hypothesis of a seasonal unit root β2 = 0; a t-statistic below the
// critical value rejects it, meaning the seasonal pattern, if any, is
// deterministic rather than stochastic.
//
// The critical values are plumb's own Monte Carlo estimates under the null
// (ΔΔ_s y = white noise), by the procedure above, tabulated in
// ocsb_table.go for periods 4, 7, 12, 24 and 52 as c∞ + c1/T; see
// testdata/ocsb/simulate.go. Other periods use the nearest tabulated one.
// It needs at least 3 periods plus 10 observations.
func OCSB(x []float64, s int) (OCSBResult, error) {
	if s < 2 {
		return OCSBResult{}, numeric.Errorf("ocsb: the period must be at least 2, got %d", s)
	}
	nan := math.NaN()
	r := OCSBResult{Statistic: nan, Critical5: nan, Critical: [3]float64{nan, nan, nan}}
	if st := stats.CheckFinite(x); st != stats.StatusOK {
		r.Status = st
		return r, nil
	}
	if len(x) < 3*s+10 {
		r.Status = stats.StatusTooShort
		return r, nil
	}
	if numeric.IsConstant(x) {
		r.Status = stats.StatusConstant
		return r, nil
	}
	stat, lags, n, ok := ocsbStatistic(numeric.Scaled(x), s, 3)
	if !ok {
		r.Status = stats.StatusSingular
		return r, nil
	}
	r.Statistic, r.Lags, r.Observations = stat, lags, n
	r.Critical = ocsbCritical(s, n)
	r.Critical5 = r.Critical[1]
	r.SeasonalUnitRoot = !(stat < r.Critical5)
	r.Status = stats.StatusOK
	return r, nil
}

// ocsbStatistic returns the t-statistic of β2, the lags chosen and the
// observations of the final fit.
func ocsbStatistic(y []float64, s, maxLag int) (float64, int, int, bool) {
	T := len(y)
	// Index t of each array is time t: dz_t = ΔΔ_s y_t (t ≥ s+1),
	// a_t = Δ_s y_{t-1} (t ≥ s+1), b_t = Δ y_{t-s} (t ≥ s+1). Columns are
	// copies of their windows (factor overwrites them).
	buf := numeric.GetScratch(3 * T)
	defer numeric.PutScratch(buf)
	dz, a, b := buf[:T], buf[T:2*T], buf[2*T:]
	for t := s + 1; t < T; t++ {
		dz[t] = y[t] - y[t-1] - y[t-s] + y[t-s-1]
		a[t] = y[t-1] - y[t-1-s]
		b[t] = y[t-s] - y[t-s-1]
	}
	var store []float64
	build := func(start, lags int, bLast bool) ([][]float64, []float64) {
		n := T - start
		if store != nil {
			numeric.PutScratch(store)
		}
		store = numeric.GetScratch((lags + 3) * n)
		cols := make([][]float64, 0, lags+2)
		next := func(src []float64) {
			c := store[len(cols)*n : (len(cols)+1)*n : (len(cols)+1)*n]
			copy(c, src)
			cols = append(cols, c)
		}
		next(a[start:])
		if !bLast {
			next(b[start:])
		}
		for i := 1; i <= lags; i++ {
			next(dz[start-i : T-i])
		}
		if bLast {
			next(b[start:])
		}
		dep := store[(lags+2)*n : (lags+3)*n]
		copy(dep, dz[start:])
		return cols, dep
	}
	defer func() { numeric.PutScratch(store) }()
	// AIC over p = 0..maxLag on the common sample.
	start := s + 1 + maxLag
	cols, dep := build(start, maxLag, false)
	// The search only compares nested models: the cross products' Cholesky
	// factor gives every SSR (NestedLS.FactorGram); a nearly dependent design goes
	// to Householder QR (the final fit always does).
	var ls numeric.NestedLS
	ls.FactorGram(cols, dep)
	if ls.Rank < len(cols) {
		cols, dep = build(start, maxLag, false)
		ls.Factor(cols, dep)
	}
	if ls.Rank < 2 {
		return 0, 0, 0, false
	}
	n := float64(ls.N)
	best, bestIC := 0, math.Inf(1)
	for p := 0; p <= maxLag && 2+p <= ls.Rank; p++ {
		ssr := ls.SSR(2 + p)
		if ssr <= 0 {
			return 0, 0, 0, false
		}
		if ic := n*math.Log(ssr/n) + 2*float64(2+p); ic < bestIC {
			best, bestIC = p, ic
		}
	}
	cols, dep = build(s+1+best, best, true)
	var fit numeric.NestedLS
	fit.Factor(cols, dep)
	m := len(cols)
	if fit.Rank < m || fit.SSR(m) <= 1e-24*fit.N0() {
		return 0, 0, 0, false
	}
	return fit.TLast(m), best, fit.N, true
}

// ocsbCritical interpolates the tabulated response surface.
func ocsbCritical(s, n int) [3]float64 {
	periods := make([]int, 0, len(ocsbTable))
	for p := range ocsbTable {
		periods = append(periods, p)
	}
	sort.Ints(periods)
	nearest := periods[0]
	for _, p := range periods {
		if math.Abs(math.Log(float64(p))-math.Log(float64(s))) < math.Abs(math.Log(float64(nearest))-math.Log(float64(s))) {
			nearest = p
		}
	}
	c := ocsbTable[nearest]
	var out [3]float64
	for i := range out {
		out[i] = c[i][0] + c[i][1]/float64(n)
	}
	return out
}

// SimulateOCSB returns the 1, 5 and 10% quantiles of the OCSB statistic
// under its null hypothesis (ΔΔ_s y_t = e_t, standard normal) for period s
// and series length T, over reps replications from seed.
func SimulateOCSB(s, T, reps int, seed uint64) [3]float64 {
	rng := rand.New(rand.NewPCG(seed, uint64(s*100000+T)))
	stats := make([]float64, 0, reps)
	y := make([]float64, T)
	for len(stats) < reps {
		seasonalRandomWalk(rng, y, s)
		if st, _, _, ok := ocsbStatistic(numeric.Scaled(y), s, 3); ok {
			stats = append(stats, st)
		}
	}
	sort.Float64s(stats)
	q := func(p float64) float64 { return stats[int(p*float64(len(stats)))] }
	return [3]float64{q(0.01), q(0.05), q(0.10)}
}

// seasonalRandomWalk fills y with a series that has both a unit root and a
// seasonal unit root at period s: ΔΔ_s y_t = e_t, e standard normal, the
// OCSB test's null hypothesis.
func seasonalRandomWalk(rng *rand.Rand, y []float64, s int) {
	for t := range y {
		v := rng.NormFloat64()
		if t >= 1 {
			v += y[t-1]
		}
		if t >= s {
			v += y[t-s]
		}
		if t >= s+1 {
			v -= y[t-s-1]
		}
		y[t] = v
	}
}
