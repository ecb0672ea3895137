package unitroot

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// mackinnonTau holds MacKinnon's approximations for the Dickey-Fuller τ
// statistic with one variable (N = 1) under one set of deterministic terms.
//
// P-values follow MacKinnon (1994), "Approximate asymptotic distribution
// functions for unit-root and cointegration tests", J. Business & Economic
// Statistics 12(2): p = Φ(γ0 + γ1·τ + γ2·τ² [+ γ3·τ³]), with the quadratic
// ("small p") fit for τ ≤ τ* and the cubic ("large p") fit above it; p = 0
// below τmin and p = 1 above τmax, where the fits stop being reliable.
//
// Critical values follow MacKinnon (2010), "Critical values for
// cointegration tests", Queen's Economics Department WP 1227, Table 2:
// c(T) = β∞ + β1/T + β2/T² + β3/T³ at 1, 5 and 10%.
//
// The coefficients are the papers' values as python3-statsmodels 0.13.5
// tabulates them (statsmodels.tsa.adfvalues, scaling already applied); the
// asymptotic critical values are the rows with observations "inf" in
// testdata/reference/mackinnon_crit_statsmodels.csv, and the tests check
// p-values and critical values against statsmodels on a grid.
type mackinnonTau struct {
	smallP         [3]float64
	largeP         [4]float64
	star, min, max float64
	critical       [3][4]float64 // rows 1, 5, 10%; columns β∞, β1, β2, β3
}

var mackinnon = map[Deterministic]mackinnonTau{
	DeterministicNone: {
		smallP: [3]float64{0.6344, 1.2378, 0.032496},
		largeP: [4]float64{0.4797, 0.93557, -0.06999, 0.033066},
		star:   -1.04, min: -19.04, max: math.Inf(1),
		critical: [3][4]float64{
			{-2.56574, -2.2358, -3.627, 0},
			{-1.94100, -0.2686, -3.365, 31.223},
			{-1.61682, 0.2656, -2.714, 25.364},
		},
	},
	DeterministicLevel: {
		smallP: [3]float64{2.1659, 1.4412, 0.038269},
		largeP: [4]float64{1.7339, 0.93202, -0.12745, -0.010368},
		star:   -1.61, min: -18.83, max: 2.74,
		critical: [3][4]float64{
			{-3.43035, -6.5393, -16.786, -79.433},
			{-2.86154, -2.8903, -4.234, -40.040},
			{-2.56677, -1.5384, -2.809, 0},
		},
	},
	DeterministicLevelAndSlope: {
		smallP: [3]float64{3.2512, 1.6047, 0.049588},
		largeP: [4]float64{2.5261, 0.61654, -0.37956, -0.060285},
		star:   -2.89, min: -16.18, max: 0.7,
		critical: [3][4]float64{
			{-3.95877, -9.0531, -28.428, -134.155},
			{-3.41049, -4.3904, -9.036, -45.374},
			{-3.12705, -2.5856, -3.925, -22.380},
		},
	},
}

// MacKinnonP returns the MacKinnon (1994) approximate asymptotic p-value of
// a Dickey-Fuller τ statistic (ADF, Phillips-Perron Z(τ)) under the given
// deterministic terms.
func MacKinnonP(tau float64, d Deterministic) float64 {
	d, err := d.normalize()
	if err != nil || math.IsNaN(tau) {
		return math.NaN()
	}
	m := mackinnon[d]
	switch {
	case tau > m.max:
		return 1
	case tau < m.min:
		return 0
	}
	var z float64
	if tau <= m.star {
		z = m.smallP[0] + tau*(m.smallP[1]+tau*m.smallP[2])
	} else {
		z = m.largeP[0] + tau*(m.largeP[1]+tau*(m.largeP[2]+tau*m.largeP[3]))
	}
	return distuv.UnitNormal.CDF(z)
}

// mackinnonPValue is MacKinnonP with the honest treatment of the fits'
// ends: beyond τmin the p-value is the small-p fit's value at τmin with
// PValueAtMost (MacKinnonP returns 0 there, as statsmodels does, though the
// truth is a small positive number: about 2e-30 with a constant), and
// beyond τmax it is the large-p fit's value at τmax with PValueAtLeast
// (MacKinnonP returns 1). So no table end reaches a false-discovery rule
// unmarked, and no p-value is exactly 0.
func mackinnonPValue(tau float64, d Deterministic) (float64, PValueBound) {
	d, err := d.normalize()
	if err != nil || math.IsNaN(tau) {
		return math.NaN(), PValueEstimate
	}
	m := mackinnon[d]
	switch {
	case tau < m.min:
		return MacKinnonP(m.min, d), PValueAtMost
	case tau > m.max:
		return MacKinnonP(m.max, d), PValueAtLeast
	}
	return MacKinnonP(tau, d), PValueEstimate
}

// MacKinnonCritical returns the MacKinnon (2010) 1, 5 and 10% critical
// values of the Dickey-Fuller τ statistic for a regression on the given
// number of observations; observations ≤ 0 gives the asymptotic values.
func MacKinnonCritical(d Deterministic, observations int) [3]float64 {
	var out [3]float64
	d, err := d.normalize()
	if err != nil {
		return [3]float64{math.NaN(), math.NaN(), math.NaN()}
	}
	m := mackinnon[d]
	inv := 0.0
	if observations > 0 {
		inv = 1 / float64(observations)
	}
	for i, b := range m.critical {
		out[i] = b[0] + inv*(b[1]+inv*(b[2]+inv*b[3]))
	}
	return out
}
