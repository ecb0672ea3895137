package unitroot

import (
	"math"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// ADFOptions configure the Augmented Dickey-Fuller test. The zero value
// fits a constant and chooses the lag by AIC up to Schwert's maximum.
type ADFOptions struct {
	Deterministic Deterministic
	LagRule       LagRule
	// MaxLag is the largest number of lagged differences tried, or the
	// number used under LagGiven. Nil means SchwertMaxLag(len(x)), capped at
	// len(x)/2 - terms - 1 so that the common sample keeps half the series,
	// and so that the widest model keeps two residual degrees of freedom.
	MaxLag *int
	// SameSample keeps the chosen model as fitted on the common sample of
	// the lag search. By default (false) the chosen model is re-fitted on its
	// own longest sample, len(x)-1-lags observations, as is common practice
	// (and what python3-statsmodels' adfuller does), so that a short chosen
	// lag does not waste the observations the longest candidate needed.
	SameSample bool
}

// ADF performs the Augmented Dickey-Fuller test (Dickey & Fuller 1979; Said
// & Dickey 1984) of the null hypothesis that x has a unit root. It fits
//
//	Δy_t = [α + β·t] + γ·y_{t-1} + Σ_{i=1..k} δ_i·Δy_{t-i} + e_t
//
// by least squares and reports the t-statistic of γ. Under the lag rules AIC,
// BIC and drop_insignificant every k from 0 to MaxLag is fitted on one common sample
// (t = MaxLag+2..T), all from one factorisation of the widest design (see
// numeric.NestedLS and its FactorGram), so their criteria are comparable; the chosen k is then re-fitted
// on its own longest sample unless SameSample is set. AIC is
// n·log(SSR/n) + 2m and BIC n·log(SSR/n) + m·log(n) for m regressors.
//
// The p-value is MacKinnon's (1994) asymptotic approximation; the critical
// values are MacKinnon's (2010) finite-sample response surface at the
// regression's number of observations.
//
// Statuses: non_finite for NaN or ±Inf anywhere; constant for a constant
// series; too_short when the requested lags leave fewer than two residual
// degrees of freedom or MaxLag exceeds len(x)/2 - terms - 1; singular when
// the regression fits perfectly or its design is rank deficient.
func ADF(x []float64, opts ADFOptions) (UnitRootResult, error) {
	d, err := opts.Deterministic.normalize()
	if err != nil {
		return UnitRootResult{}, err
	}
	rule, err := opts.LagRule.Normalize()
	if err != nil {
		return UnitRootResult{}, err
	}
	fail := func(s stats.Status) (UnitRootResult, error) { return failed("adf", d, NullUnitRoot, s), nil }
	if s := stats.CheckFinite(x); s != stats.StatusOK {
		return fail(s)
	}
	T := len(x)
	if T >= 2 && numeric.IsConstant(x) {
		return fail(stats.StatusConstant)
	}
	terms := d.terms()
	limit := T/2 - terms - 1
	// The default also keeps two residual degrees of freedom in the widest model.
	maxLag := min(SchwertMaxLag(T), limit, (T-4-terms)/2)
	if opts.MaxLag != nil {
		maxLag = *opts.MaxLag
		if maxLag < 0 {
			return UnitRootResult{}, numeric.Errorf("adf: the maximum lag must not be negative, got %d", maxLag)
		}
	}
	if maxLag < 0 || maxLag > limit || T-1-maxLag < terms+1+maxLag+2 {
		return fail(stats.StatusTooShort)
	}
	a := newADFDesign(x, d)
	defer a.release()

	lags := maxLag
	if rule != LagGiven {
		lags, err = a.chooseLag(maxLag, rule)
		if err != nil {
			return fail(stats.StatusSingular)
		}
	}
	start := lags
	if opts.SameSample {
		start = maxLag
	}
	tau, n, ok := a.tau(lags, start)
	if !ok {
		return fail(stats.StatusSingular)
	}
	p, bound := mackinnonPValue(tau, d)
	return UnitRootResult{
		Method: "adf", Deterministic: d, NullHypothesis: NullUnitRoot, Status: stats.StatusOK,
		Statistic: tau, PValue: p, PValueBound: bound,
		CriticalValues: MacKinnonCritical(d, n), Lags: lags, Observations: n,
	}, nil
}

// adfDesign builds ADF regressions on one (scaled) series.
type adfDesign struct {
	x, dx []float64
	d     Deterministic
	terms int
	ls    numeric.NestedLS
	// wsum[u] = Σ_{v<u} v·dx_v and xwsum[u] = Σ_{v<u} v·x_v, built on
	// first use by a model with a trend.
	wsum, xwsum []float64
	// search is the lag search's cross-product matrix (before factoring)
	// for searchLags lags on the sample from searchLags on; refitMatrix
	// grows its corner into the chosen model's matrix.
	search     []float64
	searchLags int
}

// prefix builds, once, the prefix sums of u·Δy_u and u·x_u that the trend
// column's products need.
func (a *adfDesign) prefix() {
	if a.wsum != nil {
		return
	}
	a.wsum = numeric.GetScratch(len(a.dx) + 1)
	a.xwsum = numeric.GetScratch(len(a.x) + 1)
	a.wsum[0], a.xwsum[0] = 0, 0
	for u, v := range a.dx {
		a.wsum[u+1] = a.wsum[u] + float64(u)*v
	}
	for u, v := range a.x {
		a.xwsum[u+1] = a.xwsum[u] + float64(u)*v
	}
}

// newADFDesign builds the design on x scaled to a largest magnitude of 1
// (the statistic is scale-free; the cross products stay well within range).
func newADFDesign(x []float64, d Deterministic) *adfDesign {
	xs := numeric.GetScratch(len(x))
	m := numeric.MaxAbs(x)
	for i, v := range x {
		xs[i] = v / m
	}
	dx := numeric.GetScratch(len(x) - 1)
	for i := range dx {
		dx[i] = xs[i+1] - xs[i]
	}
	return &adfDesign{x: xs, dx: dx, d: d, terms: d.terms()}
}

// release returns the design's scratch slices; a must not be used again.
func (a *adfDesign) release() {
	for _, s := range [][]float64{a.x, a.dx, a.wsum, a.xwsum, a.search} {
		numeric.PutScratch(s)
	}
}

// columns returns the design for the sample t = start..len(dx)-1 (indices
// of dx): the deterministic columns, then the lagged level if levelFirst,
// then lags lagged differences, then the lagged level if not levelFirst;
// and the response Δy_t.
func (a *adfDesign) columns(lags, start int, levelFirst bool) ([][]float64, []float64) {
	n := len(a.dx) - start
	cols := make([][]float64, 0, a.terms+1+lags)
	backing := make([]float64, n*(a.terms+1+lags))
	next := func() []float64 {
		c := backing[:n:n]
		backing = backing[n:]
		cols = append(cols, c)
		return c
	}
	for _, c := range a.d.columns(n) {
		copy(next(), c)
	}
	level := func() {
		copy(next(), a.x[start:start+n])
	}
	if levelFirst {
		level()
	}
	for j := 1; j <= lags; j++ {
		copy(next(), a.dx[start-j:start-j+n])
	}
	if !levelFirst {
		level()
	}
	y := append([]float64(nil), a.dx[start:]...)
	return cols, y
}

// chooseLag fits every lag 0..maxLag on the common sample and applies rule.
func (a *adfDesign) chooseLag(maxLag int, rule LagRule) (int, error) {
	a.crossProducts(maxLag)
	base := a.terms + 1
	if a.ls.Rank < base {
		return 0, numeric.ErrSingular
	}
	n := float64(a.ls.N)
	if rule == LagDropInsignificant {
		for k := maxLag; k >= 1; k-- {
			if base+k <= a.ls.Rank && math.Abs(a.ls.TLast(base+k)) >= 1.6448536269514722 {
				return k, nil
			}
		}
		return 0, nil
	}
	best, bestIC := 0, math.Inf(1)
	for k := 0; k <= maxLag && base+k <= a.ls.Rank; k++ {
		m := float64(base + k)
		ssr := a.ls.SSR(base + k)
		if ssr <= 0 {
			return 0, numeric.ErrSingular
		}
		penalty := 2 * m
		if rule == LagBIC {
			penalty = m * math.Log(n)
		}
		if ic := n*math.Log(ssr/n) + penalty; ic < bestIC {
			best, bestIC = k, ic
		}
	}
	return best, nil
}

// tau fits the model with lags lagged differences on the sample starting at
// start and returns the t-statistic of the lagged level and the number of
// observations. It factors the shifted cross products with the lagged level
// moved last (so its t-statistic is the last one); when the factor shows
// the design near singular (a pivot below 1e-8) it falls back to a
// Householder QR of the design itself.
func (a *adfDesign) tau(lags, start int) (float64, int, bool) {
	mat, p, n := a.refitMatrix(lags, start)
	// Move the lagged level (index terms) to the last regressor slot.
	m := p + 1
	order := make([]int, 0, m)
	for i := 0; i < p; i++ {
		if i != a.terms {
			order = append(order, i)
		}
	}
	order = append(order, a.terms, p)
	perm := numeric.GetZeroed(m * m)
	defer numeric.PutScratch(perm)
	for i := 0; i < m; i++ {
		for j := 0; j <= i; j++ {
			r, c := order[i], order[j]
			if r < c {
				r, c = c, r
			}
			perm[i*m+j] = mat[r*m+c]
		}
	}
	numeric.PutScratch(mat)
	var ls numeric.NestedLS
	if ls.FactorCross(perm, p, n) >= 1e-8 && ls.Rank == p {
		if ls.SSR(p) > 1e-20*ls.N0() {
			return ls.TLast(p), n, true
		}
		return math.NaN(), 0, false
	}
	cols, y := a.columns(lags, start, false)
	ls.Factor(cols, y)
	if ls.Rank < p || ls.SSR(p) <= 1e-24*ls.N0() {
		return math.NaN(), 0, false
	}
	return ls.TLast(p), ls.N, true
}

// crossProducts factors the cross-product matrix of the lag search's widest
// design [deterministic, level, lags 1..maxLag, Δy] on the common sample.
func (a *adfDesign) crossProducts(maxLag int) {
	mat, p, n := a.crossMatrix(maxLag, maxLag)
	a.search = numeric.GetScratch(len(mat))
	copy(a.search, mat)
	a.searchLags = maxLag
	a.ls.FactorCross(mat, p, n)
	numeric.PutScratch(mat)
}

// refitMatrix returns what crossMatrix(lags, start) returns. When the lag
// search's matrix is at hand, the model has only a constant (the trend
// column would change with the sample), and start lies k rows before the
// search's sample, it takes the search matrix's rows and columns for lags
// lags and adds the k earlier observations' products: k·m² work instead
// of the 2·(lags+1)·n of a new matrix.
func (a *adfDesign) refitMatrix(lags, start int) ([]float64, int, int) {
	k := a.searchLags - start
	p := a.terms + 1 + lags
	m := p + 1
	n := len(a.dx) - start
	if a.search == nil || a.terms > 1 || k < 0 || lags > a.searchLags || k*m*m >= 2*(lags+1)*n {
		return a.crossMatrix(lags, start)
	}
	ms := a.terms + 2 + a.searchLags
	index := func(i int) int { // refit column i in the search matrix
		if i == p {
			return ms - 1
		}
		return i
	}
	mat := numeric.GetZeroed(m * m) // the caller puts it back
	for i := 0; i < m; i++ {
		for j := 0; j <= i; j++ {
			mat[i*m+j] = a.search[index(i)*ms+index(j)]
		}
	}
	row := make([]float64, m)
	for t := start; t < a.searchLags; t++ { // dx index of the added observation
		c := 0
		if a.terms == 1 {
			row[c] = 1
			c++
		}
		row[c] = a.x[t]
		for j := 1; j <= lags; j++ {
			row[c+j] = a.dx[t-j]
		}
		row[p] = a.dx[t]
		for i := 0; i < m; i++ {
			for j := 0; j <= i; j++ {
				mat[i*m+j] += row[i] * row[j]
			}
		}
	}
	return mat, p, n
}

// crossMatrix returns the lower triangle of the cross-product matrix of the
// design [deterministic, level, lags 1..lags, Δy] on the sample t =
// start..len(dx)-1, with the number of regressors p and observations n. The
// lagged differences and the response are shifts of one series, Δy, so the
// products among them follow from the first row by the recurrence
//
//	S(i+1, j+1) = S(i, j) + Δy_{s-1-i}·Δy_{s-1-j} - Δy_{s+n-1-i}·Δy_{s+n-1-j}
//
// (s the first row of the sample, n its length): about 4·n·p work in all
// instead of n·p²/2 (DEVELOPERS.md, "Where the time goes").
func (a *adfDesign) crossMatrix(lags, start int) ([]float64, int, int) {
	n := len(a.dx) - start
	shift := func(j int) []float64 { return a.dx[start-j : start-j+n] } // lag j; j = 0 is Δy itself
	level := a.x[start : start+n]
	k := a.terms + 1 // deterministic columns, then the lagged level
	p := k + lags
	m := p + 1
	mat := numeric.GetZeroed(m * m) // the caller puts it back
	// index of lag j (0..lags) in the matrix: lags at k..k+lags-1, Δy last.
	at := func(j int) int {
		if j == 0 {
			return p
		}
		return k + j - 1
	}
	set := func(r, c int, v float64) {
		if r < c {
			r, c = c, r
		}
		mat[r*m+c] = v
	}
	nf := float64(n)
	lo, hi := start, start+n // the window of x the level column covers
	// Products among the deterministic columns (ones, and time (r+1)/n)
	// and the level, in closed form, as sums over the window, or (with a
	// trend) from prefix sums of x and u·x_u.
	if a.terms == 2 {
		a.prefix()
	}
	sumX := numeric.Sum(level)
	c := 0
	if a.terms >= 1 {
		set(0, 0, nf)
		c++
	}
	if a.terms == 2 {
		set(1, 0, (nf+1)/2)
		set(1, 1, (nf+1)*(2*nf+1)/(6*nf))
		c++
	}
	if a.terms >= 1 {
		set(c, 0, sumX)
	}
	if a.terms == 2 {
		// Σ_r (r+1)/n · x[lo+r] = (Σ u·x_u - (lo-1)·Σ x_u)/n over the window.
		set(c, 1, ((a.xwsum[hi]-a.xwsum[lo])-float64(lo-1)*sumX)/nf)
	}
	set(c, c, numeric.Dot(level, level))
	// The level and Δy itself against every shift: two sets of lagged dot
	// products over one window of Δy.
	window := a.dx[start-lags : start+n]
	levelShift := numeric.GetScratch(lags + 1)
	band := numeric.GetScratch(lags + 1)
	defer numeric.PutScratch(levelShift)
	defer numeric.PutScratch(band)
	numeric.LagDots(level, window, levelShift)
	numeric.LagDots(shift(0), window, band)
	// Deterministic columns against the shifts: window sums of Δy, each
	// from the one before (the window moves back one step per lag), and of
	// u·Δy_u from prefix sums.
	windowSum := numeric.Sum(shift(0))
	for l := 0; l <= lags; l++ {
		wlo, whi := start-l, start-l+n // the window of dx that shift(l) covers
		if l > 0 {
			windowSum += a.dx[wlo] - a.dx[whi]
		}
		col := 0
		if a.terms >= 1 {
			set(at(l), col, windowSum)
			col++
		}
		if a.terms == 2 {
			w := (a.wsum[whi] - a.wsum[wlo]) - float64(wlo-1)*windowSum
			set(at(l), col, w/nf)
			col++
		}
		set(at(l), col, levelShift[l])
	}
	dx := a.dx
	for d := 0; d <= lags; d++ { // diagonal band: pairs (i, i+d)
		v := band[d]
		set(at(0), at(d), v)
		for i := 0; i+d < lags; i++ {
			j := i + d
			v += dx[start-1-i]*dx[start-1-j] - dx[start+n-1-i]*dx[start+n-1-j]
			set(at(i+1), at(j+1), v)
		}
	}
	return mat, p, n
}
