package verdict

import (
	"math"
	"sort"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
	"github.com/plumb-sql/plumb/stats/unitroot"
	"gonum.org/v1/gonum/stat/distuv"
)

// StabilityOptions configure Stability. The zero value picks the segments
// from the series' length.
type StabilityOptions struct {
	// Segments is the number of consecutive segments compared; 0 means
	// min(10, T/25), at least 2.
	Segments int
	// Period, when above 1, makes each segment a whole number of periods,
	// so that a seasonal pattern does not pass for a shifting mean.
	Period int
	// ArchLags is the number of lags of the ARCH-LM test; 0 means 5.
	ArchLags int
}

// StabilityResult compares local with global behaviour.
type StabilityResult struct {
	Segments      int
	SegmentLength int // the common length; the oldest segment also takes the remainder
	// MeanStatistic and MeanPValue test equal segment means (see Stability).
	MeanStatistic, MeanPValue float64
	// SpreadStatistic and SpreadPValue test equal segment spreads.
	SpreadStatistic, SpreadPValue float64
	// BrownForsytheF and BrownForsytheP are the classic Brown-Forsythe
	// (1974) test, which assumes independent observations; reported for
	// comparison only.
	BrownForsytheF, BrownForsytheP float64
	// SpreadRatio is the largest segment standard deviation over the smallest.
	SpreadRatio float64
	// MeanSpreadCorrelation is the correlation of segment means with segment
	// standard deviations: near 1 when the spread grows with the level.
	MeanSpreadCorrelation float64
	// ArchStatistic and ArchPValue are Engle's (1982) ARCH-LM test on the
	// residuals of an AR(1) fit, with ArchLags lags.
	ArchStatistic, ArchPValue float64
	ArchLags                  int
	// TrendSlope is the least-squares slope per observation; TrendT its
	// t-statistic with a prewhitened Newey-West standard error and
	// TrendPValue the two-sided normal p-value.
	TrendSlope, TrendT, TrendPValue float64
	// MannKendallZ and MannKendallPValue are the Mann-Kendall trend test
	// (Mann 1945, Kendall 1975) with the tie correction; it assumes
	// independent observations.
	MannKendallZ, MannKendallPValue float64
	Status                          stats.Status
}

// Stability compares the local behaviour of x with its global behaviour.
// The series is cut into k consecutive segments of length m_j with means
// x̄_j and medians M_j.
//
// Equal means: Welch's ANOVA and Kruskal-Wallis both assume independent
// observations, and for autocorrelated series (the usual case) their size is
// badly inflated: an AR(1) with φ = 0.6 is flagged most of the time. plumb
// therefore uses the Wald statistic with a long-run variance,
//
//	Q = Σ_j m_j (x̄_j - x̄)² / (c·λ̂²),
//
// where λ̂² is the long-run variance of the deviations from the segment
// means (an AR(1) approximation, bias-corrected for the demeaning) and c
// corrects for short segments; the p-value is P(F(k-1, ν) > Q/(k-1)), with
// ν the degrees of freedom of λ̂² (segment_wald.go has the formulas and the
// measurements behind them).
//
// Equal spreads: the same statistic on z_t = |x_t - M_j|, the absolute
// deviations from the segment medians that Brown & Forsythe (1974) compare,
// so a difference in mean absolute deviation between segments is tested
// with the long-run variance in place of the within-group variance.
//
// Statuses: non_finite; too_short below 10 observations or when segments
// would hold fewer than 5; constant.
func Stability(x []float64, opts StabilityOptions) (StabilityResult, error) {
	return stability(x, opts, true)
}

