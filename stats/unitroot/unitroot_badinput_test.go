package unitroot

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/plumb-sql/plumb/stats"
)

// allUnitRootTests runs every unit-root and stationarity test on x with
// default options.
func allUnitRootTests(x []float64) []UnitRootResult {
	adf, _ := ADF(x, ADFOptions{})
	adfTrend, _ := ADF(x, ADFOptions{Deterministic: DeterministicLevelAndSlope, LagRule: LagDropInsignificant})
	kpss, _ := KPSS(x, KPSSOptions{})
	kpssTrend, _ := KPSS(x, KPSSOptions{Deterministic: DeterministicLevelAndSlope})
	pp, _ := PhillipsPerron(x, PPOptions{})
	dfgls, _ := DFGLS(x, DFGLSOptions{Deterministic: DeterministicLevelAndSlope})
	return []UnitRootResult{adf, adfTrend, kpss, kpssTrend, pp.UnitRootResult, dfgls}
}

// alternatingHuge returns n values alternating between 1e308 and -1e308.
func alternatingHuge(n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = 1e308 * float64(1-2*(i%2))
	}
	return x
}

func TestUnitRootBadInput(t *testing.T) {
	ramp := func(n int) []float64 {
		x := make([]float64, n)
		for i := range x {
			x[i] = float64(i%3) + 0.1*float64(i)
		}
		return x
	}
	rng := rand.New(rand.NewPCG(9, 9))
	huge := make([]float64, 100)
	for i := range huge {
		huge[i] = 1e300 * (0.5 + 0.1*rng.NormFloat64() + 0.002*float64(i))
	}
	for _, test := range []struct {
		name string
		x    []float64
		want stats.Status // "" means any status but ok is fine as long as nothing panics
	}{
		{"empty", nil, stats.StatusTooShort},
		{"one", []float64{1}, stats.StatusTooShort},
		{"three", []float64{1, 5, 2}, stats.StatusTooShort},
		{"constant", []float64{4, 4, 4, 4, 4, 4, 4, 4, 4, 4, 4, 4, 4, 4, 4, 4, 4, 4, 4, 4}, stats.StatusConstant},
		{"NaN", append(ramp(30), math.NaN()), stats.StatusNonFinite},
		{"+Inf", append(ramp(30), math.Inf(1)), stats.StatusNonFinite},
		{"-Inf", append([]float64{math.Inf(-1)}, ramp(30)...), stats.StatusNonFinite},
		// ±1e308 alternating: the differences are ±Inf before scaling, and
		// after it the ADF regression fits exactly.
		{"alternating ±1e308", alternatingHuge(60), ""},
	} {
		for _, r := range allUnitRootTests(test.x) {
			if test.want == "" {
				if r.Status == stats.StatusOK && (math.IsNaN(r.Statistic) || math.IsInf(r.Statistic, 0) || !(r.PValue >= 0 && r.PValue <= 1)) {
					t.Errorf("%s: %s %s status ok with statistic %v, p-value %v", test.name, r.Method, r.Deterministic, r.Statistic, r.PValue)
				}
				if r.Status != stats.StatusOK && !math.IsNaN(r.Statistic) {
					t.Errorf("%s: %s status %s but statistic %v", test.name, r.Method, r.Status, r.Statistic)
				}
				continue
			}
			if r.Status != test.want {
				t.Errorf("%s: %s %s status %s, want %s", test.name, r.Method, r.Deterministic, r.Status, test.want)
			}
			if r.Status != stats.StatusOK && !math.IsNaN(r.Statistic) {
				t.Errorf("%s: %s status %s but statistic %v", test.name, r.Method, r.Status, r.Statistic)
			}
		}
	}
	// Magnitudes near 1e300: scaling keeps every sum finite, and the
	// statistics equal those of the same series scaled down (every test is
	// scale invariant).
	small := make([]float64, len(huge))
	for i, v := range huge {
		small[i] = v / 1e300
	}
	a, b := allUnitRootTests(huge), allUnitRootTests(small)
	for i := range a {
		if a[i].Status != stats.StatusOK || math.Abs(a[i].Statistic-b[i].Statistic) > 1e-9*math.Abs(b[i].Statistic) {
			t.Errorf("near 1e300: %s %s %v (%s), scaled %v", a[i].Method, a[i].Deterministic, a[i].Statistic, a[i].Status, b[i].Statistic)
		}
	}
	// A lag request larger than the series allows.
	big := 40
	if r, _ := ADF(ramp(30), ADFOptions{LagRule: LagGiven, MaxLag: &big}); r.Status != stats.StatusTooShort {
		t.Errorf("ADF with 40 lags on 30 values: %s", r.Status)
	}
	if r, _ := KPSS(ramp(30), KPSSOptions{Bandwidth: &big}); r.Status != stats.StatusTooShort {
		t.Errorf("KPSS with bandwidth 40 on 30 values: %s", r.Status)
	}
	// Unknown options are errors, not statuses.
	if _, err := ADF(ramp(30), ADFOptions{LagRule: "aicc"}); err == nil {
		t.Error("unknown lag rule gave no error")
	}
	if _, err := KPSS(ramp(30), KPSSOptions{Deterministic: DeterministicNone}); err == nil {
		t.Error("KPSS without deterministic terms gave no error")
	}
	neg := -1
	if _, err := ADF(ramp(30), ADFOptions{MaxLag: &neg}); err == nil {
		t.Error("negative maximum lag gave no error")
	}
}

// FuzzUnitRoot feeds arbitrary series to every test: none may panic, and an
// ok status must come with a finite statistic and a p-value in [0, 1].
func FuzzUnitRoot(f *testing.F) {
	f.Add([]byte{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16})
	f.Add([]byte{0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1})
	f.Add([]byte{255, 0, 255, 0, 255, 0, 255, 0, 255, 0, 255, 0, 255, 0, 255, 0, 255, 0, 255, 0, 7, 7, 7})
	f.Fuzz(func(t *testing.T, data []byte) {
		x := make([]float64, len(data)/2)
		for i := range x {
			x[i] = float64(int16(uint16(data[2*i])<<8|uint16(data[2*i+1]))) * math.Pow(10, float64(data[2*i]%7))
		}
		for _, r := range allUnitRootTests(x) {
			if r.Status == stats.StatusOK && (math.IsNaN(r.Statistic) || math.IsInf(r.Statistic, 0) || !(r.PValue >= 0 && r.PValue <= 1)) {
				t.Fatalf("%s on %v: ok with statistic %v, p %v", r.Method, x, r.Statistic, r.PValue)
			}
		}
	})
}
