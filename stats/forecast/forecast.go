package forecast

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/defaults"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// Integration is the differencing between a series z and its stationary
// part w:
//
//	w_t = (1 - B)^d (1 - B^s)^D z_t,
//
// d = Differences, D = SeasonalDifferences, s = Period (used only when
// D > 0). It is the differencing part of a Recipe, without Box-Cox or
// deterministic steps.
type Integration struct {
	Differences         int
	SeasonalDifferences int
	Period              int
}

// check validates the orders.
func (in Integration) check() error {
	if in.Differences < 0 || in.SeasonalDifferences < 0 {
		return numeric.Errorf("forecast: difference counts must not be negative, got d = %d, D = %d", in.Differences, in.SeasonalDifferences)
	}
	if in.SeasonalDifferences > 0 && in.Period < 2 {
		return numeric.Errorf("forecast: seasonal differencing needs a period of at least 2, got %d", in.Period)
	}
	return nil
}

// Lost is the number of observations the differencing consumes, d + D·s.
func (in Integration) Lost() int {
	if in.SeasonalDifferences == 0 {
		return in.Differences
	}
	return in.Differences + in.SeasonalDifferences*in.Period
}

// Apply returns w = (1-B)^d (1-B^s)^D z, Lost() values shorter than z
// (empty when z is not longer).
func (in Integration) Apply(z []float64) []float64 {
	w := z
	for i := 0; i < in.SeasonalDifferences; i++ {
		w, _ = stats.Difference(w, in.Period, 1)
	}
	for i := 0; i < in.Differences; i++ {
		w, _ = stats.Difference(w, 1, 1)
	}
	if len(w) > 0 && &w[0] == &z[0] {
		w = append([]float64(nil), w...)
	}
	return w
}

// polynomial returns the coefficients of δ(B) = (1-B)^d (1-B^s)^D, δ_0 = 1
// first, Lost()+1 of them.
func (in Integration) polynomial() []float64 {
	poly := []float64{1}
	for i := 0; i < in.SeasonalDifferences; i++ {
		poly = multiplyLagPolynomials(poly, seasonalDifferencePolynomial(in.Period))
	}
	for i := 0; i < in.Differences; i++ {
		poly = multiplyLagPolynomials(poly, []float64{1, -1})
	}
	return poly
}

func seasonalDifferencePolynomial(s int) []float64 {
	p := make([]float64, s+1)
	p[0], p[s] = 1, -1
	return p
}

// multiplyLagPolynomials returns the product of two polynomials in B given
// by their coefficients, lowest power first.
func multiplyLagPolynomials(a, b []float64) []float64 {
	out := make([]float64, len(a)+len(b)-1)
	for i, x := range a {
		if x == 0 {
			continue
		}
		for j, y := range b {
			out[i+j] += x * y
		}
	}
	return out
}

// Forecast holds h-step forecasts with a prediction interval, one value per
// step 1..horizon. From ForecastAR the values are on the scale of z; from
// ToOriginalUnits, in original units.
type Forecast struct {
	// Mean is the point forecast: on z's scale the conditional mean (also
	// the median, the errors being normal); in original units after a
	// Box-Cox transform, the median, or the mean when bias adjustment was
	// asked for.
	Mean []float64
	// Lower and Upper bound the central prediction interval of the given
	// Coverage: Mean ∓ Φ⁻¹((1+Coverage)/2)·StdErr on z's scale, those
	// quantiles mapped through the inverse transform in original units.
	Lower, Upper []float64
	// StdErr is the standard deviation of the h-step forecast error on z's
	// scale, σ·sqrt(Σ_{j<h} ψ_j²). ToOriginalUnits leaves it as it is.
	StdErr []float64
	// Coverage is the interval's nominal coverage, in (0, 1).
	Coverage float64
	// OutOfRange counts values of Mean, Lower and Upper whose transformed
	// value lay outside the inverse Box-Cox transform's domain (λy + 1 ≤ 0)
	// and were set to the limit there: 0 for λ > 0, +Inf for λ < 0
	// (ToOriginalUnits only).
	OutOfRange int
	// Status is ok, or why the values are NaN (the model's status).
	Status stats.Status
}