// stability computes Stability; with full false it leaves out what the
// verdict does not use (ARCH-LM, the trend slope, Mann-Kendall and the
// classic Brown-Forsythe test), which are then NaN.
func stability(x []float64, opts StabilityOptions, full bool) (StabilityResult, error) {
	if opts.Segments < 0 || opts.Segments == 1 || opts.ArchLags < 0 {
		return StabilityResult{}, numeric.Errorf("stability: segments must be 0 (automatic) or at least 2, and ARCH lags not negative")
	}
	r := StabilityResult{Status: stats.StatusOK}
	nanAll := func(s stats.Status) (StabilityResult, error) {
		n := math.NaN()
		r = StabilityResult{MeanStatistic: n, MeanPValue: n, SpreadStatistic: n, SpreadPValue: n,
			BrownForsytheF: n, BrownForsytheP: n, SpreadRatio: n, MeanSpreadCorrelation: n,
			ArchStatistic: n, ArchPValue: n, TrendSlope: n, TrendT: n, TrendPValue: n,
			MannKendallZ: n, MannKendallPValue: n, Status: s}
		return r, nil
	}
	if s := stats.CheckFinite(x); s != stats.StatusOK {
		return nanAll(s)
	}
	T := len(x)
	if T < 10 {
		return nanAll(stats.StatusTooShort)
	}
	if numeric.IsConstant(x) {
		return nanAll(stats.StatusConstant)
	}
	bounds := segmentBounds(T, opts.Segments, opts.Period)
	if bounds == nil {
		return nanAll(stats.StatusTooShort)
	}
	k := len(bounds) - 1
	r.Segments = k
	r.SegmentLength = bounds[k] - bounds[k-1]
	xs := numeric.ScaledInto(numeric.GetScratch(T), x)
	defer numeric.PutScratch(xs)
	means := make([]float64, k)
	sds := make([]float64, k)
	z := numeric.GetScratch(T)
	defer numeric.PutScratch(z)
	for j := 0; j < k; j++ {
		seg := xs[bounds[j]:bounds[j+1]]
		means[j], sds[j] = numeric.MeanSD(seg)
		zs := z[bounds[j]:bounds[j+1]] // the median is found in place, then overwritten
		copy(zs, seg)
		med := medianInPlace(zs)
		for i, v := range seg {
			zs[i] = math.Abs(v - med)
		}
	}
	r.MeanStatistic, r.MeanPValue = segmentWald(xs, bounds, 0)
	r.SpreadStatistic, r.SpreadPValue = segmentWald(z, bounds, spreadCentringInflation)
	minSD, maxSD := math.Inf(1), 0.0
	for _, s := range sds {
		minSD, maxSD = math.Min(minSD, s), math.Max(maxSD, s)
	}
	r.SpreadRatio = maxSD / minSD
	r.MeanSpreadCorrelation = correlation(means, sds)
	r.ArchLags = opts.ArchLags
	if !full {
		n := math.NaN()
		r.BrownForsytheF, r.BrownForsytheP, r.ArchStatistic, r.ArchPValue = n, n, n, n
		r.TrendSlope, r.TrendT, r.TrendPValue, r.MannKendallZ, r.MannKendallPValue = n, n, n, n, n
		return r, nil
	}
	r.BrownForsytheF, r.BrownForsytheP = brownForsythe(z, bounds)
	if r.ArchLags == 0 {
		r.ArchLags = 5
	}
	r.ArchStatistic, r.ArchPValue = archLM(xs, r.ArchLags)
	r.TrendSlope, r.TrendT, r.TrendPValue = trendSlope(xs)
	r.TrendSlope *= numeric.MaxAbs(x) // back to the series' units
	r.MannKendallZ, r.MannKendallPValue = MannKendall(x)
	return r, nil
}

// segmentBounds returns k+1 boundaries cutting T observations into k
// consecutive segments of equal length (a multiple of period when period >
// 1), the oldest segment taking the remainder; nil when segments would be
// shorter than 5. With a period, the length is the multiple of it nearest
// T/k, at least 5; when that leaves fewer than two segments, it is the most
// whole periods that still leave two; and when not even two segments of
// whole periods (at least 5 values each) fit, the period is set aside and
// the series is cut as without one. So the length the check needs grows
// with the series, never the other way (a seasonally differenced series one
// to two periods long is still checked).
func segmentBounds(T, k, period int) []int {
	if k == 0 {
		k = min(10, max(2, T/25))
	}
	length := T / k
	if period > 1 && T/2/period*period >= 5 {
		length = max(period, int(math.Round(float64(length)/float64(period)))*period)
		for length < 5 {
			length += period
		}
		if T/length < 2 {
			length = T / 2 / period * period
		}
		k = T / length
	}
	if k < 2 || length < 5 {
		return nil
	}
	bounds := make([]int, k+1)
	bounds[k] = T
	for j := k - 1; j >= 1; j-- {
		bounds[j] = bounds[j+1] - length
	}
	return bounds
}

