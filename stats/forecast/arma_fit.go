package forecast

import (
	"math"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
	"gonum.org/v1/gonum/optimize"
)

// ARMAOrder is the shape of a multiplicative seasonal ARMA model of a
// stationary series w,
//
//	φ(B)·Φ(B^s)·(w_t - μ) = θ(B)·Θ(B^s)·e_t,   e_t ~ N(0, σ²),
//
// φ of degree AR, θ of degree MA, Φ of degree SeasonalAR and Θ of degree
// SeasonalMA in B^s, s = Period (ignored when both seasonal degrees are 0).
// WithMean says whether μ is estimated; without it μ = 0. On the recipe's
// scale w = (1-B)^d (1-B^s)^D z, this is the ARIMA (AR, d, MA)×(SeasonalAR,
// D, SeasonalMA)_s of Box, Jenkins & Reinsel (Time Series Analysis, ch. 9).
type ARMAOrder struct {
	AR, MA, SeasonalAR, SeasonalMA int
	Period                         int
	WithMean                       bool
}

// parameters is the number of estimated coefficients, μ included, σ² not.
func (o ARMAOrder) parameters() int {
	k := o.AR + o.MA + o.SeasonalAR + o.SeasonalMA
	if o.WithMean {
		k++
	}
	return k
}

// span is the number of lags the expanded model reaches, p + s·P + q + s·Q.
func (o ARMAOrder) span() int {
	return o.AR + o.MA + o.Period*(o.SeasonalAR+o.SeasonalMA)
}

// ARMAModel is a fitted ARMAOrder.
type ARMAModel struct {
	Order ARMAOrder
	// AR, MA, SeasonalAR and SeasonalMA hold φ_1.., θ_1.., Φ_1.., Θ_1..
	// (signs as in ARMAOrder's equation).
	AR, MA, SeasonalAR, SeasonalMA []float64
	// Mean is μ, the mean of w (0 without WithMean); Constant is the
	// equivalent intercept c = μ·φ(1)·Φ(1) of φ(B)Φ(B^s) w_t = c + ..., as
	// ARModel.Constant and SARIMAX's trend="c" intercept state it.
	Mean, Constant float64
	// Variance is σ̂², the maximum-likelihood innovation variance (Σ v_t²/F_t
	// over Observations).
	Variance float64
	// LogLikelihood is the exact Gaussian log-likelihood of the Observations values
	// of w at the estimates.
	LogLikelihood float64
	// AIC = -2·log L + 2k and AICc = AIC + 2k(k+1)/(Observations-k-1) (Hurvich &
	// Tsai 1989), with k the coefficients, μ and σ².
	AIC, AICc float64
	// Observations is the number of values of w.
	Observations int
	// Residuals are the standardised one-step prediction errors
	// v_t/sqrt(F_t) of the Kalman filter (variance σ²), Observations values.
	Residuals []float64
	// LeastSquares says the coefficients are an ARModel's (FitAR), not the
	// maximum of this likelihood: ChooseARMA keeps that model as a
	// candidate and scores it by the same exact likelihood.
	LeastSquares bool
	// Status is ok, or why the model is missing: too_short, constant,
	// non_finite, singular (the likelihood could not be evaluated).
	Status stats.Status
}

// MinARMALength is the fewest values of w FitARMA accepts for an order:
// the lags the model reaches plus the coefficients plus three.
func MinARMALength(o ARMAOrder) int { return o.span() + o.parameters() + 3 }

