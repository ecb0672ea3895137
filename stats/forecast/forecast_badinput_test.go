package forecast

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
	"github.com/plumb-sql/plumb/stats/unitroot"
)

// TestForecastRejectsBadOptions: options that no series could make right
// are errors, never a status.
func TestForecastRejectsBadOptions(t *testing.T) {
	z := testseries.AR1(rand.New(rand.NewPCG(1, 1)), 100, 0, 0.5, 1)
	model, _ := FitAR(z, AROptions{})
	for _, test := range []struct {
		name     string
		horizon  int
		coverage float64
		in       Integration
	}{
		{"horizon 0", 0, 0.95, Integration{}},
		{"negative horizon", -3, 0.95, Integration{}},
		{"huge horizon", MaxHorizon + 1, 0.95, Integration{}},
		{"coverage 0", 14, 0, Integration{}},
		{"coverage 1", 14, 1, Integration{}},
		{"negative coverage", 14, -0.5, Integration{}},
		{"coverage above 1", 14, 95, Integration{}},
		{"NaN coverage", 14, math.NaN(), Integration{}},
		{"negative d", 14, 0.95, Integration{Differences: -1}},
		{"negative D", 14, 0.95, Integration{SeasonalDifferences: -1, Period: 7}},
		{"D without a period", 14, 0.95, Integration{SeasonalDifferences: 1, Period: 1}},
	} {
		if _, err := ForecastAR(z, test.in, model, test.horizon, test.coverage); err == nil {
			t.Errorf("ForecastAR, %s: no error", test.name)
		}
		opts := ForecastOptions{Integration: test.in, Horizon: test.horizon, Coverage: test.coverage}
		if _, err := ForecastSeries(z, opts); err == nil {
			t.Errorf("ForecastSeries, %s: no error", test.name)
		}
	}
	for _, opts := range []AROptions{{MaxOrder: -1}, {Rule: unitroot.LagDropInsignificant}, {Rule: unitroot.LagGiven}, {Rule: "aicc"}} {
		if _, err := FitAR(z, opts); err == nil {
			t.Errorf("FitAR(%+v): no error", opts)
		}
	}
	if _, err := FitAROrder(z, -1); err == nil {
		t.Error("FitAROrder(-1): no error")
	}
	wrong := model
	wrong.Coefficients = nil
	wrong.Order = 2
	if _, err := ForecastAR(z, Integration{}, wrong, 5, 0.9); err == nil {
		t.Error("a model whose order and coefficients disagree gave no error")
	}
}

