package verdict

// SeasonalEffects estimates a fixed (deterministic) seasonal pattern of
// period p by classical decomposition (common practice; e.g. Makridakis,
// Wheelwright & Hyndman 1998, ch. 3): the local level is the centred moving
// average of order p (a 2×p moving average for even p, so that it stays
// centred), the effect of each position j = t mod p (t counted from 0 at the
// first observation) is the average of x_t - level_t over the positions where
// the moving average exists, and the effects are centred to sum to zero.
// Subtracting effects[t mod p] from x_t removes the pattern whatever the
// level does (a trend, a random walk). It needs p ≥ 2 and at least two full
// periods beyond the moving average's reach; nil otherwise.
func SeasonalEffects(x []float64, p int) []float64 {
	n := len(x)
	half := p / 2
	if p < 2 || n < 2*p+2*half {
		return nil
	}
	sums := make([]float64, p)
	counts := make([]int, p)
	// Running window sum for the order-p average (odd p) or the 2×p one
	// (even p: p+1 points, the two ends weighted by one half).
	var window float64
	for i := 0; i <= min(2*half, n-1); i++ {
		window += x[i]
	}
	for t := half; t+half < n; t++ {
		if t > half {
			window += x[t+half] - x[t-half-1]
		}
		level := window / float64(p)
		if p%2 == 0 {
			level = (window - 0.5*x[t-half] - 0.5*x[t+half]) / float64(p)
		}
		j := t % p
		sums[j] += x[t] - level
		counts[j]++
	}
	effects := make([]float64, p)
	mean := 0.0
	for j := range effects {
		if counts[j] == 0 {
			return nil
		}
		effects[j] = sums[j] / float64(counts[j])
		mean += effects[j]
	}
	mean /= float64(p)
	for j := range effects {
		effects[j] -= mean
	}
	return effects
}
