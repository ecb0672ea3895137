package stats

// Status says whether a result can be used, and if not, why not.
// It is carried by every result so that one bad series never fails a query
// over thousands of them.
type Status string

const (
	// StatusOK means the result was computed on the whole series.
	StatusOK Status = "ok"
	// StatusTooShort means the series has too few observations for the
	// requested test (after differencing, lags and deterministic terms).
	StatusTooShort Status = "too_short"
	// StatusConstant means the series (or what the test regresses on) has no
	// variation, so the statistic is undefined.
	StatusConstant Status = "constant"
	// StatusNonFinite means the series holds NaN or ±Inf (SQL NULLs arrive
	// as NaN), which no test here accepts.
	StatusNonFinite Status = "non_finite"
	// StatusNonPositive means a transform that needs positive data (Box-Cox,
	// log) met a zero or negative value.
	StatusNonPositive Status = "non_positive"
	// StatusSingular means the regression design was numerically singular
	// even though the series itself varies (for example extreme magnitudes).
	StatusSingular Status = "singular"
	// StatusSeasonUnknown means the seasonal part could not be judged,
	// because no period was given or found, or the series is shorter than
	// two periods.
	StatusSeasonUnknown Status = "season_unknown"
)

// CheckFinite reports StatusNonFinite if x holds NaN or ±Inf (SQL NULLs
// arrive as NaN), StatusOK otherwise.
func CheckFinite(x []float64) Status { return checkFinite(x) }

// checkFinite reports StatusNonFinite if x holds NaN or ±Inf, StatusOK otherwise.
func checkFinite(x []float64) Status {
	for _, v := range x {
		if v-v != 0 { // NaN or ±Inf
			return StatusNonFinite
		}
	}
	return StatusOK
}

// isConstant reports whether every value of x equals the first.
func isConstant(x []float64) bool {
	for _, v := range x[1:] {
		if v != x[0] {
			return false
		}
	}
	return true
}