// DefaultHorizon and DefaultCoverage are the defaults plumb's SQL layer
// offers; ForecastAR itself takes both explicitly.
const (
	DefaultHorizon  = defaults.Horizon
	DefaultCoverage = defaults.Coverage
	// MaxHorizon bounds the horizon so that a mistyped one cannot exhaust
	// memory: three slices of this many values per series.
	MaxHorizon = 100000
)

// checkForecastArgs validates horizon and coverage.
func checkForecastArgs(horizon int, coverage float64) error {
	if horizon < 1 || horizon > MaxHorizon {
		return numeric.Errorf("forecast: the horizon must be between 1 and %d, got %d", MaxHorizon, horizon)
	}
	if !(coverage > 0 && coverage < 1) {
		return numeric.Errorf("forecast: the coverage must lie strictly between 0 and 1, got %v", coverage)
	}
	return nil
}

// ForecastAR forecasts z horizon steps ahead when its stationary part w =
// (1-B)^d (1-B^s)^D z follows the autoregression model (fitted on w, for
// example by FitAR(in.Apply(z), ...)). The whole model is
//
//	φ(B)·δ(B)·z_t = c + e_t,   δ(B) = (1-B)^d (1-B^s)^D,
//
// an ARIMA(p, d, 0)×(0, D, 0)_s with constant c (SARIMAX with trend="c"
// and intercept c). Point forecasts continue w by the AR recursion, with
// forecasts in place of unknown values, and z by z_t = w_t - Σ_{j≥1} δ_j
// z_{t-j}. The h-step forecast error is Σ_{j<h} ψ_j·e_{T+h-j}, with ψ
// the weights of 1/(φ(B)·δ(B)):
//
//	ψ_0 = 1,   ψ_j = -Σ_{i=1..min(j, p+K)} a_i·ψ_{j-i},   φ(B)δ(B) = Σ a_i B^i,
//
// so its variance is σ²·Σ_{j<h} ψ_j² (Box, Jenkins & Reinsel, Time Series
// Analysis, §5.1-5.2). The interval is mean ± Φ⁻¹((1+coverage)/2)·StdErr:
// it treats c, φ and σ² as known, as SARIMAX's forecasts at fixed
// parameters do.
//
// horizon outside 1..MaxHorizon and coverage outside (0, 1) are errors. A
// model whose status is not ok, or a z too short to hold the model's lags
// after differencing (status too_short), gives NaN values.
func ForecastAR(z []float64, in Integration, model ARModel, horizon int, coverage float64) (Forecast, error) {
	if err := checkForecastArgs(horizon, coverage); err != nil {
		return Forecast{}, err
	}
	if err := in.check(); err != nil {
		return Forecast{}, err
	}
	if model.Status != stats.StatusOK {
		return failedForecast(model.Status, horizon, coverage), nil
	}
	if len(model.Coefficients) != model.Order {
		return Forecast{}, numeric.Errorf("forecast: the model has order %d but %d coefficients", model.Order, len(model.Coefficients))
	}
	if s := stats.CheckFinite(z); s != stats.StatusOK {
		return failedForecast(s, horizon, coverage), nil
	}
	p, K := model.Order, in.Lost()
	if len(z) < K+max(p, 1) {
		return failedForecast(stats.StatusTooShort, horizon, coverage), nil
	}
	f := Forecast{
		Mean:     make([]float64, horizon),
		Lower:    make([]float64, horizon),
		Upper:    make([]float64, horizon),
		StdErr:   make([]float64, horizon),
		Coverage: coverage,
		Status:   stats.StatusOK,
	}
	// w: its last p observed values, then the forecasts.
	w := in.Apply(z[len(z)-K-p:])
	for h := 0; h < horizon; h++ {
		v := model.Constant
		for i, phi := range model.Coefficients {
			v += phi * w[len(w)-1-i]
		}
		w = append(w, v)
	}
	delta := in.polynomial()
	zz := append(make([]float64, 0, K+horizon), z[len(z)-K:]...)
	for h := 0; h < horizon; h++ {
		v := w[p+h]
		for j := 1; j <= K; j++ {
			v -= delta[j] * zz[len(zz)-j]
		}
		zz = append(zz, v)
		f.Mean[h] = v
	}
	psi := PsiWeights(model.Coefficients, in, horizon)
	q := distuv.UnitNormal.Quantile((1 + coverage) / 2)
	acc := 0.0
	for h := 0; h < horizon; h++ {
		acc += psi[h] * psi[h]
		f.StdErr[h] = math.Sqrt(model.Variance * acc)
		f.Lower[h] = f.Mean[h] - q*f.StdErr[h]
		f.Upper[h] = f.Mean[h] + q*f.StdErr[h]
	}
	return f, nil
}