// brownForsythe is the classic one-way ANOVA F on z across segments.
func brownForsythe(z []float64, bounds []int) (float64, float64) {
	k := len(bounds) - 1
	n := len(z)
	grand := 0.0
	for _, v := range z {
		grand += v
	}
	grand /= float64(n)
	var between, within float64
	for j := 0; j < k; j++ {
		seg := z[bounds[j]:bounds[j+1]]
		m, _ := numeric.MeanSD(seg)
		between += float64(len(seg)) * (m - grand) * (m - grand)
		for _, v := range seg {
			within += (v - m) * (v - m)
		}
	}
	if within == 0 {
		return math.NaN(), math.NaN()
	}
	f := (between / float64(k-1)) / (within / float64(n-k))
	return f, distuv.F{D1: float64(k - 1), D2: float64(n - k)}.Survival(f)
}

// archLM is Engle's (1982) Lagrange-multiplier test for ARCH effects: the
// residuals e of x on its own lag (an AR(1) with mean) are squared and
// regressed on a constant and q of their own lags; LM = n·R² is χ²(q).
func archLM(x []float64, q int) (float64, float64) {
	n := len(x)
	if n-1-q < q+3 {
		return math.NaN(), math.NaN()
	}
	mean := 0.0
	for _, v := range x {
		mean += v
	}
	mean /= float64(n)
	var num, den float64
	for t := 1; t < n; t++ {
		num += (x[t] - mean) * (x[t-1] - mean)
		den += (x[t-1] - mean) * (x[t-1] - mean)
	}
	phi := num / den
	e2 := make([]float64, n-1)
	for t := 1; t < n; t++ {
		e := (x[t] - mean) - phi*(x[t-1]-mean)
		e2[t-1] = e * e
	}
	m := len(e2) - q
	cols := make([][]float64, q+1)
	cols[0] = make([]float64, m)
	for i := range cols[0] {
		cols[0][i] = 1
	}
	for j := 1; j <= q; j++ {
		cols[j] = append([]float64(nil), e2[q-j:q-j+m]...)
	}
	y := append([]float64(nil), e2[q:]...)
	ybar := 0.0
	for _, v := range y {
		ybar += v
	}
	ybar /= float64(m)
	tss := 0.0
	for _, v := range y {
		tss += (v - ybar) * (v - ybar)
	}
	var ls numeric.NestedLS
	ls.Factor(cols, y)
	if tss == 0 || ls.Rank < q+1 {
		return math.NaN(), math.NaN()
	}
	lm := float64(m) * (1 - ls.SSR(q+1)/tss)
	return lm, distuv.ChiSquared{K: float64(q)}.Survival(lm)
}

// trendSlope returns the least-squares slope of x on time, its t-statistic
// with the prewhitened long-run variance of (t - t̄)·u_t (a Newey-West
// standard error), and the two-sided normal p-value.
func trendSlope(x []float64) (float64, float64, float64) {
	n := float64(len(x))
	tbar := (n - 1) / 2
	mean := 0.0
	for _, v := range x {
		mean += v
	}
	mean /= n
	var sxy, sxx float64
	for i, v := range x {
		d := float64(i) - tbar
		sxy += d * (v - mean)
		sxx += d * d
	}
	b := sxy / sxx
	w := make([]float64, len(x))
	for i, v := range x {
		d := float64(i) - tbar
		w[i] = d * (v - mean - b*d)
	}
	se := math.Sqrt(n * unitroot.PrewhitenedLongRunVariance(w) / (sxx * sxx))
	if !(se > 0) {
		return b, math.NaN(), math.NaN()
	}
	t := b / se
	return b, t, 2 * distuv.UnitNormal.Survival(math.Abs(t))
}

