package forecast

import (
	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
	"github.com/plumb-sql/plumb/stats/verdict"
)

// RecipeForecastOptions configure ForecastByRecipe.
type RecipeForecastOptions struct {
	// Horizon and Coverage as ForecastOptions (no defaults: see
	// DefaultHorizon and DefaultCoverage).
	Horizon  int
	Coverage float64
	// AR chooses the autoregression's order (zero value: AIC up to
	// DefaultMaxAROrder).
	AR AROptions
	// MeanPoint makes the point forecast the mean in original units
	// instead of the median when the recipe has a Box-Cox transform (see
	// ToOriginalUnits).
	MeanPoint bool
	// Search bounds the choice of ARMA model (zero value: ChooseARMA's
	// defaults; its Period, Differences and AR are set from the recipe and
	// from AR).
	Search ARMASearch
	// LeastSquaresOnly forecasts with the least-squares autoregression
	// alone (FitAR and ForecastAR), as plumb did before the ARMA search:
	// for comparisons.
	LeastSquaresOnly bool
}

// RecipeForecast is a series' forecast in original units with the model
// behind it.
type RecipeForecast struct {
	// Chosen is the model the forecasts come from, fitted to the series
	// after the whole recipe (its stationary part): ChooseARMA's choice, or
	// the least-squares autoregression (Chosen.LeastSquares) when it won or
	// with LeastSquaresOnly.
	Chosen ARMAModel
	// Model is the least-squares autoregression (FitAR), a candidate of
	// the choice.
	Model ARModel
	// Forecast is in original units.
	Forecast
	// WhiteNoise is the Ljung-Box test of the model's residuals, with the
	// model's coefficients counted as fitted parameters.
	WhiteNoise stats.WhiteNoiseResult
}

// ForecastByRecipe forecasts x through a recipe (usually the verdict's:
// StationarityResult.Recipe, fitted on StationarityResult.Judged): the
// recipe's steps before differencing (Box-Cox, the deterministic parts)
// give z = g_λ(x) - m_t (Recipe.Level); a model of w = (1 - B)^d (1 - B^s)^D z
// is chosen by AICc among ARMA models fitted by exact likelihood and the
// least-squares autoregression (ChooseARMA; seasonal ARMA terms at the
// recipe's period only when the recipe has a seasonal step, differences or
// fixed seasonal means), and z is forecast with intervals from the same
// Kalman filter, the differencing included (ForecastARMA); when no model
// of the search can be fitted, the least-squares autoregression's
// ψ-weight forecasts are used (ForecastSeries), as with LeastSquaresOnly.
// The deterministic part m_t is continued at the
// forecasts' own positions (len(x), len(x)+1, ...: the trend goes on, a
// shifted level stays, the seasonal means repeat) and the Box-Cox transform
// is inverted, quantiles mapping to quantiles (ToOriginalUnits).
//
// Errors are for bad options (horizon, coverage, a recipe that does not
// fit x); a series the model cannot be fitted to gives NaN forecasts with
// a status (too_short, constant, non_finite, singular, non_positive for a
// Box-Cox transform of a value ≤ 0).
func ForecastByRecipe(x []float64, rec verdict.Recipe, opts RecipeForecastOptions) (RecipeForecast, error) {
	if err := checkForecastArgs(opts.Horizon, opts.Coverage); err != nil {
		return RecipeForecast{}, err
	}
	fail := func(s stats.Status) (RecipeForecast, error) {
		return RecipeForecast{Model: failedAR(s, 0), Forecast: failedForecast(s, opts.Horizon, opts.Coverage),
			WhiteNoise: stats.WhiteNoiseResult{Statistic: numeric.NaN(), PValue: numeric.NaN(), Status: s}}, nil
	}
	z, s, err := rec.Level(x)
	if err != nil {
		return RecipeForecast{}, err
	}
	if s != stats.StatusOK {
		return fail(s)
	}
	in := Integration{Differences: rec.Differences, SeasonalDifferences: rec.SeasonalDifferences, Period: rec.Period}
	if err := in.check(); err != nil {
		return RecipeForecast{}, err
	}
	var out RecipeForecast
	var zf Forecast // on z's scale
	made := false
	if !opts.LeastSquaresOnly {
		search := opts.Search
		search.Differences = rec.Differences + rec.SeasonalDifferences
		search.Period = 0
		if rec.SeasonalDifferences > 0 || rec.SeasonalMeans != nil {
			search.Period = rec.Period
		}
		search.AR = opts.AR
		if search.AR.Period == 0 {
			search.AR.Period = rec.Period
		}
		choice, err := ChooseARMA(in.Apply(z), search)
		if err != nil {
			return RecipeForecast{}, err
		}
		out.Model, out.Chosen = choice.LeastSquares, choice.Model
		if choice.Model.Status == stats.StatusOK {
			if zf, err = ForecastARMA(z, in, choice.Model, opts.Horizon, opts.Coverage); err != nil {
				return RecipeForecast{}, err
			}
			made = true
		}
	}
	if !made {
		series, err := ForecastSeries(z, ForecastOptions{Integration: in, Horizon: opts.Horizon, Coverage: opts.Coverage, AR: opts.AR})
		if err != nil {
			return RecipeForecast{}, err
		}
		zf, out.Model = series.Forecast, series.Model
		out.Chosen = leastSquaresAsARMA(series.Model)
	}
	if zf.Status != stats.StatusOK {
		return fail(zf.Status)
	}
	var path []float64
	if rec.HasDeterministic() {
		path = make([]float64, opts.Horizon)
		for i := range path {
			path[i] = rec.Deterministic(len(x) + i)
		}
	}
	f, err := ToOriginalUnits(zf, BackTransform{Path: path, BoxCox: rec.BoxCox, Lambda: rec.Lambda, MeanPoint: opts.MeanPoint})
	if err != nil {
		return RecipeForecast{}, err
	}
	out.Forecast = f
	if out.WhiteNoise, err = stats.LjungBox(out.Chosen.Residuals, 0, out.Chosen.Order.AR+out.Chosen.Order.MA+out.Chosen.Order.SeasonalAR+out.Chosen.Order.SeasonalMA); err != nil {
		return RecipeForecast{}, err
	}
	return out, nil
}

// leastSquaresAsARMA describes a least-squares autoregression as an
// ARMAModel (LeastSquares set): its coefficients, constant and conditional
// σ², residuals and criteria as FitAR computed them (no exact likelihood:
// LogLikelihood and AICc are NaN).
func leastSquaresAsARMA(m ARModel) ARMAModel {
	out := ARMAModel{Order: ARMAOrder{AR: m.Order, WithMean: true}, AR: cloneFloats(m.Coefficients),
		Constant: m.Constant, Mean: m.Constant / polynomialAtOne(m.Coefficients), Variance: m.Variance,
		LogLikelihood: numeric.NaN(), AIC: m.AIC, AICc: numeric.NaN(), Observations: m.Observations, Residuals: m.Residuals,
		LeastSquares: true, Status: m.Status}
	return out
}
