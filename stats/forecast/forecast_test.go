package forecast

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/plumb-sql/plumb/stats"
)

func TestPsiWeights(t *testing.T) {
	for _, test := range []struct {
		name string
		phi  []float64
		in   Integration
		want []float64
	}{
		// common practice: a random walk's ψ are all 1 (h-step variance h·σ²)
		{"random walk", nil, Integration{Differences: 1}, []float64{1, 1, 1, 1, 1}},
		// common practice: an AR(1)'s ψ_j = φ^j
		{"AR(1)", []float64{0.5}, Integration{}, []float64{1, 0.5, 0.25, 0.125, 0.0625}},
		// common practice: (1-B)^2 gives ψ_j = j + 1
		{"d = 2", nil, Integration{Differences: 2}, []float64{1, 2, 3, 4, 5, 6}},
		// plain algebra: 1/(1-B^4) = 1 + B^4 + B^8 + ...
		{"seasonal", nil, Integration{SeasonalDifferences: 1, Period: 4}, []float64{1, 0, 0, 0, 1, 0, 0, 0, 1}},
		// plain algebra: 1/((1-B)(1-B^3)): ψ_j = floor(j/3) + 1
		{"both", nil, Integration{Differences: 1, SeasonalDifferences: 1, Period: 3}, []float64{1, 1, 1, 2, 2, 2, 3, 3}},
		// plain algebra: 1/((1-0.5B)(1-B)) = Σ_j (2 - 0.5^j) B^j
		{"ARIMA(1,1,0)", []float64{0.5}, Integration{Differences: 1}, []float64{1, 1.5, 1.75, 1.875}},
		// D = 0 ignores the period
		{"period without D", nil, Integration{Period: 12}, []float64{1, 0, 0}},
	} {
		got := PsiWeights(test.phi, test.in, len(test.want))
		for j := range test.want {
			if math.Abs(got[j]-test.want[j]) > 1e-15 {
				t.Errorf("%s: ψ = %v, want %v", test.name, got, test.want)
				break
			}
		}
	}
}

// TestForecastARMatchesUndifference: the point forecasts, which ForecastAR
// builds from the combined polynomial δ(B), equal the AR forecasts of w
// restored by Undifference pass by pass (seasonal first applied, so undone
// last), on a seeded series with d = 1, D = 1, s = 7.
func TestForecastARMatchesUndifference(t *testing.T) {
	rng := rand.New(rand.NewPCG(17, 19))
	z := make([]float64, 200)
	for i := range z {
		z[i] = 0.3*float64(i) + 5*math.Sin(float64(i)) + rng.NormFloat64()
	}
	in := Integration{Differences: 1, SeasonalDifferences: 1, Period: 7}
	w := in.Apply(z)
	m, _ := FitAROrder(w, 3)
	f, err := ForecastAR(z, in, m, 20, 0.9)
	if err != nil || f.Status != stats.StatusOK {
		t.Fatal(err, f.Status)
	}
	wf := append([]float64(nil), w...)
	for h := 0; h < 20; h++ {
		v := m.Constant
		for i, phi := range m.Coefficients {
			v += phi * wf[len(wf)-1-i]
		}
		wf = append(wf, v)
	}
	seasonal, _ := stats.Difference(z, 7, 1)
	level1, _ := stats.Undifference(wf[len(w):], seasonal, 1)
	want, _ := stats.Undifference(level1, z, 7)
	for h := range want {
		if math.Abs(f.Mean[h]-want[h]) > 1e-9*math.Abs(want[h]) {
			t.Errorf("step %d: %v, restored %v", h+1, f.Mean[h], want[h])
		}
	}
}

// TestToOriginalUnitsPath: a deterministic path moves the forecast and both
// bounds by the same amount before Box-Cox is inverted, and leaves StdErr
// alone (plain algebra); with λ = 0 the result is exp of the shifted values.
func TestToOriginalUnitsPath(t *testing.T) {
	f := Forecast{
		Mean: []float64{1, 2}, Lower: []float64{0.5, 1}, Upper: []float64{1.5, 3},
		StdErr: []float64{0.25, 0.5}, Coverage: 0.95, Status: stats.StatusOK,
	}
	path := []float64{10, -1}
	plain, err := ToOriginalUnits(f, BackTransform{Path: path})
	if err != nil {
		t.Fatal(err)
	}
	logs, _ := ToOriginalUnits(f, BackTransform{Path: path, BoxCox: true})
	for i := range path {
		for _, got := range []struct{ got, want float64 }{
			{plain.Mean[i], f.Mean[i] + path[i]},
			{plain.Lower[i], f.Lower[i] + path[i]},
			{plain.Upper[i], f.Upper[i] + path[i]},
			{plain.StdErr[i], f.StdErr[i]},
			{logs.Mean[i], math.Exp(f.Mean[i] + path[i])},
			{logs.Lower[i], math.Exp(f.Lower[i] + path[i])},
			{logs.Upper[i], math.Exp(f.Upper[i] + path[i])},
		} {
			if math.Abs(got.got-got.want) > 1e-12*math.Abs(got.want) {
				t.Errorf("step %d: %v, want %v", i+1, got.got, got.want)
			}
		}
	}
	if _, err := ToOriginalUnits(f, BackTransform{Path: []float64{1}}); err == nil {
		t.Error("a path of the wrong length gave no error")
	}
}