// MannKendall returns the Mann-Kendall trend statistic as a normal score,
//
//	S = Σ_{i<j} sign(x_j - x_i),
//	Var S = [n(n-1)(2n+5) - Σ_ties t(t-1)(2t+5)] / 18,
//	Z = (S - sign S) / √Var S,
//
// and its two-sided p-value. S is counted in O(n log n) with a Fenwick tree
// over the ranks.
func MannKendall(x []float64) (float64, float64) {
	n := len(x)
	if n < 3 {
		return math.NaN(), math.NaN()
	}
	sorted := append([]float64(nil), x...)
	sort.Float64s(sorted)
	rank := func(v float64) int { return sort.SearchFloat64s(sorted, v) + 1 } // 1-based, ties share the lowest
	tree := make([]int, n+1)
	add := func(i int) {
		for ; i <= n; i += i & -i {
			tree[i]++
		}
	}
	count := func(i int) int { // how many added ranks are ≤ i
		c := 0
		for ; i > 0; i -= i & -i {
			c += tree[i]
		}
		return c
	}
	var s float64
	for j, v := range x {
		r := rank(v)
		below := count(r - 1)
		sameOrBelow := count(r)
		// Equal values share the lowest rank, so "≤ r" counts ties exactly.
		above := j - sameOrBelow
		s += float64(below - above)
		add(r)
	}
	nf := float64(n)
	variance := nf * (nf - 1) * (2*nf + 5)
	for i := 0; i < n; {
		j := i
		for j < n && sorted[j] == sorted[i] {
			j++
		}
		t := float64(j - i)
		variance -= t * (t - 1) * (2*t + 5)
		i = j
	}
	variance /= 18
	if variance <= 0 {
		return math.NaN(), math.NaN()
	}
	z := 0.0
	switch {
	case s > 0:
		z = (s - 1) / math.Sqrt(variance)
	case s < 0:
		z = (s + 1) / math.Sqrt(variance)
	}
	return z, 2 * distuv.UnitNormal.Survival(math.Abs(z))
}

// median returns the median of x (x is not modified), by quickselect in
// expected linear time.
func median(x []float64) float64 {
	s := numeric.GetScratch(len(x))
	defer numeric.PutScratch(s)
	copy(s, x)
	return medianInPlace(s)
}

// medianInPlace returns the median of s, reordering s.
func medianInPlace(s []float64) float64 {
	n := len(s)
	if n%2 == 1 {
		return selectKth(s, n/2)
	}
	hi := selectKth(s, n/2)
	// After selection, everything below index n/2 is ≤ s[n/2]: the lower
	// middle value is their maximum.
	lo := s[0]
	for _, v := range s[1 : n/2] {
		if v > lo {
			lo = v
		}
	}
	return (lo + hi) / 2
}

// selectKth rearranges s so that s[k] is the value a sort would put there,
// with no larger value before it and no smaller after, and returns it.
//
// Quickselect with a median-of-three pivot and Lomuto's partition written
// without a branch on the data: on fresh segments a branching partition
// makes the branch predictor fail about half the time (DEVELOPERS.md,
// "Branches on data", has what BenchmarkSelectKth measured). Values equal to
// the pivot are gathered next to it in a second such pass, so that long
// runs of one value (a stretch of zero sales) keep the work linear.
func selectKth(s []float64, k int) float64 {
	lo, hi := 0, len(s)-1
	for lo < hi {
		mid := lo + (hi-lo)/2
		if s[mid] < s[lo] {
			s[mid], s[lo] = s[lo], s[mid]
		}
		if s[hi] < s[lo] {
			s[hi], s[lo] = s[lo], s[hi]
		}
		if s[hi] < s[mid] {
			s[hi], s[mid] = s[mid], s[hi]
		}
		pivot := s[mid]
		s[mid], s[hi] = s[hi], s[mid]
		// s[lo:j] < pivot ≤ s[j:i] as i runs over s[lo:hi].
		j := lo
		for i, t := range s[lo:hi] {
			s[lo+i] = s[j]
			s[j] = t
			step := 0
			if t < pivot {
				step = 1
			}
			j += step
		}
		s[j], s[hi] = s[hi], s[j]
		if k <= j {
			if k == j {
				return pivot
			}
			hi = j - 1
			continue
		}
		// Right of the pivot every value is ≥ pivot; gather those equal to it.
		e := j + 1
		for i, t := range s[j+1 : hi+1] {
			s[j+1+i] = s[e]
			s[e] = t
			step := 0
			if t <= pivot {
				step = 1
			}
			e += step
		}
		if k < e {
			return pivot
		}
		lo = e
	}
	return s[k]
}

// correlation returns Pearson's correlation of a and b.
func correlation(a, b []float64) float64 {
	ma, _ := numeric.MeanSD(a)
	mb, _ := numeric.MeanSD(b)
	var sab, saa, sbb float64
	for i := range a {
		sab += (a[i] - ma) * (b[i] - mb)
		saa += (a[i] - ma) * (a[i] - ma)
		sbb += (b[i] - mb) * (b[i] - mb)
	}
	if saa == 0 || sbb == 0 {
		return math.NaN()
	}
	return sab / math.Sqrt(saa*sbb)
}