// PsiWeights returns ψ_0..ψ_{n-1}, the coefficients of the moving-average
// form z_t = Σ_j ψ_j·e_{t-j} of the model φ(B)·(1-B)^d (1-B^s)^D z_t = e_t
// (phi holds φ_1..φ_p), by the recursion ψ_0 = 1, ψ_j = -Σ_{i≥1} a_i·ψ_{j-i}
// with a the coefficients of φ(B)·δ(B) (Box, Jenkins & Reinsel, §5.2.1).
func PsiWeights(phi []float64, in Integration, n int) []float64 {
	ar := make([]float64, len(phi)+1)
	ar[0] = 1
	for i, v := range phi {
		ar[i+1] = -v
	}
	a := multiplyLagPolynomials(ar, in.polynomial())
	psi := make([]float64, n)
	if n == 0 {
		return psi
	}
	psi[0] = 1
	for j := 1; j < n; j++ {
		v := 0.0
		for i := 1; i <= min(j, len(a)-1); i++ {
			v -= a[i] * psi[j-i]
		}
		psi[j] = v
	}
	return psi
}

// failedForecast is a forecast of NaN values with the reason.
func failedForecast(s stats.Status, horizon int, coverage float64) Forecast {
	f := Forecast{Coverage: coverage, Status: s}
	for _, p := range []*[]float64{&f.Mean, &f.Lower, &f.Upper, &f.StdErr} {
		*p = make([]float64, horizon)
		for i := range *p {
			(*p)[i] = math.NaN()
		}
	}
	return f
}

// ForecastOptions configures ForecastSeries.
type ForecastOptions struct {
	// Integration is the differencing that makes z stationary.
	Integration
	// Horizon is the number of steps forecast (1..MaxHorizon; no default:
	// see DefaultHorizon).
	Horizon int
	// Coverage is the prediction interval's nominal coverage, in (0, 1)
	// (no default: see DefaultCoverage).
	Coverage float64
	// AR chooses the autoregression's order; its Period defaults to the
	// Integration's.
	AR AROptions
}

// SeriesForecast is what ForecastSeries returns: the fitted model and the
// forecasts on z's scale.
type SeriesForecast struct {
	Model ARModel
	Forecast
}

// ForecastSeries differences z as opts.Integration says, fits an
// autoregression with a constant to the result (FitAR: order by AIC up to
// opts.AR.MaxOrder) and forecasts z opts.Horizon steps ahead (ForecastAR).
// The forecasts' Status is the model's when it could not be fitted.
func ForecastSeries(z []float64, opts ForecastOptions) (SeriesForecast, error) {
	if err := checkForecastArgs(opts.Horizon, opts.Coverage); err != nil {
		return SeriesForecast{}, err
	}
	if err := opts.Integration.check(); err != nil {
		return SeriesForecast{}, err
	}
	arOpts := opts.AR
	if arOpts.Period == 0 {
		arOpts.Period = opts.Period
	}
	if s := stats.CheckFinite(z); s != stats.StatusOK {
		return SeriesForecast{Model: failedAR(s, 0), Forecast: failedForecast(s, opts.Horizon, opts.Coverage)}, nil
	}
	model, err := FitAR(opts.Integration.Apply(z), arOpts)
	if err != nil {
		return SeriesForecast{}, err
	}
	f, err := ForecastAR(z, opts.Integration, model, opts.Horizon, opts.Coverage)
	if err != nil {
		return SeriesForecast{}, err
	}
	return SeriesForecast{Model: model, Forecast: f}, nil
}
