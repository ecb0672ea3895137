package forecast

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

func TestDefaultMaxAROrder(t *testing.T) {
	for _, test := range []struct{ n, period, want int }{
		{1000, 0, 21},  // Schwert (1989): floor(12·10^(1/4)) = 21
		{100, 0, 12},   // Schwert: floor(12·1) = 12
		{100, 12, 13},  // raised to period + 1
		{1440, 24, 25}, // Schwert gives 23; raised to period + 1
		{100, 1, 12},   // period 1 is no season
		{10, 0, 3},     // kept to (n-1)/3
		{4, 0, 1},      // MinARLength: orders 0 and 1
		{1, 0, 0},
		{0, 7, 0},
	} {
		if got := DefaultMaxAROrder(test.n, test.period); got != test.want {
			t.Errorf("DefaultMaxAROrder(%d, %d) = %d, want %d", test.n, test.period, got, test.want)
		}
	}
}

// TestARFallsBackToQR: on the noisy sine wave of forecast_statsmodels.py
// the lagged columns are nearly dependent, so the normal equations are
// refused (their pivot is below nearSingularPivot) and the QR fit is used;
// TestARAgainstAutoReg checks that fit against statsmodels.
func TestARFallsBackToQR(t *testing.T) {
	var sine []float64
	for _, c := range readForecastCases(t) {
		if c.name == "near_sine" {
			sine, _ = c.series(t, nil)
		}
	}
	if sine == nil {
		t.Fatal("no near_sine case in forecast_statsmodels.csv")
	}
	d := newARDesign(sine)
	if _, ok := d.solveNormal(4); ok {
		t.Error("the normal equations were trusted on a nearly singular design")
	}
	if _, ok := d.solveQR(4); !ok {
		t.Error("QR refused the noisy sine wave")
	}
	if _, ok := newARDesign(sine[:24]).solveNormal(1); !ok {
		t.Error("the normal equations were refused for AR(1), whose design is well conditioned")
	}
}

// TestAREquivariance: ordinary least squares is equivariant (common
// practice): multiplying w by a gives the same coefficients, the constant
// times a and the variance times a²; adding b leaves the coefficients and
// adds b·(1 - Σφ) to the constant. Checked at magnitudes 1e±150 (where σ²
// is still a float64; beyond, the status is singular, see
// TestForecastExtremeMagnitudes) and far from zero, which the centring
// and scaling in arDesign must survive.
func TestAREquivariance(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	w := testseries.AR1(rng, 400, 1, 0.7, 1)
	base, _ := FitAR(w, AROptions{})
	if base.Status != stats.StatusOK || base.Order < 1 {
		t.Fatalf("base fit: %+v", base)
	}
	sumPhi := 0.0
	for _, v := range base.Coefficients {
		sumPhi += v
	}
	for _, test := range []struct{ a, b float64 }{{1e150, 0}, {1e-150, 0}, {1, 1e8}, {-3, 0}} {
		v := make([]float64, len(w))
		for i, x := range w {
			v[i] = test.a*x + test.b
		}
		m, err := FitAR(v, AROptions{})
		if err != nil || m.Status != stats.StatusOK || m.Order != base.Order {
			t.Fatalf("a=%g b=%g: %v %s order %d, want %d", test.a, test.b, err, m.Status, m.Order, base.Order)
		}
		for i, phi := range m.Coefficients {
			if math.Abs(phi-base.Coefficients[i]) > 1e-9 {
				t.Errorf("a=%g b=%g: φ_%d = %v, want %v", test.a, test.b, i+1, phi, base.Coefficients[i])
			}
		}
		wantC := test.a*base.Constant + test.b*(1-sumPhi)
		if math.Abs(m.Constant-wantC) > 1e-9*math.Max(math.Abs(wantC), math.Abs(test.a)) {
			t.Errorf("a=%g b=%g: constant %v, want %v", test.a, test.b, m.Constant, wantC)
		}
		if wantV := test.a * test.a * base.Variance; math.Abs(m.Variance-wantV) > 1e-9*wantV {
			t.Errorf("a=%g b=%g: variance %v, want %v", test.a, test.b, m.Variance, wantV)
		}
	}
}

// TestARRecoversSimulatedOrder: on 200 seeded AR(2) series of 500 values
// (φ = 0.5, -0.3), AIC with the default maximum chooses order 2 or more
// in most series and the mean estimates are near the truth (common
// practice: AIC does not underfit in large samples; OLS is consistent).
func TestARRecoversSimulatedOrder(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 13))
	atLeastTwo := 0
	var phi1, phi2 float64
	const series = 200
	for i := 0; i < series; i++ {
		w := make([]float64, 700)
		for t := 2; t < len(w); t++ {
			w[t] = 2 + 0.5*w[t-1] - 0.3*w[t-2] + rng.NormFloat64()
		}
		m, _ := FitAR(w[200:], AROptions{})
		if m.Order >= 2 {
			atLeastTwo++
		}
		fixed, _ := FitAROrder(w[200:], 2)
		phi1 += fixed.Coefficients[0] / series
		phi2 += fixed.Coefficients[1] / series
	}
	t.Logf("AIC chose order ≥ 2 in %d of %d AR(2) series; mean φ̂ = %.3f, %.3f", atLeastTwo, series, phi1, phi2)
	if atLeastTwo < 190 {
		t.Errorf("AIC chose order ≥ 2 in only %d of %d AR(2) series", atLeastTwo, series)
	}
	if math.Abs(phi1-0.5) > 0.02 || math.Abs(phi2+0.3) > 0.02 {
		t.Errorf("mean estimates %.3f, %.3f, want 0.5, -0.3", phi1, phi2)
	}
}