// armaLikelihood evaluates the exact, σ²-concentrated log-likelihood of w
// (already centred and scaled as the caller wishes) at the given
// coefficients: by the full Kalman filter when the residuals (and the
// final state) are wanted, otherwise by the Chandrasekhar recursions
// (fastSums), the same sums at O(r) a value.
func armaLikelihood(w []float64, o ARMAOrder, ar, ma, sar, sma []float64, mean float64, keep bool) (armaFilterResult, float64, float64) {
	a, b := expandARMA(ar, ma, sar, sma, o.Period)
	ss := newARMAStateSpace(a, b)
	x := w
	if mean != 0 {
		x = numeric.GetScratch(len(w))
		defer numeric.PutScratch(x)
		for i, v := range w {
			x[i] = v - mean
		}
	}
	var res armaFilterResult
	if keep {
		res = ss.filter(x, true)
	} else {
		res.SumSquares, res.SumLogF, res.OK = ss.fastSums(x)
	}
	if !res.OK {
		return res, math.Inf(-1), numeric.NaN()
	}
	logL, s2 := res.concentratedLogLikelihood(len(w))
	return res, logL, s2
}

// armaParams unpacks a free parameter vector: AR, MA, seasonal AR,
// seasonal MA blocks, each through the stationary or invertible map (the
// mean is not among them: fastSumsMean concentrates it out).
func armaParams(x []float64, o ARMAOrder) (ar, ma, sar, sma []float64) {
	i := 0
	take := func(n int) []float64 { s := x[i : i+n]; i += n; return s }
	ar = stationaryFromFree(take(o.AR))
	ma = invertibleFromFree(take(o.MA))
	sar = stationaryFromFree(take(o.SeasonalAR))
	sma = invertibleFromFree(take(o.SeasonalMA))
	return
}

// concentrated returns the σ²- and μ-concentrated log-likelihood of ws at
// the coefficients, and μ̂ (0 without a mean).
func concentrated(ws []float64, o ARMAOrder, ar, ma, sar, sma []float64) (logL, mean float64) {
	a, b := expandARMA(ar, ma, sar, sma, o.Period)
	sq, lf, mu, ok := newARMAStateSpace(a, b).fastSumsMean(ws, o.WithMean)
	if !ok {
		return math.Inf(-1), 0
	}
	logL, _ = armaFilterResult{SumSquares: sq, SumLogF: lf}.concentratedLogLikelihood(len(ws))
	return logL, mu
}

// FitARMA fits the ARMAOrder o to w by exact maximum likelihood.
//
// The likelihood is the Kalman filter's prediction-error decomposition
// from the stationary covariance (armaStateSpace.filter), with σ²
// concentrated out. It is maximised by BFGS (gonum's optimize, central
// finite-difference gradients) over unconstrained parameters mapped onto
// the stationary region of each autoregressive polynomial and the
// invertible region of each moving-average one (stationaryFromFree:
// Jones 1980, Monahan 1984), so every candidate the optimiser visits is a
// stationary, invertible model; the mean is concentrated out with σ² (its
// generalised least-squares estimate at each point, fastSumsMean). w is
// first centred on
// its sample mean (when the model has one) and divided by its root mean
// square about that centre, which leaves the
// estimates unchanged (they are mapped back) and keeps the mean's scale
// that of the coefficients. The search starts from start when it has the
// same order (a warm start, see ChooseARMA), otherwise from white noise
// around the sample mean.
func FitARMA(w []float64, o ARMAOrder, start *ARMAModel) (ARMAModel, error) {
	return fitARMA(w, o, start, tightFit)
}

// fitPrecision is how far FitARMA's optimiser goes: tightFit to the
// gradient noise of the finite differences, looseFit far enough to rank
// candidates by AICc (the log-likelihood within about 1e-6 of its maximum
// on a few hundred values, the coefficients within about 1e-5) at a
// fraction of the evaluations; ChooseARMA searches loosely.
// tightFit differentiates centrally (error about 1e-10), looseFit forward
// (about 1e-7, one evaluation a parameter instead of two).
// A loose fit leaves the residuals out (the search computes them for the
// chosen model only).
// A loose fit also stops after fewer iterations and evaluations: a
// candidate whose optimum lies on the boundary (a moving-average root at
// the unit circle, common after an unneeded difference) crawls towards it
// and would otherwise cost hundreds of evaluations.
type fitPrecision struct {
	gradient, function float64
	central, residuals bool
	iterations, evals  int
	// used, when set, counts the likelihood evaluations (ChooseARMA's
	// budget).
	used *int
}