// TestForecastBadSeries: series no model can be fitted to get a status
// and NaN forecasts of the requested horizon, never a panic.
func TestForecastBadSeries(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 2))
	line := make([]float64, 50)
	weekly := make([]float64, 60)
	for i := range line {
		line[i] = 3 + 0.5*float64(i)
	}
	for i := range weekly {
		weekly[i] = []float64{5, 7, 6, 9, 4, 2, 1}[i%7]
	}
	withNaN := testseries.AR1(rng, 80, 0, 0.5, 1)
	withNaN[40] = math.NaN()
	withInf := testseries.AR1(rng, 80, 0, 0.5, 1)
	withInf[3] = math.Inf(-1)
	for _, test := range []struct {
		name string
		z    []float64
		in   Integration
		want stats.Status
	}{
		{"empty", nil, Integration{}, stats.StatusTooShort},
		{"one value", []float64{4}, Integration{}, stats.StatusTooShort},
		{"three values", []float64{4, 5, 3}, Integration{}, stats.StatusTooShort},
		{"shorter than a season after differencing", testseries.AR1(rng, 10, 0, 0.5, 1), Integration{SeasonalDifferences: 1, Period: 7}, stats.StatusTooShort},
		{"constant", []float64{2, 2, 2, 2, 2, 2, 2, 2}, Integration{}, stats.StatusConstant},
		{"constant after d = 1 (a straight line)", line, Integration{Differences: 1}, stats.StatusConstant},
		{"a fixed weekly pattern after D = 1", weekly, Integration{SeasonalDifferences: 1, Period: 7}, stats.StatusConstant},
		{"a fixed weekly pattern without differencing", weekly, Integration{}, stats.StatusSingular},
		{"NaN", withNaN, Integration{Differences: 1}, stats.StatusNonFinite},
		{"-Inf", withInf, Integration{}, stats.StatusNonFinite},
	} {
		r, err := ForecastSeries(test.z, ForecastOptions{Integration: test.in, Horizon: 7, Coverage: 0.8})
		if err != nil {
			t.Errorf("%s: %v", test.name, err)
			continue
		}
		if r.Status != test.want || r.Model.Status != test.want {
			t.Errorf("%s: status %s (model %s), want %s", test.name, r.Status, r.Model.Status, test.want)
		}
		if len(r.Mean) != 7 || len(r.Lower) != 7 || len(r.Upper) != 7 || len(r.StdErr) != 7 {
			t.Errorf("%s: %d forecasts, want 7", test.name, len(r.Mean))
		}
		for i := range r.Mean {
			if !math.IsNaN(r.Mean[i]) || !math.IsNaN(r.Lower[i]) || !math.IsNaN(r.Upper[i]) {
				t.Errorf("%s: step %d = %v [%v, %v], want NaN", test.name, i+1, r.Mean[i], r.Lower[i], r.Upper[i])
				break
			}
		}
		units, err := ToOriginalUnits(r.Forecast, BackTransform{BoxCox: true, Lambda: 0.5, MeanPoint: true})
		if err != nil || units.Status != test.want || !math.IsNaN(units.Mean[0]) || units.OutOfRange != 0 {
			t.Errorf("%s: in original units %+v, %v", test.name, units, err)
		}
	}
	// The shortest series that fits: MinARLength values of w.
	r, _ := ForecastSeries([]float64{1, 3, 2, 5, 4}, ForecastOptions{Integration: Integration{Differences: 1}, Horizon: 3, Coverage: 0.9})
	if r.Status != stats.StatusOK || r.Model.MaxOrder != 1 {
		t.Errorf("five values with d = 1: status %s, maximum order %d", r.Status, r.Model.MaxOrder)
	}
}

// TestForecastExtremeMagnitudes: series of extreme magnitude forecast
// with the same relative values as the series scaled to ordinary size, or,
// when σ² itself lies beyond float64's range (scale 1e±300), get status
// singular: never a zero-width or infinite interval.
func TestForecastExtremeMagnitudes(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 4))
	base := integrate(testseries.AR1(rng, 300, 0.1, 0.4, 1), []float64{50})
	ref, _ := ForecastSeries(base, ForecastOptions{Integration: Integration{Differences: 1}, Horizon: 10, Coverage: 0.95})
	for _, scale := range []float64{1e150, 1e-150, 1e300, 1e-300} {
		z := make([]float64, len(base))
		for i, v := range base {
			z[i] = v * scale
		}
		r, _ := ForecastSeries(z, ForecastOptions{Integration: Integration{Differences: 1}, Horizon: 10, Coverage: 0.95})
		if math.Abs(math.Log10(scale)) > 200 {
			if r.Status != stats.StatusSingular || !math.IsNaN(r.Upper[0]) {
				t.Errorf("scale %g: status %s, upper bound %v", scale, r.Status, r.Upper[0])
			}
			continue
		}
		if r.Status != stats.StatusOK {
			t.Fatalf("scale %g: status %s", scale, r.Status)
		}
		for h := range r.Mean {
			for _, pair := range [][2]float64{{r.Mean[h], ref.Mean[h]}, {r.Upper[h], ref.Upper[h]}, {r.Lower[h], ref.Lower[h]}} {
				if math.Abs(pair[0]/scale-pair[1]) > 1e-9*math.Abs(pair[1]) {
					t.Errorf("scale %g step %d: %v, want %v", scale, h+1, pair[0]/scale, pair[1])
				}
			}
		}
	}
}
