package forecast

import (
	"math"

	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// BackTransform says how forecasts on the scale of z return to original
// units: first the deterministic part the recipe removed is added back,
// y = z + Path, then the Box-Cox transform is inverted.
type BackTransform struct {
	// Path is the deterministic component on the Box-Cox scale continued
	// over the horizon, one value per step (fixed seasonal means by
	// position, a trend's continuation, a shifted level, or their sum);
	// nil when the recipe removed none. It is known, so it moves the mean
	// and both bounds alike and leaves the error variance unchanged.
	Path []float64
	// BoxCox says whether to invert the Box-Cox transform with Lambda.
	BoxCox bool
	Lambda float64
	// MeanPoint reports the mean in original units instead of the median.
	MeanPoint bool
}

// ToOriginalUnits maps forecasts on z's scale (from ForecastAR) to original
// units as b says.
//
// The interval's bounds are quantiles of y = z + Path, and the inverse
// Box-Cox transform g⁻¹(y) = (λy + 1)^(1/λ) (exp y for λ = 0) is
// increasing, so g⁻¹ of a quantile is the same quantile in original units:
// the bounds map exactly. So does the median, g⁻¹(μ); it is the point
// forecast unless MeanPoint is set. Then the point forecast is the mean
// E[g⁻¹(Y)] for Y ~ N(μ, σ²), σ = StdErr:
//
//	λ = 0:  exp(μ + σ²/2), exact (the lognormal mean; common practice);
//	λ ≠ 0:  g⁻¹(μ)·(1 + σ²·(1-λ) / (2·(λμ + 1)²)),
//
// the second-order Taylor expansion E[g⁻¹(Y)] ≈ g⁻¹(μ) + ½·g2(μ)·σ², g2
// the second derivative of g⁻¹, (1-λ)·(λμ + 1)^(1/λ-2)
// (the delta method, common practice; TestBoxCoxMeanAgainstQuadrature
// measures its error against numerical integration). It is an
// approximation: for λ < 0 the normal model puts mass beyond -1/λ, where
// g⁻¹ is infinite, and the exact mean does not exist.
//
// A transformed value with λy + 1 ≤ 0 lies outside g⁻¹'s domain; it is set
// to the domain's limit (0 for λ > 0, +Inf for λ < 0: the monotone
// extension, so a bound keeps its coverage) and counted in OutOfRange.
// A Path whose length differs from the horizon is an error.
func ToOriginalUnits(f Forecast, b BackTransform) (Forecast, error) {
	h := len(f.Mean)
	if b.Path != nil && len(b.Path) != h {
		return Forecast{}, numeric.Errorf("forecast: the deterministic path has %d values for %d steps", len(b.Path), h)
	}
	if b.BoxCox && (math.IsNaN(b.Lambda) || math.IsInf(b.Lambda, 0)) {
		return Forecast{}, numeric.Errorf("forecast: the Box-Cox lambda must be finite")
	}
	out := Forecast{
		Mean:     make([]float64, h),
		Lower:    make([]float64, h),
		Upper:    make([]float64, h),
		StdErr:   append([]float64(nil), f.StdErr...),
		Coverage: f.Coverage,
		Status:   f.Status,
	}
	for i := 0; i < h; i++ {
		shift := 0.0
		if b.Path != nil {
			shift = b.Path[i]
		}
		mu, lo, hi := f.Mean[i]+shift, f.Lower[i]+shift, f.Upper[i]+shift
		if !b.BoxCox {
			out.Mean[i], out.Lower[i], out.Upper[i] = mu, lo, hi
			continue
		}
		var clipped bool
		out.Lower[i], clipped = inverseBoxCoxExtended(lo, b.Lambda)
		out.OutOfRange += b2i(clipped)
		out.Upper[i], clipped = inverseBoxCoxExtended(hi, b.Lambda)
		out.OutOfRange += b2i(clipped)
		out.Mean[i], clipped = inverseBoxCoxExtended(mu, b.Lambda)
		out.OutOfRange += b2i(clipped)
		if b.MeanPoint && !clipped {
			out.Mean[i] = boxCoxMean(mu, f.StdErr[i], b.Lambda)
		}
	}
	return out, nil
}

// inverseBoxCoxExtended returns g⁻¹(y), or the limit of g⁻¹ at the edge of
// its domain when λy + 1 ≤ 0 (0 for λ > 0, +Inf for λ < 0) with true.
// NaN stays NaN.
func inverseBoxCoxExtended(y, lambda float64) (float64, bool) {
	switch {
	case math.IsNaN(y):
		return y, false
	case lambda == 0:
		return math.Exp(y), false
	case lambda*y+1 <= 0:
		if lambda > 0 {
			return 0, true
		}
		return math.Inf(1), true
	}
	return math.Pow(lambda*y+1, 1/lambda), false
}

// boxCoxMean returns E[g⁻¹(Y)], Y ~ N(mu, sd²): exact for λ = 0, the
// second-order approximation otherwise (see ToOriginalUnits).
func boxCoxMean(mu, sd, lambda float64) float64 {
	v := sd * sd
	if lambda == 0 {
		return math.Exp(mu + v/2)
	}
	base := lambda*mu + 1
	return math.Pow(base, 1/lambda) * (1 + v*(1-lambda)/(2*base*base))
}

func b2i(b bool) int {
	if b {
		return 1
	}
	return 0
}
