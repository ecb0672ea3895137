package forecast

import (
	"math"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// ScaledError is the mean absolute scaled error of forecasts of a held-out
// stretch.
type ScaledError struct {
	// MASE is mean |actual_t - forecast_t| over the pairs used, divided by
	// Scale.
	MASE float64
	// Scale is the in-sample mean absolute error of the naive forecast
	// with lag m on the history: (1/(n-m))·Σ_{t>m} |x_t - x_{t-m}|.
	Scale float64
	// Used is the number of (actual, forecast) pairs compared: pairs with
	// a NaN on either side are skipped.
	Used   int
	Status stats.Status
}

// MeanAbsoluteScaledError is Hyndman & Koehler's (2006, Int. J.
// Forecasting 22:679-688) mean absolute scaled error of forecast against
// actual, the held-out values, scaled by the in-sample mean absolute error
// of the naive forecast x̂_t = x_{t-m} on history, the values the model was
// fitted on:
//
//	MASE = mean_t |actual_t - forecast_t| / ((1/(n-m))·Σ_{t=m+1..n} |x_t - x_{t-m}|).
//
// m = 1 is the paper's scale; m = the seasonal period scales by the
// seasonal naive forecast (the same idea for seasonal data, common
// practice). Below 1, the forecasts beat the naive forecast's in-sample
// accuracy. m < 1 is an error. Status too_short when history has no more
// than m finite values or no pair is left, constant when the naive errors
// are all zero (the scale vanishes), non_finite when history holds NaN or
// ±Inf.
func MeanAbsoluteScaledError(actual, forecast, history []float64, m int) (ScaledError, error) {
	if m < 1 {
		return ScaledError{}, numeric.Errorf("scaled error: the naive lag must be at least 1, got %d", m)
	}
	if len(actual) != len(forecast) {
		return ScaledError{}, numeric.Errorf("scaled error: %d actual values for %d forecasts", len(actual), len(forecast))
	}
	r := ScaledError{MASE: numeric.NaN(), Scale: numeric.NaN()}
	if s := stats.CheckFinite(history); s != stats.StatusOK {
		r.Status = s
		return r, nil
	}
	if len(history) <= m {
		r.Status = stats.StatusTooShort
		return r, nil
	}
	scale := 0.0
	for t := m; t < len(history); t++ {
		scale += math.Abs(history[t] - history[t-m])
	}
	scale /= float64(len(history) - m)
	r.Scale = scale
	sumAbs := 0.0
	for i, a := range actual {
		if math.IsNaN(a) || math.IsNaN(forecast[i]) {
			continue
		}
		sumAbs += math.Abs(a - forecast[i])
		r.Used++
	}
	switch {
	case r.Used == 0:
		r.Status = stats.StatusTooShort
	case scale == 0:
		r.Status = stats.StatusConstant
	default:
		r.MASE = sumAbs / float64(r.Used) / scale
		r.Status = stats.StatusOK
	}
	return r, nil
}

// IntervalCoverage returns the share of held-out values inside their
// prediction intervals, lower_t ≤ actual_t ≤ upper_t, and the number of
// steps compared (those where actual and both bounds are not NaN; a bound
// may be ±Inf). With no step left the share is NaN. Slices of different
// lengths are an error.
func IntervalCoverage(actual, lower, upper []float64) (float64, int, error) {
	if len(lower) != len(actual) || len(upper) != len(actual) {
		return numeric.NaN(), 0, numeric.Errorf("interval coverage: %d actual values, %d lower and %d upper bounds", len(actual), len(lower), len(upper))
	}
	inside, used := 0, 0
	for i, a := range actual {
		if math.IsNaN(a) || math.IsNaN(lower[i]) || math.IsNaN(upper[i]) {
			continue
		}
		used++
		if lower[i] <= a && a <= upper[i] {
			inside++
		}
	}
	if used == 0 {
		return numeric.NaN(), 0, nil
	}
	return float64(inside) / float64(used), used, nil
}
