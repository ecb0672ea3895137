package verdict

import (
	"math"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// STLOptions configure the STL decomposition. Windows must be odd; zero
// values take the defaults of Cleveland et al. (1990): seasonal window 7,
// trend window the smallest odd integer ≥ 1.5·period/(1 - 1.5/seasonal),
// low-pass window the smallest odd integer > period; local-linear fits
// (degree 1) throughout; two inner passes and no robustness passes.
type STLOptions struct {
	Seasonal, Trend, LowPass int
	// Inner is the number of inner passes; 0 means 2 (the paper's choice
	// without robustness iterations).
	Inner int
}

// STLResult holds the three components: x = Seasonal + Trend + Remainder.
type STLResult struct {
	Seasonal, Trend, Remainder []float64
}

// STL decomposes x with seasonal period p into seasonal, trend and
// remainder components by the loess-based procedure of Cleveland,
// Cleveland, McRae & Terpenning (1990), "STL: A Seasonal-Trend
// Decomposition Procedure Based on Loess", J. Official Statistics 6(1).
// Each inner pass (i) detrends, (ii) smooths every cycle-subseries with
// loess and extends it one period at each end, (iii) low-pass filters the
// result (moving averages of length p, p and 3, then loess) and subtracts
// that, and (iv) smooths the deseasonalised series into the trend. Every
// loess fit is evaluated at every point (no interpolation between jumps).
// It needs p ≥ 2 and at least two full periods.
func STL(x []float64, p int, opts STLOptions) (STLResult, stats.Status) {
	n := len(x)
	if s := stats.CheckFinite(x); s != stats.StatusOK {
		return STLResult{}, s
	}
	if p < 2 || n < 2*p {
		return STLResult{}, stats.StatusTooShort
	}
	ns := opts.Seasonal
	if ns == 0 {
		ns = 7
	}
	ns = max(3, ns|1)
	nt := opts.Trend
	if nt == 0 {
		nt = int(math.Ceil(1.5 * float64(p) / (1 - 1.5/float64(ns))))
	}
	nt = max(3, nt|1)
	nl := opts.LowPass
	if nl == 0 {
		nl = p + 1
	}
	nl = max(3, nl|1)

	inner := opts.Inner
	if inner <= 0 {
		inner = 2
	}
	trend := numeric.GetZeroed(n)
	season := numeric.GetScratch(n)
	detrended := numeric.GetScratch(n)
	cycle := numeric.GetScratch(n + 2*p)
	sub := numeric.GetScratch(n/p + 1)
	subSmooth := numeric.GetScratch(n/p + 3)
	w := numeric.GetScratch(n + 2*p)
	lowSmooth := numeric.GetScratch(n)
	ma1, ma2, low := numeric.GetScratch(n+p+1), numeric.GetScratch(n+2), numeric.GetScratch(n)
	defer func() {
		for _, s := range [][]float64{detrended, cycle, sub, subSmooth, w, lowSmooth, ma1, ma2, low} {
			numeric.PutScratch(s)
		}
	}()
	for pass := 0; pass < inner; pass++ {
		for i := range detrended {
			detrended[i] = x[i] - trend[i]
		}
		// (ii) cycle-subseries smoothing, extended one period each side.
		for j := 0; j < p; j++ {
			k := (n-j-1)/p + 1
			for i := 0; i < k; i++ {
				sub[i] = detrended[i*p+j]
			}
			loessSmooth(sub[:k], ns, subSmooth[1:k+1], w)
			if v, ok := loessAt(sub[:k], ns, -1, 0, min(ns, k)-1, w); ok {
				subSmooth[0] = v
			} else {
				subSmooth[0] = subSmooth[1]
			}
			if v, ok := loessAt(sub[:k], ns, float64(k), max(0, k-ns), k-1, w); ok {
				subSmooth[k+1] = v
			} else {
				subSmooth[k+1] = subSmooth[k]
			}
			for m := 0; m < k+2; m++ {
				cycle[m*p+j] = subSmooth[m]
			}
		}
		// (iii) low-pass filter of the cycle-subseries: moving averages of
		// lengths p, p and 3 (n+2p → n+p+1 → n+2 → n values), then loess.
		movingAverageInto(ma1, cycle, p)
		movingAverageInto(ma2, ma1, p)
		movingAverageInto(low, ma2, 3)
		loessSmooth(low, nl, lowSmooth, w)
		for i := range season {
			season[i] = cycle[p+i] - lowSmooth[i]
		}
		// (iv) trend smoothing of the deseasonalised series.
		for i := range detrended {
			detrended[i] = x[i] - season[i]
		}
		loessSmooth(detrended, nt, trend, w)
	}
	rem := numeric.GetScratch(n)
	for i := range rem {
		rem[i] = x[i] - season[i] - trend[i]
	}
	return STLResult{Seasonal: season, Trend: trend, Remainder: rem}, stats.StatusOK
}

// release gives the components' memory back for reuse by later STL calls;
// d must not be used again.
func (d STLResult) release() {
	numeric.PutScratch(d.Seasonal)
	if d.Trend != nil {
		numeric.PutScratch(d.Trend)
	}
	numeric.PutScratch(d.Remainder)
}

// movingAverage returns the moving averages of x over windows of length m
// (len(x) - m + 1 values).
func movingAverage(x []float64, m int) []float64 {
	return movingAverageInto(make([]float64, len(x)-m+1), x, m)
}

// movingAverageInto writes movingAverage(x, m) into out (of length
// len(x)-m+1) and returns it.
func movingAverageInto(out, x []float64, m int) []float64 {
	s := 0.0
	for i := 0; i < m; i++ {
		s += x[i]
	}
	out[0] = s / float64(m)
	for i := 1; i < len(out); i++ {
		s += x[i+m-1] - x[i-1]
		out[i] = s / float64(m)
	}
	return out
}

// loessSmooth evaluates a local-linear loess fit of y (at positions 0..n-1)
// with window q at every position, writing out. The window slides with the
// point, as in the original STL code: the q nearest positions, or all of
// them when q ≥ n. Wherever the window sits symmetrically around the point
// the weights are the same, so they are computed once and applied to that
// whole stretch as one convolution, kernel tap by kernel tap.
func loessSmooth(y []float64, q int, out, w []float64) {
	n := len(y)
	if n < 2 {
		copy(out, y)
		return
	}
	if q >= n {
		for i := 0; i < n; i++ {
			v, ok := loessAt(y, q, float64(i), 0, n-1, w)
			if !ok {
				v = y[i]
			}
			out[i] = v
		}
		return
	}
	// The window of point i starts at left(i) = min(max(0, i-half+1), n-q):
	// it slides with the point once i reaches half, until it meets the end.
	// For odd q it sits symmetrically around i exactly for h ≤ i ≤ n-1-h.
	half := (q + 1) / 2
	h := (q - 1) / 2
	first, last := h, n-1-h
	if q%2 == 0 || first > last {
		first, last = n, n-1 // no symmetric stretch
	}
	for i := 0; i < n; i++ {
		if i == first {
			i = last
			continue
		}
		left := min(max(0, i-half+1), n-q)
		v, ok := loessAt(y, q, float64(i), left, left+q-1, w)
		if !ok {
			v = y[i]
		}
		out[i] = v
	}
	if first > last {
		return
	}
	if _, ok := loessAt(y, q, float64(first), first-h, first+h, w); !ok {
		for i := first; i <= last; i++ {
			out[i] = y[i]
		}
		return
	}
	convolve(out[first:last+1], y[first-h:], w[first-h:first+h+1])
}

// convolve sets dst[i] = Σ_j kernel[j]·src[i+j], four taps per pass over
// dst (then the remaining one to three in one more pass).
func convolve(dst, src, kernel []float64) {
	m := len(dst)
	clear(dst)
	j := 0
	for ; j+4 <= len(kernel); j += 4 {
		k0, k1, k2, k3 := kernel[j], kernel[j+1], kernel[j+2], kernel[j+3]
		s0, s1, s2, s3 := src[j:j+m], src[j+1:j+1+m], src[j+2:j+2+m], src[j+3:j+3+m]
		for i := range dst {
			dst[i] += (k0*s0[i] + k1*s1[i]) + (k2*s2[i] + k3*s3[i])
		}
	}
	switch len(kernel) - j {
	case 3:
		k0, k1, k2 := kernel[j], kernel[j+1], kernel[j+2]
		s0, s1, s2 := src[j:j+m], src[j+1:j+1+m], src[j+2:j+2+m]
		for i := range dst {
			dst[i] += (k0*s0[i] + k1*s1[i]) + k2*s2[i]
		}
	case 2:
		k0, k1 := kernel[j], kernel[j+1]
		s0, s1 := src[j:j+m], src[j+1:j+1+m]
		for i := range dst {
			dst[i] += k0*s0[i] + k1*s1[i]
		}
	case 1:
		k0 := kernel[j]
		s0 := src[j : j+m]
		for i := range dst {
			dst[i] += k0 * s0[i]
		}
	}
}

// loessAt fits y[left..right] locally linearly around position xs with
// tricube weights over the half-width h = max(xs - left, right - xs)
// (widened by (q - n)/2 when the window q exceeds the series length n) and
// returns the fitted value. ok is false when every weight is zero.
func loessAt(y []float64, q int, xs float64, left, right int, w []float64) (float64, bool) {
	n := len(y)
	h := math.Max(xs-float64(left), float64(right)-xs)
	if q > n {
		h += float64((q - n) / 2)
	}
	h9, h1 := 0.999*h, 0.001*h
	a := 0.0
	for j := left; j <= right; j++ {
		w[j] = 0
		r := math.Abs(float64(j) - xs)
		if r <= h9 {
			if r <= h1 {
				w[j] = 1
			} else {
				u := r / h
				u = 1 - u*u*u
				w[j] = u * u * u
			}
			a += w[j]
		}
	}
	if a <= 0 {
		return 0, false
	}
	for j := left; j <= right; j++ {
		w[j] /= a
	}
	if h > 0 {
		c := 0.0
		a = 0
		for j := left; j <= right; j++ {
			a += w[j] * float64(j)
		}
		b := xs - a
		for j := left; j <= right; j++ {
			d := float64(j) - a
			c += w[j] * d * d
		}
		if math.Sqrt(c) > 0.001*float64(n-1) {
			b /= c
			for j := left; j <= right; j++ {
				w[j] *= b*(float64(j)-a) + 1
			}
		}
	}
	v := 0.0
	for j := left; j <= right; j++ {
		v += w[j] * y[j]
	}
	return v, true
}

// SeasonalStrength is Wang, Smith & Hyndman's (2006) strength of
// seasonality of an STL decomposition: max(0, 1 - Var(R)/Var(S + R)), 0 for
// none and 1 for a pure seasonal pattern.
func SeasonalStrength(d STLResult) float64 {
	return strength(d.Seasonal, d.Remainder)
}

// TrendStrength is the same for the trend: max(0, 1 - Var(R)/Var(T + R)).
func TrendStrength(d STLResult) float64 {
	return strength(d.Trend, d.Remainder)
}

func strength(component, rem []float64) float64 {
	var mean float64
	for i, r := range rem {
		mean += component[i] + r
	}
	mean /= float64(len(rem))
	var ss float64
	for i, r := range rem {
		d := component[i] + r - mean
		ss += d * d
	}
	_, sr := numeric.MeanSD(rem)
	// numeric.MeanSD divides by n - 1; so does this ratio's denominator.
	ss /= float64(len(rem) - 1)
	if ss == 0 {
		return 0
	}
	return math.Max(0, 1-sr*sr/ss)
}