var (
	tightFit = fitPrecision{gradient: 1e-9, function: 1e-14, central: true, residuals: true, iterations: 400, evals: 20000}
	looseFit = fitPrecision{gradient: 1e-5, function: 1e-10, iterations: 60, evals: 600}
)

func fitARMA(w []float64, o ARMAOrder, start *ARMAModel, precision fitPrecision) (ARMAModel, error) {
	if o.AR < 0 || o.MA < 0 || o.SeasonalAR < 0 || o.SeasonalMA < 0 {
		return ARMAModel{}, numeric.Errorf("arma: orders must not be negative, got %+v", o)
	}
	if (o.SeasonalAR > 0 || o.SeasonalMA > 0) && o.Period < 2 {
		return ARMAModel{}, numeric.Errorf("arma: seasonal terms need a period of at least 2, got %d", o.Period)
	}
	if s := arInputStatus(w, MinARMALength(o)); s != stats.StatusOK {
		return failedARMA(s, o), nil
	}
	n := len(w)
	center := 0.0 // without a mean, the model's mean is 0, not w's
	if o.WithMean {
		center = numeric.Sum(w) / float64(n)
	}
	ss := 0.0
	for _, v := range w {
		ss += (v - center) * (v - center)
	}
	scale := math.Sqrt(ss / float64(n))
	if !(scale > 0) || math.IsInf(scale, 0) {
		return failedARMA(stats.StatusSingular, o), nil
	}
	ws := make([]float64, n)
	for i, v := range w {
		ws[i] = (v - center) / scale
	}
	k := o.AR + o.MA + o.SeasonalAR + o.SeasonalMA // free parameters; μ is concentrated
	x0 := make([]float64, k)
	if start != nil && start.Status == stats.StatusOK && start.Order == o {
		if v, ok := armaFree(*start, center, scale); ok {
			x0 = v
		}
	}
	objective := func(x []float64) float64 {
		if precision.used != nil {
			*precision.used++
		}
		ar, ma, sar, sma := armaParams(x, o)
		logL, _ := concentrated(ws, o, ar, ma, sar, sma)
		if math.IsInf(logL, -1) || math.IsNaN(logL) {
			return math.MaxFloat64 / 4
		}
		return -logL / float64(n)
	}
	best := x0
	if k > 0 {
		problem := optimize.Problem{
			Func: objective,
			Grad: func(g, x []float64) {
				xx := append([]float64(nil), x...)
				var f0 float64
				if !precision.central {
					f0 = objective(x)
				}
				for i := range x {
					if precision.central {
						h := 1e-6 * math.Max(1, math.Abs(x[i]))
						xx[i] = x[i] + h
						up := objective(xx)
						xx[i] = x[i] - h
						down := objective(xx)
						g[i] = (up - down) / (2 * h)
					} else {
						h := 1e-7 * math.Max(1, math.Abs(x[i]))
						xx[i] = x[i] + h
						g[i] = (objective(xx) - f0) / h
					}
					xx[i] = x[i]
				}
			},
		}
		settings := &optimize.Settings{
			GradientThreshold: precision.gradient,
			Converger:         &optimize.FunctionConverge{Absolute: precision.function, Relative: precision.function, Iterations: 20},
			MajorIterations:   precision.iterations,
			FuncEvaluations:   precision.evals,
			// Each gradient costs k (forward) or 2k (central) evaluations.
			GradEvaluations: max(1, precision.evals/(2*k)),
		}
		result, _ := optimize.Minimize(problem, x0, settings, &optimize.BFGS{})
		if result != nil && result.F < objective(x0) {
			best = result.X
		}
	}
	ar, ma, sar, sma := armaParams(best, o)
	_, mean := concentrated(ws, o, ar, ma, sar, sma)
	m, s := armaModelAt(w, o, ar, ma, sar, sma, center+scale*mean, precision.residuals)
	if s != stats.StatusOK {
		return failedARMA(s, o), nil
	}
	return m, nil
}

