package forecast

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/plumb-sql/plumb/stats"
)

// maSeries returns n values of w_t = e_t + θ·e_{t-1}, seeded.
func maSeries(seed uint64, n int, theta float64) []float64 {
	rng := rand.New(rand.NewPCG(20261204, seed))
	w := make([]float64, n)
	prev := rng.NormFloat64()
	for i := range w {
		e := rng.NormFloat64()
		w[i] = e + theta*prev
		prev = e
	}
	return w
}

// TestTransformRoundTrip: the stationary map and its inverse undo each
// other, and every image is stationary (its partial autocorrelations, the
// backward recursion's r_k, lie inside (-1, 1)); plumb's own check.
func TestTransformRoundTrip(t *testing.T) {
	for _, x := range [][]float64{{0.3}, {-2, 1.5}, {5, -0.2, 0.7}, {0, 0, 0, 3}} {
		phi := stationaryFromFree(x)
		back, ok := freeFromStationary(phi)
		if !ok {
			t.Fatalf("%v: image %v judged not stationary", x, phi)
		}
		for i := range x {
			if math.Abs(back[i]-x[i]) > 1e-9*math.Max(1, math.Abs(x[i])) {
				t.Errorf("%v: round trip gives %v", x, back)
			}
		}
		theta := invertibleFromFree(x)
		if back, ok := freeFromInvertible(theta); !ok || math.Abs(back[0]-x[0]) > 1e-9*math.Max(1, math.Abs(x[0])) {
			t.Errorf("%v: invertible round trip gives %v (%v)", x, back, ok)
		}
	}
	// 1 - 1.2B + 0.2B² = (1 - B)(1 - 0.2B) has a unit root: not stationary.
	if _, ok := freeFromStationary([]float64{1.2, -0.2}); ok {
		t.Error("a unit root was judged stationary")
	}
}

// TestChooseARMA: the search on seeded series of plumb's own: a long MA(1)
// gets an MA(1) near its θ; white noise stops at the screen (the
// least-squares order is 0, one exact fit); the bounds hold; bad input
// gets a status, bad options an error.
func TestChooseARMA(t *testing.T) {
	w := maSeries(1, 2000, -0.6)
	c, err := ChooseARMA(w, ARMASearch{})
	if err != nil {
		t.Fatal(err)
	}
	if o := c.Model.Order; c.Model.Status != stats.StatusOK || o.AR != 0 || o.MA != 1 || math.Abs(c.Model.MA[0]+0.6) > 0.05 {
		t.Errorf("MA(1), θ = -0.6, 2,000 values: chose %+v with θ %v (%s)", o, c.Model.MA, c.Model.Status)
	}
	if c.LeastSquares.Order < 3 {
		t.Errorf("the least-squares autoregression of that MA(1) has order %d; the screen would not have searched", c.LeastSquares.Order)
	}
	if len(c.Model.Residuals) != len(w) || !(c.Model.AICc > c.Model.AIC) {
		t.Errorf("chosen model: %d residuals for %d values, AICc %v, AIC %v", len(c.Model.Residuals), len(w), c.Model.AICc, c.Model.AIC)
	}

	noise := maSeries(2, 500, 0)
	c, err = ChooseARMA(noise, ARMASearch{})
	if err != nil {
		t.Fatal(err)
	}
	if c.LeastSquares.Order == 0 && (c.Fits != 1 || c.Model.Order.AR+c.Model.Order.MA != 0) {
		t.Errorf("white noise: %d fits, chose %+v", c.Fits, c.Model.Order)
	}

	c, err = ChooseARMA(maSeries(3, 400, 0.8), ARMASearch{MaxAR: 1, MaxMA: 1, Differences: 1})
	if err != nil {
		t.Fatal(err)
	}
	if o := c.Model.Order; !c.Model.LeastSquares && (o.AR > 1 || o.MA > 1 || o.SeasonalAR+o.SeasonalMA > 0) {
		t.Errorf("bounds p, q ≤ 1: chose %+v", o)
	}

	for _, bad := range []struct {
		name string
		w    []float64
		want stats.Status
	}{
		{"a NaN", []float64{1, 2, math.NaN(), 4, 5, 6, 7, 8}, stats.StatusNonFinite},
		{"constant", []float64{3, 3, 3, 3, 3, 3, 3, 3, 3, 3}, stats.StatusConstant},
		{"three values", []float64{1, 2, 4}, stats.StatusTooShort},
	} {
		c, err := ChooseARMA(bad.w, ARMASearch{})
		if err != nil || c.Model.Status != bad.want {
			t.Errorf("%s: status %s (%v), want %s", bad.name, c.Model.Status, err, bad.want)
		}
		f, err := ForecastARMA(bad.w, Integration{}, c.Model, 3, 0.95)
		if err != nil || f.Status != bad.want || !math.IsNaN(f.Mean[0]) {
			t.Errorf("%s: forecast status %s (%v), mean %v", bad.name, f.Status, err, f.Mean)
		}
	}
	if _, err := ChooseARMA(w, ARMASearch{MaxAR: -1}); err == nil {
		t.Error("a negative bound: no error")
	}
	if _, err := FitARMA(w, ARMAOrder{SeasonalMA: 1}, nil); err == nil {
		t.Error("a seasonal term without a period: no error")
	}
	if _, err := FitARMA(w, ARMAOrder{AR: -1}, nil); err == nil {
		t.Error("a negative order: no error")
	}
	if _, err := ForecastARMA(w, Integration{}, c.Model, 0, 0.95); err == nil {
		t.Error("horizon 0: no error")
	}
}
