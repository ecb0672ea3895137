package unitroot

import (
	"math"
	"math/rand/v2"
	"sort"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// MeanBreakTrim is the share of the series kept out of the search for a
// break at each end: 15%, the usual choice (Andrews 1993).
const MeanBreakTrim = 0.15

// MeanBreakResult is the outcome of the test for one break in the mean.
type MeanBreakResult struct {
	// Statistic is the sup-Wald statistic over the candidate break dates.
	Statistic   float64
	PValue      float64
	PValueBound PValueBound
	// Index is the 0-based index of the first observation after the break
	// (the break date that fits best).
	Index int
	// Before and After are the means on each side; Size = After - Before.
	Before, After, Size float64
	// SizeSD is Size over the standard deviation of the residuals about the
	// two means: the jump in standard deviations of the noise.
	SizeSD float64
	// SSR is the residual sum of squares of the two-mean fit.
	SSR    float64
	Status stats.Status
}

// MeanBreak tests x for one break in its mean at an unknown date, for a
// series that is otherwise stationary, by the sup-Wald test of Andrews
// (1993, "Tests for parameter instability and structural change with
// unknown change point", Econometrica 61(4)):
//
//	W(τ) = [τ(n-τ)/n]·(x̄_after - x̄_before)² / λ²,   sup over τ in [0.15n, 0.85n],
//
// with λ² the long-run variance of the residuals about the two means at the
// best-fitting date (prewhitened, PrewhitenedLongRunVariance), so that
// autocorrelated noise does not pass for a break. The best-fitting date
// maximises the numerator, i.e. minimises the residual sum of squares. Under
// the null hypothesis of a constant mean the statistic converges to
// sup B(π)²/(π(1-π)) over π in [0.15, 0.85], B a Brownian bridge; the
// p-value comes from plumb's own simulation of that law (meanBreakTable,
// testdata/meanbreak/simulate.go).
//
// Statuses: non_finite; too_short below 20 observations; constant.
func MeanBreak(x []float64) MeanBreakResult {
	if s := stats.CheckFinite(x); s != stats.StatusOK {
		return FailedMeanBreak(s)
	}
	n := len(x)
	if n < 20 {
		return FailedMeanBreak(stats.StatusTooShort)
	}
	if numeric.IsConstant(x) {
		return FailedMeanBreak(stats.StatusConstant)
	}
	r := FailedMeanBreak("")
	lo, hi := trimmedRange(n, MeanBreakTrim)
	total := numeric.Sum(x)
	mean := total / float64(n)
	// Partial sums of the centred series: the numerator at τ is
	// n·(S_τ)²/(τ(n-τ)) with S_τ = Σ_{t<τ}(x_t - x̄).
	var s float64
	best, bestNum := lo, -1.0
	for t := 0; t < hi; t++ {
		s += x[t] - mean
		tau := t + 1
		if tau < lo {
			continue
		}
		num := float64(n) * s * s / (float64(tau) * float64(n-tau))
		if num > bestNum {
			best, bestNum = tau, num
		}
	}
	before := numeric.Sum(x[:best]) / float64(best)
	after := numeric.Sum(x[best:]) / float64(n-best)
	e := numeric.GetScratch(n)
	defer numeric.PutScratch(e)
	ssr := 0.0
	for t, v := range x {
		m := before
		if t >= best {
			m = after
		}
		e[t] = v - m
		ssr += e[t] * e[t]
	}
	lrv := PrewhitenedLongRunVariance(e)
	if !(lrv > 0) || !(ssr > 0) {
		return FailedMeanBreak(stats.StatusConstant)
	}
	r.Index, r.Before, r.After, r.Size, r.SSR = best, before, after, after-before, ssr
	r.SizeSD = r.Size / math.Sqrt(ssr/float64(n-2))
	r.Statistic = bestNum / lrv
	r.PValue, r.PValueBound = meanBreakPValue(r.Statistic)
	r.Status = stats.StatusOK
	return r
}

// FailedMeanBreak is a result with every number NaN and status s.
func FailedMeanBreak(s stats.Status) MeanBreakResult {
	n := math.NaN()
	return MeanBreakResult{Statistic: n, PValue: n, Before: n, After: n, Size: n, SizeSD: n, SSR: n, Index: -1, Status: s}
}

// trimmedRange returns the first and last candidate break index for a
// series of n values with a share trim kept out at each end.
func trimmedRange(n int, trim float64) (int, int) {
	lo := max(2, int(math.Ceil(trim*float64(n))))
	hi := min(n-2, int(math.Floor((1-trim)*float64(n))))
	return lo, hi
}

// meanBreakPValue interpolates log p linearly in the statistic between the
// simulated quantiles of the limiting law; beyond the table's ends the
// p-value is the end and the bound says so.
func meanBreakPValue(stat float64) (float64, PValueBound) {
	t := meanBreakTable
	if stat <= t[0].quantile {
		return t[0].p, PValueAtLeast
	}
	last := t[len(t)-1]
	if stat >= last.quantile {
		return last.p, PValueAtMost
	}
	i := sort.Search(len(t), func(i int) bool { return t[i].quantile >= stat })
	a, b := t[i-1], t[i]
	w := (stat - a.quantile) / (b.quantile - a.quantile)
	return math.Exp(math.Log(a.p) + w*(math.Log(b.p)-math.Log(a.p))), PValueEstimate
}

// meanBreakPoint is one point of the limiting law's upper tail: P(sup > quantile) = p.
type meanBreakPoint struct{ p, quantile float64 }

// SimulateMeanBreak returns reps draws, sorted, of the sup-Wald statistic
// for a mean break with trim 0.15 under its null hypothesis, approximating
// the Brownian bridge by the partial sums of T independent standard normal
// values (the variance known, so that the draws follow the limiting law
// rather than a small-sample one).
func SimulateMeanBreak(T, reps int, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, uint64(T)))
	out := make([]float64, reps)
	partial := make([]float64, T+1)
	lo, hi := trimmedRange(T, MeanBreakTrim)
	for r := range out {
		for t := 1; t <= T; t++ {
			partial[t] = partial[t-1] + rng.NormFloat64()
		}
		total := partial[T]
		best := 0.0
		for tau := lo; tau <= hi; tau++ {
			b := partial[tau] - float64(tau)/float64(T)*total
			if w := float64(T) * b * b / (float64(tau) * float64(T-tau)); w > best {
				best = w
			}
		}
		out[r] = best
	}
	sort.Float64s(out)
	return out
}