// armaFree maps a fitted model back to FitARMA's free parameters for w
// centred on center and divided by scale.
func armaFree(m ARMAModel, center, scale float64) ([]float64, bool) {
	var x []float64
	for _, block := range []struct {
		c   []float64
		inv bool
	}{{m.AR, false}, {m.MA, true}, {m.SeasonalAR, false}, {m.SeasonalMA, true}} {
		f, ok := freeFromStationary(block.c)
		if block.inv {
			f, ok = freeFromInvertible(block.c)
		}
		if !ok {
			return nil, false
		}
		x = append(x, f...)
	}
	return x, true
}

// armaModelAt evaluates the model with the given coefficients and mean on
// w: its likelihood, σ̂², criteria and, when asked for, residuals.
func armaModelAt(w []float64, o ARMAOrder, ar, ma, sar, sma []float64, mean float64, residuals bool) (ARMAModel, stats.Status) {
	if !o.WithMean {
		mean = 0
	}
	res, logL, s2 := armaLikelihood(w, o, ar, ma, sar, sma, mean, residuals)
	if math.IsInf(logL, -1) || !(s2 > 0) || math.IsInf(s2, 0) || math.IsNaN(logL) {
		return ARMAModel{}, stats.StatusSingular
	}
	n := len(w)
	k := float64(o.parameters() + 1)
	m := ARMAModel{
		Order: o, AR: cloneFloats(ar), MA: cloneFloats(ma), SeasonalAR: cloneFloats(sar), SeasonalMA: cloneFloats(sma),
		Mean: mean, Variance: s2, LogLikelihood: logL, Observations: n, Status: stats.StatusOK,
	}
	m.Constant = mean * polynomialAtOne(ar) * polynomialAtOne(sar)
	m.AIC = -2*logL + 2*k
	m.AICc = math.Inf(1)
	if float64(n)-k-1 > 0 {
		m.AICc = m.AIC + 2*k*(k+1)/(float64(n)-k-1)
	}
	m.Residuals = res.Residuals
	return m, stats.StatusOK
}

// polynomialAtOne is 1 - Σ c_i, an autoregressive polynomial at B = 1.
func polynomialAtOne(c []float64) float64 {
	v := 1.0
	for _, x := range c {
		v -= x
	}
	return v
}

func cloneFloats(x []float64) []float64 { return append([]float64{}, x...) }

// failedARMA is the model reported when none could be fitted.
func failedARMA(s stats.Status, o ARMAOrder) ARMAModel {
	return ARMAModel{Order: o, Mean: numeric.NaN(), Constant: numeric.NaN(), Variance: numeric.NaN(), LogLikelihood: numeric.NaN(),
		AIC: numeric.NaN(), AICc: numeric.NaN(), Status: s}
}

// ARMAAt evaluates the model with fixed coefficients (signs as ARMAModel's)
// and mean on w: the exact log-likelihood at σ̂², the residuals and the
// criteria, as FitARMA reports them at its optimum. It is how a model fitted
// elsewhere (FitAR's least squares) is scored on the same likelihood.
func ARMAAt(w []float64, o ARMAOrder, ar, ma, sar, sma []float64, mean float64) (ARMAModel, error) {
	if len(ar) != o.AR || len(ma) != o.MA || len(sar) != o.SeasonalAR || len(sma) != o.SeasonalMA {
		return ARMAModel{}, numeric.Errorf("arma: coefficient counts do not match the order %+v", o)
	}
	if s := arInputStatus(w, 2); s != stats.StatusOK {
		return failedARMA(s, o), nil
	}
	m, s := armaModelAt(w, o, ar, ma, sar, sma, mean, true)
	if s != stats.StatusOK {
		return failedARMA(s, o), nil
	}
	return m, nil
}
