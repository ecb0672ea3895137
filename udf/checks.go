package udf

import (
	"database/sql/driver"
	"fmt"

	"github.com/plumb-sql/plumb/stats/defaults"
	"github.com/plumb-sql/plumb/stats/unitroot"
)

// The checks of option values that SQL and the commands share: a value
// outside its documented range is refused with one message wherever it was
// given, never replaced by a default.

// CheckPeriod checks the verdict's period (stationarity, diagnose,
// stationarize, forecast and their commands): at least 2, 1 to declare the
// series non-seasonal, or nil: no period given, so that it is detected
// (SQL's NULL, a flag left out).
func CheckPeriod(p *int) error {
	if p != nil && *p < 1 {
		return fmt.Errorf("period must be at least 2, 1 (not seasonal), or left out (NULL) to detect it; got %d", *p)
	}
	return checkAtMost(p, "period")
}

// maxSpan bounds a period, lag or difference count: no series plumb reads is
// longer (a DuckDB list of 2^31 doubles is 16 GiB), and beyond it the
// arithmetic of segment bounds and lags (2·period, lag·times) could
// overflow.
const maxSpan = 1<<31 - 1

// checkAtMost refuses a value of name above maxSpan.
func checkAtMost(p *int, name string) error {
	if p != nil && *p > maxSpan {
		return fmt.Errorf("%s must be at most %d (longer than any series), got %d", name, maxSpan, *p)
	}
	return nil
}

// verdictPeriodArg reads the verdict's period argument with CheckPeriod: 0
// when NULL.
func verdictPeriodArg(v driver.Value) (int, error) {
	p, err := optionalInt(v, "period")
	if err != nil {
		return 0, err
	}
	if err := CheckPeriod(p); err != nil {
		return 0, err
	}
	if p == nil {
		return 0, nil
	}
	return *p, nil
}

// checkPeriod accepts a seasonal period of at least 2, or nil, for a
// function where a missing period means what null says ("to detect it",
// "for none").
func checkPeriod(p *int, null string) error {
	if p != nil && *p < 2 {
		return fmt.Errorf("period must be at least 2, or left out (NULL) %s; got %d", null, *p)
	}
	return checkAtMost(p, "period")
}

// CheckAlpha accepts a test level strictly between 0 and 1.
func CheckAlpha(alpha float64) error {
	if !(alpha > 0 && alpha < 1) {
		return fmt.Errorf("alpha must be between 0 and 1 (exclusive), got %v", alpha)
	}
	return nil
}

// periodArg reads a period argument with CheckPeriod: 0 when NULL.
func periodArg(v driver.Value) (int, error) { return periodArgMeaning(v, "to detect it") }

// periodArgMeaning is periodArg where NULL means what null says.
func periodArgMeaning(v driver.Value, null string) (int, error) {
	p, err := optionalInt(v, "period")
	if err != nil {
		return 0, err
	}
	if err := checkPeriod(p, null); err != nil {
		return 0, err
	}
	if p == nil {
		return 0, nil
	}
	return *p, nil
}

// whiteNoiseArgs reads white_noise's lags and fitted: lags at least 1
// (NULL: defaults.WhiteNoiseLags), fitted from 0 to lags - 1, so that the
// test keeps lags - fitted ≥ 1 degrees of freedom.
func whiteNoiseArgs(lagsArg, fittedArg driver.Value) (int, int, error) {
	lags, err := intOr(lagsArg, "lags", defaults.WhiteNoiseLags)
	if err != nil {
		return 0, 0, err
	}
	fitted, err := intOr(fittedArg, "fitted", defaults.WhiteNoiseFitted)
	if err != nil {
		return 0, 0, err
	}
	if lags < 1 {
		return 0, 0, fmt.Errorf("lags must be at least 1, got %d", lags)
	}
	if fitted < 0 || fitted >= lags {
		return 0, 0, fmt.Errorf("fitted must be between 0 and lags - 1 = %d (the test has lags - fitted degrees of freedom), got %d", lags-1, fitted)
	}
	return lags, fitted, nil
}

// trimmingArg reads zivot_andrews' trimming: NULL is the default,
// anything else must lie in the range plumb's p-value table covers
// (unitroot.CheckBreakTrim).
func trimmingArg(v driver.Value) (float64, error) {
	if v == nil {
		return unitroot.DefaultBreakTrim, nil
	}
	trim, err := floatOr(v, "trimming", unitroot.DefaultBreakTrim)
	if err != nil {
		return 0, err
	}
	return trim, unitroot.CheckBreakTrim(trim)
}
