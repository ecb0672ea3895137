package verdict

import (
	"math"
	"sort"

	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// OutlierOptions configure Outliers; the zero value takes the defaults.
type OutlierOptions struct {
	// Period is the seasonal period (0 or 1: none). With a period the
	// robust fit includes a seasonal pattern, so that a busy Saturday is
	// not an outlier.
	Period int
	// Threshold is the number of robust standard deviations beyond which a
	// residual is an outlier; 0 means 5.
	Threshold float64
	// MaxRun is the longest run of consecutive flagged points that still
	// counts as isolated outliers; 0 means 2. A longer run is a change of
	// level, not an outlier, and is left alone.
	MaxRun int
}

// OutlierResult lists the isolated outliers of a series and gives the
// series with each replaced by its robust fit.
type OutlierResult struct {
	// Positions are the 0-based indices of the isolated outliers, in order.
	Positions []int
	// Cleaned is the series with every isolated outlier replaced by the
	// robust fit at its position; it is the input itself when there are
	// none.
	Cleaned []float64
	// Scale is the median of the local robust standard deviations (NaN when
	// the series is too short to judge).
	Scale float64
}

// Outliers finds isolated outliers with a Hampel identifier (Hampel 1974,
// "The influence curve and its role in robust estimation", JASA 69; the
// moving-window form of Pearson 2002, "Outliers in process modeling and
// identification", IEEE Trans. Control Systems Technology 10(1)) applied to
// a residual that a change of level does not produce:
//
//  1. season (with a period of at least 2 and two full periods): the
//     median, at each position of the period, of x minus the median of its
//     2k neighbours (k = max(3, period/2), so that they span a season); w =
//     x - season;
//  2. the medians of w over the k points before and the k points after
//     each point (left_t, right_t); the residual r_t is the smaller of
//     w_t - left_t and w_t - right_t in size when both have the same sign,
//     and 0 otherwise: an outlier stands apart from both sides, while a
//     point at a level shift agrees with one of them (a median window that
//     straddles the shift would flag the points on both sides of it);
//  3. a point is flagged when |r_t - med_t(u)| > c·max(s_t, s̃), c = 5, where
//     u_t = w_t minus the median of its 2k neighbours on both sides, s_t =
//     1.4826·MAD_t(u), the median and MAD taken over the consecutive block
//     of 2K+1 points (K = max(30, 3k)) that holds t, and s̃ is the median of
//     s_t over the series:
//     the local scale keeps a spread that grows over time from making its
//     largest values outliers, and the floor keeps a quiet stretch from
//     flagging ordinary noise. (The scale is not taken from r, which is 0
//     whenever a point lies between its two sides.)
//
// A cheap screen runs first (mayHaveOutliers): a series in which no value
// differs strongly from both the value a lag before and the value a lag
// after cannot hold an isolated outlier, and is passed without the
// windows' medians.
//
// Runs of more than MaxRun consecutive extreme points (flagged, or standing
// apart from their far side in the same direction as a flagged neighbour)
// are a change of level, not outliers, and are not reported. Each reported point is replaced in
// Cleaned by the mean of left_t and right_t plus its season. A series
// shorter than 10, or whose local MAD is zero (mostly one repeated value,
// as in intermittent demand), has no outliers by this rule. Finite values
// are assumed.
func Outliers(x []float64, opts OutlierOptions) OutlierResult {
	c := opts.Threshold
	if c <= 0 {
		c = 5
	}
	maxRun := opts.MaxRun
	if maxRun <= 0 {
		maxRun = 2
	}
	n := len(x)
	res := OutlierResult{Cleaned: x, Scale: math.NaN()}
	if n < 10 {
		return res
	}
	if !mayHaveOutliers(x, opts.Period) {
		return res
	}
	k := 3
	if opts.Period >= 2 {
		k = max(k, opts.Period/2)
	}
	season := numeric.GetZeroed(n)
	defer numeric.PutScratch(season)
	if p := opts.Period; p >= 2 && n >= 2*p {
		level := windowMedians(numeric.GetScratch(n), x, -k, k, true)
		defer numeric.PutScratch(level)
		effect := make([]float64, p)
		buf := make([]float64, 0, n/p+1)
		for j := 0; j < p; j++ {
			buf = buf[:0]
			for t := j; t < n; t += p {
				buf = append(buf, x[t]-level[t])
			}
			effect[j] = medianInPlace(buf)
		}
		for t := range season {
			season[t] = effect[t%p]
		}
	}
	w := numeric.GetScratch(n)
	defer numeric.PutScratch(w)
	for t := range w {
		w[t] = x[t] - season[t]
	}
	// The k points before t and the k points after t are both windows of
	// k consecutive points: one pass of medians serves both sides.
	block := windowMedians(numeric.GetScratch(n), w, -(k - 1), 0, false) // block[e] = median of w[e-k+1..e]
	defer numeric.PutScratch(block)
	left, right := numeric.GetScratch(n), numeric.GetScratch(n)
	defer numeric.PutScratch(left)
	defer numeric.PutScratch(right)
	for t := range w {
		left[t], right[t] = math.NaN(), math.NaN()
		if t >= 1 {
			left[t] = block[t-1]
		}
		switch {
		case t+k < n:
			right[t] = block[t+k]
		case t+1 < n:
			right[t] = medianOfFew(w[t+1:])
		}
	}
	r := numeric.GetZeroed(n)
	defer numeric.PutScratch(r)
	for t := range r {
		a, b := w[t]-left[t], w[t]-right[t]
		switch {
		case math.IsNaN(a):
			r[t] = b
		case math.IsNaN(b):
			r[t] = a
		case a > 0 && b > 0:
			r[t] = math.Min(a, b)
		case a < 0 && b < 0:
			r[t] = math.Max(a, b)
		}
	}
	// The scale comes from the residual about the median of both sides
	// together: r itself is 0 whenever a point lies between its sides,
	// which would make its MAD near 0.
	sym := windowMedians(numeric.GetScratch(n), w, -k, k, true)
	defer numeric.PutScratch(sym)
	for t := range sym {
		sym[t] = w[t] - sym[t]
	}
	center, scale := numeric.GetScratch(n), numeric.GetScratch(n)
	defer numeric.PutScratch(center)
	defer numeric.PutScratch(scale)
	blockScale(center, scale, sym, 2*max(30, 3*k)+1)
	res.Scale = median(scale)
	for t := range scale {
		scale[t] = math.Max(scale[t], res.Scale)
	}
	var flagged []bool
	for t := range r {
		if scale[t] > 0 && math.Abs(r[t]-center[t]) > c*scale[t] {
			if flagged == nil {
				flagged = make([]bool, n)
			}
			flagged[t] = true
		}
	}
	if flagged == nil {
		return res
	}
	for t := 0; t < n; {
		if !flagged[t] {
			t++
			continue
		}
		end := t
		for end < n && flagged[end] {
			end++
		}
		// A run continues past its flagged points when a neighbour stands
		// apart from its own far side in the same direction: the middle of
		// three extreme values is flagged alone, but is part of a run.
		sign := math.Copysign(1, r[t])
		extends := func(i int, far []float64) bool {
			return i >= 0 && i < n && !math.IsNaN(far[i]) && sign*(w[i]-far[i]) > c*scale[i]
		}
		if end-t <= maxRun && !extends(t-1, left) && !extends(end, right) {
			for i := t; i < end; i++ {
				res.Positions = append(res.Positions, i)
			}
		}
		t = end
	}
	if len(res.Positions) == 0 {
		return res
	}
	res.Cleaned = append([]float64(nil), x...)
	for _, t := range res.Positions {
		fit := left[t]
		switch {
		case math.IsNaN(fit):
			fit = right[t]
		case !math.IsNaN(right[t]):
			fit = (left[t] + right[t]) / 2
		}
		res.Cleaned[t] = fit + season[t]
	}
	return res
}

// windowMedians writes into out (len(x) long) and returns, at each t, the
// median of x over [t+from, t+to] cut short at the ends (NaN where nothing
// is left), without x_t itself when leaveOut is set. It keeps the window
// sorted and moves it one value at a time: O(n·(to-from)) with small
// constants.
func windowMedians(out, x []float64, from, to int, leaveOut bool) []float64 {
	n := len(x)
	if to-from < 16 {
		// Small windows: sort a copy of each one (faster than keeping one
		// window sorted for a handful of values).
		var buf [16]float64
		for t := 0; t < n; t++ {
			a, b := max(0, t+from), min(n-1, t+to)
			m := 0
			for i := a; i <= b; i++ {
				if leaveOut && i == t {
					continue
				}
				buf[m] = x[i]
				m++
			}
			out[t] = medianOfFew(buf[:m])
		}
		return out
	}
	win := numeric.GetScratch(to - from + 1)[:0]
	defer numeric.PutScratch(win[:cap(win)])
	insert := func(v float64) {
		i := sort.SearchFloat64s(win, v)
		win = append(win, 0)
		copy(win[i+1:], win[i:])
		win[i] = v
	}
	remove := func(v float64) {
		i := sort.SearchFloat64s(win, v)
		copy(win[i:], win[i+1:])
		win = win[:len(win)-1]
	}
	lo, hi := 0, -1 // the window holds x[lo..hi]
	for t := 0; t < n; t++ {
		for hi < min(n-1, t+to) {
			hi++
			if hi >= lo {
				insert(x[hi])
			}
		}
		for lo < max(0, t+from) {
			if lo <= hi {
				remove(x[lo])
			}
			lo++
		}
		inside := leaveOut && t >= lo && t <= hi
		if inside {
			remove(x[t])
		}
		switch m := len(win); {
		case m == 0:
			out[t] = math.NaN()
		case m%2 == 1:
			out[t] = win[m/2]
		default:
			out[t] = (win[m/2-1] + win[m/2]) / 2
		}
		if inside {
			insert(x[t])
		}
	}
	return out
}

// blockScale cuts u into consecutive blocks of length m (the last block
// takes the remainder when it is shorter than m/2) and writes, at each t,
// the median of its block into center and 1.4826 times the block's median
// absolute deviation from it into scale: a robust local level and standard
// deviation, in linear time (quickselect per block).
func blockScale(center, scale, u []float64, m int) {
	n := len(u)
	buf := numeric.GetScratch(m + m/2)
	defer numeric.PutScratch(buf)
	for a := 0; a < n; {
		b := min(n, a+m)
		if n-b < m/2 {
			b = n
		}
		seg := buf[:b-a]
		copy(seg, u[a:b])
		c := medianInPlace(seg)
		for i, v := range u[a:b] {
			seg[i] = math.Abs(v - c)
		}
		s := 1.4826 * medianInPlace(seg)
		for t := a; t < b; t++ {
			center[t], scale[t] = c, s
		}
		a = b
	}
}

// medianOfFew returns the median of a few values (NaN for none), sorting
// a copy by insertion.
func medianOfFew(v []float64) float64 {
	var buf [16]float64
	m := len(v)
	if m == 0 {
		return math.NaN()
	}
	if m > len(buf) {
		return median(v)
	}
	switch m {
	case 1:
		return v[0]
	case 3:
		a, b, c := v[0], v[1], v[2]
		return math.Max(math.Min(a, b), math.Min(math.Max(a, b), c))
	}
	s := buf[:m]
	for i, x := range v {
		j := i
		for j > 0 && s[j-1] > x {
			s[j] = s[j-1]
			j--
		}
		s[j] = x
	}
	if m%2 == 1 {
		return s[m/2]
	}
	return (s[m/2-1] + s[m/2]) / 2
}

// mayHaveOutliers is Outliers' screen. With L the period (1 without one)
// and d_t = x_t - x_{t-L}, an isolated outlier at t makes both d_t and
// d_{t+L} large, with opposite signs; a change of level makes only one of
// them large, a seasonal pattern neither (L is its period). The series is
// passed when no t has min(|d_t|, |d_{t+L}|) above 2.5 robust standard
// deviations of d (1.4826 times the median of |d|): a point the full rule
// flags stands more than 5 robust deviations from the medians of both its
// sides, so its differences with its neighbours at lag L are large too. The
// screen is loose on purpose: it only saves the full rule's work.
func mayHaveOutliers(x []float64, period int) bool {
	L := 1
	if period >= 2 && len(x) > 3*period {
		L = period
	}
	n := len(x)
	if n <= 2*L {
		return true
	}
	d := numeric.GetScratch(n - L)
	defer numeric.PutScratch(d)
	for t := L; t < n; t++ {
		d[t-L] = math.Abs(x[t] - x[t-L])
	}
	buf := numeric.GetScratch(len(d))
	defer numeric.PutScratch(buf)
	copy(buf, d)
	limit := 2.5 * 1.4826 * medianInPlace(buf)
	if !(limit > 0) {
		return true
	}
	// d[j] = |x_{j+L} - x_j|: a point t has d[t-L] and d[t]; the first and
	// last L points have only one of them.
	for j, v := range d {
		if v > limit && (j < L || j >= len(d)-L || d[j-L] > limit) {
			return true
		}
	}
	return false
}
