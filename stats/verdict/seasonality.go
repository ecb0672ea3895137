package verdict

import (
	"math"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/defaults"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
	"github.com/plumb-sql/plumb/stats/unitroot"
)

// DefaultPeriods are the seasonal periods tried when none is given
// (defaults.Periods: a week of days, a year of months, a day of hours, a
// year of weeks, a year of days).
var DefaultPeriods = defaults.Periods()

// SeasonalStrengthThreshold is the seasonal strength from which plumb calls a
// series seasonal and recommends one seasonal difference: 0.64, the
// threshold practitioners use with Wang, Smith & Hyndman's measure (from
// memory; common practice in automatic seasonal differencing).
const SeasonalStrengthThreshold = 0.64

// SeasonalityOptions configure Seasonality.
type SeasonalityOptions struct {
	// Period is the seasonal period; 0 means detect it among Candidates.
	Period int
	// Candidates are the periods tried when Period is 0; nil means
	// DefaultPeriods.
	Candidates []int
	// keepTrend hands the STL trend back in the result's trend field (a
	// scratch slice the caller puts back) instead of releasing it.
	keepTrend bool
}

// SeasonalityResult describes a series' seasonal pattern.
type SeasonalityResult struct {
	Period int
	// Detected is true when Period was found by the search, not given.
	Detected bool
	// PeakAutocorrelation is the autocorrelation of the first differences at
	// lag Period.
	PeakAutocorrelation float64
	// SeasonalStrength and TrendStrength come from an STL decomposition at
	// Period (Wang, Smith & Hyndman 2006).
	SeasonalStrength, TrendStrength float64
	// Seasonal is SeasonalStrength ≥ SeasonalStrengthThreshold.
	Seasonal bool
	// OCSB is the seasonal unit-root test at Period (run when the seasonal
	// strength is at least ModerateSeasonalStrength; its Status says
	// when not).
	OCSB   unitroot.OCSBResult
	Status stats.Status

	trend []float64 // the STL trend, with keepTrend only
}

// ModerateSeasonalStrength is the strength from which the OCSB test is run:
// with a pattern this visible, a seasonal unit root (not rejected by OCSB)
// also calls for seasonal differencing.
const ModerateSeasonalStrength = 0.3

// Seasonality measures the seasonal pattern of x. Without a given period it
// looks for one cheaply first: among the candidates with at least three full
// periods in the series, it takes the autocorrelation of the first
// differences at each candidate lag (differencing removes a trend or a unit
// root, which would otherwise make every lag look strong); the largest must
// exceed 2.576/√n, the 1% band for white noise, and the smallest candidate
// within 80% of it is kept, so that a multiple of the true period (24 for
// 12) does not win. Without such a peak no period is found. It then decomposes x
// by STL at that period and reports the seasonal and trend strengths.
//
// Status season_unknown: no period was given and none was found, or the
// given period does not fit twice into the series. The series is then not
// called seasonal. Other statuses as usual.
func Seasonality(x []float64, opts SeasonalityOptions) (r SeasonalityResult, err error) {
	if opts.Period < 0 || opts.Period == 1 {
		return SeasonalityResult{}, numeric.Errorf("seasonality: the period must be 0 (detect) or at least 2, got %d", opts.Period)
	}
	n := math.NaN()
	r = SeasonalityResult{PeakAutocorrelation: n, SeasonalStrength: n, TrendStrength: n,
		OCSB: unitroot.OCSBResult{Status: stats.StatusSeasonUnknown, Statistic: n, Critical5: n}}
	if s := stats.CheckFinite(x); s != stats.StatusOK {
		r.Status = s
		return r, nil
	}
	if len(x) >= 2 && numeric.IsConstant(x) {
		r.Status = stats.StatusConstant
		return r, nil
	}
	d := numeric.GetScratch(max(len(x)-1, 0))
	defer numeric.PutScratch(d)
	for i := range d {
		d[i] = x[i+1] - x[i]
	}
	period := opts.Period
	if period == 0 {
		candidates := opts.Candidates
		if candidates == nil {
			candidates = DefaultPeriods
		}
		period = detectPeriod(d, len(x), candidates)
		r.Detected = period > 0
	}
	if period < 2 || len(x) < 2*period {
		r.Period = period
		r.Status = stats.StatusSeasonUnknown
		return r, nil
	}
	r.Period = period
	if acf := stats.AutocorrelationAt(d, []int{period}); acf != nil {
		r.PeakAutocorrelation = acf[0]
	}
	dec, status := STL(x, period, STLOptions{})
	if status != stats.StatusOK {
		r.Status = status
		return r, nil
	}
	r.SeasonalStrength = SeasonalStrength(dec)
	r.TrendStrength = TrendStrength(dec)
	if opts.keepTrend {
		r.trend, dec.Trend = dec.Trend, nil
	}
	dec.release()
	r.Seasonal = r.SeasonalStrength >= SeasonalStrengthThreshold
	r.OCSB = unitroot.OCSBResult{Status: stats.StatusSeasonUnknown, Statistic: math.NaN(), Critical5: math.NaN()}
	if r.SeasonalStrength >= ModerateSeasonalStrength {
		if r.OCSB, err = unitroot.OCSB(x, period); err != nil {
			return r, err
		}
	}
	r.Status = stats.StatusOK
	return r, nil
}

// detectPeriod returns the candidate period found in the differences d of a
// series of length n, or 0 when no candidate fits or none shows a positive
// autocorrelation.
func detectPeriod(d []float64, n int, candidates []int) int {
	var lags []int
	for _, p := range candidates {
		if p >= 2 && n >= 3*p && p < len(d) {
			lags = append(lags, p)
		}
	}
	acf := stats.AutocorrelationAt(d, lags)
	if acf == nil {
		return 0
	}
	// Only a peak above the 1% band of white noise, 2.576/√n, counts.
	best := 2.576 / math.Sqrt(float64(len(d)))
	found := false
	for _, a := range acf {
		if a > best {
			best, found = a, true
		}
	}
	if !found {
		return 0
	}
	chosen := 0
	for i, p := range lags {
		if acf[i] >= 0.8*best && (chosen == 0 || p < chosen) {
			chosen = p
		}
	}
	return chosen
}
