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
	// as NaN), which no test here accepts; for the verdict also values so
	// large that the sum of their squares overflows (numeric.TooLarge), or a number
	// it needs that could not be computed: such numbers are a status, never
	// a verdict.
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
	// StatusTooSparse means a fill was asked for, but the series' time
	// points span more than MaxFillFactor grid steps per observation, so
	// filling would invent most of the series (and the grid could exhaust
	// memory): the series is not judged.
	StatusTooSparse Status = "too_sparse"
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
