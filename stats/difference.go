package stats

import "fmt"

// Difference returns the series differenced times times at lag lag:
//
//	(1 - B^lag)^times x,   where (1 - B^lag) x_t = x_t - x_{t-lag}.
//
// Each pass loses lag observations, so the result is lag·times shorter than
// x (empty when x is not longer than that). lag = 1 is plain differencing;
// lag = s is seasonal differencing at period s. NaN propagates to every
// value that depends on it. It is an error for lag or times to be below 1.
func Difference(x []float64, lag, times int) ([]float64, error) {
	if lag < 1 {
		return nil, fmt.Errorf("stats: difference lag must be at least 1, got %d", lag)
	}
	if times < 1 {
		return nil, fmt.Errorf("stats: difference times must be at least 1, got %d", times)
	}
	// lag or times beyond the series leaves nothing; checked first, so that
	// lag·times cannot overflow.
	if lag >= len(x) || times >= len(x) {
		return []float64{}, nil
	}
	n := len(x) - lag*times
	if n <= 0 {
		return []float64{}, nil
	}
	out := make([]float64, len(x))
	copy(out, x)
	for k := 0; k < times; k++ {
		m := len(x) - lag*(k+1)
		for i := 0; i < m; i++ {
			out[i] = out[i+lag] - out[i]
		}
	}
	return out[:n:n], nil
}

// Undifference inverts one pass of differencing at lag lag: it returns y with
//
//	y_t = y_{t-lag} + d_t,
//
// a running sum per residue class modulo lag, started from the last lag
// values of anchor (the original observations just before the differenced
// stretch). The result has len(d) values and does not repeat the anchor, so
// that for any x and k ≥ lag
//
//	Undifference(Difference(x[k-lag:], lag, 1), x[:k], lag) == x[k:].
//
// Anchor may be the whole history; only its last lag values are used. It is
// an error for lag to be below 1 or for anchor to hold fewer than lag values.
func Undifference(d, anchor []float64, lag int) ([]float64, error) {
	if lag < 1 {
		return nil, fmt.Errorf("stats: undifference lag must be at least 1, got %d", lag)
	}
	if len(anchor) < lag {
		return nil, fmt.Errorf("stats: undifference at lag %d needs %d anchor values, got %d", lag, lag, len(anchor))
	}
	tail := anchor[len(anchor)-lag:]
	out := make([]float64, len(d))
	for t := range d {
		prev := 0.0
		if t >= lag {
			prev = out[t-lag]
		} else {
			prev = tail[t]
		}
		out[t] = prev + d[t]
	}
	return out, nil
}
