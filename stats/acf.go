package stats

import "github.com/plumb-sql/plumb/stats/internal/numeric"

// Autocorrelation returns the sample autocorrelations ρ_1..ρ_maxLag of x:
//
//	ρ_k = Σ_{t=k..n-1} (x_t - x̄)(x_{t-k} - x̄) / Σ_t (x_t - x̄)²,
//
// the usual biased estimator (Box & Jenkins). Lags at or beyond len(x) are
// left out. A constant series has no autocorrelation: the result is nil.
func Autocorrelation(x []float64, maxLag int) []float64 {
	n := len(x)
	if n < 2 || maxLag < 1 {
		return nil
	}
	d, c0 := centered(x)
	defer numeric.PutScratch(d)
	if c0 == 0 {
		return nil
	}
	maxLag = min(maxLag, n-1)
	g := numeric.Autocovariances(d, maxLag) // Σ_{t≥k} d_t·d_{t-k} / n
	out := make([]float64, maxLag)
	for k := 1; k <= maxLag; k++ {
		out[k-1] = g[k] * float64(n) / c0
	}
	return out
}

// AutocorrelationAt returns the sample autocorrelations of x at the given
// lags only (each below len(x)), as Autocorrelation defines them; nil for a
// constant or too short series.
func AutocorrelationAt(x []float64, lags []int) []float64 {
	n := len(x)
	if n < 2 || len(lags) == 0 {
		return nil
	}
	d, c0 := centered(x)
	defer numeric.PutScratch(d)
	if c0 == 0 {
		return nil
	}
	out := make([]float64, len(lags))
	for i, k := range lags {
		out[i] = numeric.Dot(d[k:], d[:n-k]) / c0
	}
	return out
}

// centered returns x minus its mean, in a scratch slice the caller puts
// back, and the sum of its squares.
func centered(x []float64) ([]float64, float64) {
	mean := numeric.Sum(x) / float64(len(x))
	d := numeric.GetScratch(len(x))
	for i, v := range x {
		d[i] = v - mean
	}
	return d, numeric.Dot(d, d)
}