// TestToOriginalUnitsOutOfRange: a bound whose λy + 1 ≤ 0 goes to the edge
// of the inverse's domain and is counted (plain algebra: for λ = 0.5,
// y = -3 gives λy + 1 = -0.5; for λ = -0.5, y = 3 does).
func TestToOriginalUnitsOutOfRange(t *testing.T) {
	f := Forecast{Mean: []float64{0}, Lower: []float64{-3}, Upper: []float64{3}, StdErr: []float64{1.5}, Status: stats.StatusOK}
	pos, _ := ToOriginalUnits(f, BackTransform{BoxCox: true, Lambda: 0.5})
	if pos.Lower[0] != 0 || pos.OutOfRange != 1 || pos.Upper[0] != 6.25 || pos.Mean[0] != 1 {
		t.Errorf("λ = 0.5: %+v", pos)
	}
	neg, _ := ToOriginalUnits(f, BackTransform{BoxCox: true, Lambda: -0.5})
	if !math.IsInf(neg.Upper[0], 1) || neg.OutOfRange != 1 || neg.Lower[0] != 1/6.25 || neg.Mean[0] != 1 {
		t.Errorf("λ = -0.5: %+v", neg)
	}
	if _, err := ToOriginalUnits(f, BackTransform{BoxCox: true, Lambda: math.NaN()}); err == nil {
		t.Error("λ = NaN gave no error")
	}
}

// TestBoxCoxMeanAgainstQuadrature: E[g⁻¹(Y)], Y ~ N(μ, σ²), by Simpson's
// rule over μ ± 12σ (4,000 intervals). λ = 0 is exact (lognormal mean);
// λ = 1/2 is exact too, g⁻¹ being quadratic: E = (λμ+1)² + λ²σ² (plain
// algebra). For λ = 0.25, 1.5 and -0.3 the second-order adjustment's
// error must be the next term of the expansion, g4·σ⁴/8 with g4 the fourth
// derivative of g⁻¹ at μ (the fourth normal moment is 3σ⁴, and 3/4! = 1/8),
// to within 50%: g4 = (1-λ)(1-2λ)(1-3λ)·(λμ+1)^(1/λ-4) (plain algebra).
// And the adjustment must come at least ten times closer than the median.
func TestBoxCoxMeanAgainstQuadrature(t *testing.T) {
	integral := func(mu, sd, lambda float64) float64 {
		const n = 4000
		a, b := mu-12*sd, mu+12*sd
		step := (b - a) / n
		s := 0.0
		for i := 0; i <= n; i++ {
			y := a + float64(i)*step
			g, _ := inverseBoxCoxExtended(y, lambda)
			wgt := 2.0
			if i == 0 || i == n {
				wgt = 1
			} else if i%2 == 1 {
				wgt = 4
			}
			s += wgt * g * math.Exp(-0.5*((y-mu)/sd)*((y-mu)/sd))
		}
		return s * step / 3 / (sd * math.Sqrt(2*math.Pi))
	}
	for _, test := range []struct {
		lambda, mu, sd float64
		exact          bool
	}{
		{0, 3, 0.4, true},
		{0.5, 10, 0.8, true},
		{0.25, 4, 0.15, false},
		{1.5, 2, 0.2, false},
		{-0.3, 1, 0.1, false},
	} {
		want := integral(test.mu, test.sd, test.lambda)
		got := boxCoxMean(test.mu, test.sd, test.lambda)
		median, _ := inverseBoxCoxExtended(test.mu, test.lambda)
		if test.exact {
			if math.Abs(got-want) > 1e-10*want {
				t.Errorf("λ = %v: mean %v, integral %v", test.lambda, got, want)
			}
			continue
		}
		l := test.lambda
		base := l*test.mu + 1
		next := (1 - l) * (1 - 2*l) * (1 - 3*l) * math.Pow(base, 1/l-4) * math.Pow(test.sd, 4) / 8
		if math.Abs(got-want) > 1.5*math.Abs(next) || math.Abs(got-want)*10 > math.Abs(median-want) {
			t.Errorf("λ = %v: adjusted %v, median %v, integral %v", test.lambda, got, median, want)
		}
	}
}
