package stats

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
}

// RecipeForecast is a series' forecast in original units with the model
// behind it.
type RecipeForecast struct {
	// Model is the autoregression fitted to the series after the whole
	// recipe (its stationary part).
	Model ARModel
	// Forecast is in original units.
	Forecast
	// WhiteNoise is the Ljung-Box test of the model's residuals, with the
	// model's coefficients counted as fitted parameters.
	WhiteNoise WhiteNoiseResult
}

// ForecastByRecipe forecasts x through a recipe (usually the verdict's:
// StationarityResult.Recipe, fitted on StationarityResult.Judged): the
// recipe's steps before differencing (Box-Cox, the deterministic parts)
// give z = g_λ(x) - m_t (Recipe.Level); an autoregression with a constant
// is fitted to (1 - B)^d (1 - B^s)^D z and z is forecast with intervals from
// the ψ-weights of the whole model, the differencing included
// (ForecastSeries); the deterministic part m_t is continued at the
// forecasts' own positions (len(x), len(x)+1, ...: the trend goes on, a
// shifted level stays, the seasonal means repeat) and the Box-Cox transform
// is inverted, quantiles mapping to quantiles (ToOriginalUnits).
//
// Errors are for bad options (horizon, coverage, a recipe that does not
// fit x); a series the model cannot be fitted to gives NaN forecasts with
// a status (too_short, constant, non_finite, singular, non_positive for a
// Box-Cox transform of a value ≤ 0).
func ForecastByRecipe(x []float64, rec Recipe, opts RecipeForecastOptions) (RecipeForecast, error) {
	if err := checkForecastArgs(opts.Horizon, opts.Coverage); err != nil {
		return RecipeForecast{}, err
	}
	fail := func(s Status) (RecipeForecast, error) {
		return RecipeForecast{Model: failedAR(s, 0), Forecast: failedForecast(s, opts.Horizon, opts.Coverage),
			WhiteNoise: WhiteNoiseResult{Statistic: nan(), PValue: nan(), Status: s}}, nil
	}
	z, s, err := rec.Level(x)
	if err != nil {
		return RecipeForecast{}, err
	}
	if s != StatusOK {
		return fail(s)
	}
	in := Integration{Differences: rec.Differences, SeasonalDifferences: rec.SeasonalDifferences, Period: rec.Period}
	sf, err := ForecastSeries(z, ForecastOptions{Integration: in, Horizon: opts.Horizon, Coverage: opts.Coverage, AR: opts.AR})
	if err != nil {
		return RecipeForecast{}, err
	}
	if sf.Forecast.Status != StatusOK {
		return fail(sf.Forecast.Status)
	}
	var path []float64
	if rec.hasDeterministic() {
		path = make([]float64, opts.Horizon)
		for i := range path {
			path[i] = rec.Deterministic(len(x) + i)
		}
	}
	f, err := ToOriginalUnits(sf.Forecast, BackTransform{Path: path, BoxCox: rec.BoxCox, Lambda: rec.Lambda, MeanPoint: opts.MeanPoint})
	if err != nil {
		return RecipeForecast{}, err
	}
	out := RecipeForecast{Model: sf.Model, Forecast: f}
	if out.WhiteNoise, err = LjungBox(sf.Model.Residuals, 0, sf.Model.Order); err != nil {
		return RecipeForecast{}, err
	}
	return out, nil
}
