package verdict

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

func TestRecipeRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	x := make([]float64, 120)
	level := 50.0
	for i := range x {
		level += rng.NormFloat64()
		x[i] = level + 10*math.Sin(2*math.Pi*float64(i)/12) + 60
	}
	for _, r := range []Recipe{
		{},
		{Differences: 1},
		{Differences: 2},
		{Period: 12, SeasonalDifferences: 1},
		{Period: 12, SeasonalDifferences: 1, Differences: 1},
		{BoxCox: true, Lambda: 0},
		{BoxCox: true, Lambda: 0.5, Period: 12, SeasonalDifferences: 1, Differences: 1},
		{BoxCox: true, Lambda: -0.3, Differences: 2},
	} {
		y, status, err := r.Apply(x)
		if err != nil || status != stats.StatusOK {
			t.Fatalf("%+v: %v %s", r, err, status)
		}
		if len(y) != len(x)-r.Lost() {
			t.Errorf("%+v: %d values, want %d", r, len(y), len(x)-r.Lost())
		}
		back, status, err := r.Restore(y)
		if err != nil || status != stats.StatusOK {
			t.Fatalf("%+v: restore %v %s", r, err, status)
		}
		for i := range x {
			if math.Abs(back[i]-x[i]) > 1e-9*math.Abs(x[i]) {
				t.Fatalf("%+v: restored[%d] = %v, want %v", r, i, back[i], x[i])
			}
		}
	}
}

// TestRecipeRestoresForecast checks forecasts whose future is known: the
// recipe is applied to the first 100 values of a series; the transformed
// values of the whole series beyond 100 are then exactly what a perfect
// forecast on the transformed scale would be, and restoring them must give
// the series' own last 20 values (plain algebra: the differences of the
// future continue from the last observed levels).
func TestRecipeRestoresForecast(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 14))
	x := make([]float64, 120)
	level := 100.0
	for i := range x {
		level += 0.5 + rng.NormFloat64()
		x[i] = level * (1 + 0.2*math.Sin(2*math.Pi*float64(i)/7))
	}
	for _, base := range []Recipe{
		{Differences: 1},
		{Period: 7, SeasonalDifferences: 1, Differences: 1},
		{BoxCox: true, Lambda: 0, Period: 7, SeasonalDifferences: 1},
		{BoxCox: true, Lambda: 0.3, Differences: 2},
	} {
		past := base
		if _, _, err := past.Apply(x[:100]); err != nil {
			t.Fatal(err)
		}
		whole := base
		yWhole, _, _ := whole.Apply(x)
		future := yWhole[len(yWhole)-20:]
		got, status, err := past.RestoreForecast(future)
		if err != nil || status != stats.StatusOK {
			t.Fatalf("%+v: %v %s", base, err, status)
		}
		for i, v := range got {
			if want := x[100+i]; math.Abs(v-want) > 1e-9*math.Abs(want) {
				t.Fatalf("%+v: forecast[%d] restored to %v, want %v", base, i, v, want)
			}
		}
	}
}

func TestRecipeBadInput(t *testing.T) {
	r := Recipe{BoxCox: true, Lambda: 0}
	if _, s, _ := r.Apply([]float64{1, 0, 2}); s != stats.StatusNonPositive {
		t.Errorf("Box-Cox of a zero: %s", s)
	}
	r = Recipe{Differences: 3}
	if _, s, _ := r.Apply([]float64{1, 2, 3}); s != stats.StatusTooShort {
		t.Errorf("3 differences of 3 values: %s", s)
	}
	r = Recipe{SeasonalDifferences: 1}
	if _, _, err := r.Apply([]float64{1, 2, 3}); err == nil {
		t.Error("seasonal difference without a period gave no error")
	}
	r = Recipe{Differences: 1}
	if _, _, err := r.RestoreForecast([]float64{1}); err == nil {
		t.Error("restoring with a recipe never applied gave no error")
	}
	r = Recipe{BoxCox: true, Lambda: 1}
	r.Apply([]float64{1, 2, 3})
	if out, s, _ := r.RestoreForecast([]float64{-5}); s != stats.StatusNonPositive || !math.IsNaN(out[0]) {
		t.Errorf("forecast outside the Box-Cox range: %v %s", out, s)
	}
}

// TestDifferencedIsRecipeOutput: the verdict's Differenced equals what its
// recipe's Apply returns on the series it judged (here no outliers are
// set aside), to rounding, so diagnose may test it for white noise without
// applying the recipe again.
func TestDifferencedIsRecipeOutput(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	checked, differenced := 0, 0
	for k := 0; k < 12; k++ {
		x := testseries.Series(rng, 300, k)
		v, err := Stationarity(x, StationarityOptions{})
		if err != nil || len(v.Outliers) > 0 {
			continue
		}
		rec := v.Recipe()
		y, s, err := rec.Apply(x)
		if err != nil || s != stats.StatusOK {
			t.Fatalf("series %d: Apply: %v %v", k, s, err)
		}
		if len(y) != len(v.Differenced) {
			t.Fatalf("series %d: %d values applied, %d differenced", k, len(y), len(v.Differenced))
		}
		for i := range y {
			// Equal up to rounding: the verdict subtracts its steps one by
			// one, Apply their sum.
			if math.Abs(y[i]-v.Differenced[i]) > 1e-9*math.Max(1, math.Abs(y[i])) {
				t.Fatalf("series %d, value %d: %v applied, %v differenced", k, i, y[i], v.Differenced[i])
			}
		}
		checked++
		if !rec.Identity() {
			differenced++
		}
	}
	if checked < 8 || differenced < 4 {
		t.Fatalf("only %d series checked, %d of them transformed", checked, differenced)
	}
}

// TestRecipeDeterministicSteps: recipes with fixed seasonal means, a
// trend or a level shift (alone, after Box-Cox, and before differencing)
// restore the series exactly, and a perfect forecast on the transformed
// scale (the transformed values of a longer stretch of the same series)
// restores to the series' own continuation: the trend continues, the
// shifted level stays, the seasonal pattern repeats at its positions. Plain
// algebra, checked to 1e-9 relative.
func TestRecipeDeterministicSteps(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 16))
	x := make([]float64, 160)
	level := 40.0
	for i := range x {
		level += 0.3 * rng.NormFloat64()
		x[i] = level + 0.05*float64(i) + 3*math.Sin(2*math.Pi*float64(i)/7) + rng.NormFloat64()
		if i >= 90 {
			x[i] += 6
		}
	}
	means := []float64{0.5, -1, 2, 0, -0.5, -1.5, 0.5}
	for _, base := range []Recipe{
		{Period: 7, SeasonalMeans: means},
		{Trend: true, TrendIntercept: 40, TrendSlope: 0.05},
		{Shift: true, ShiftIndex: 90, ShiftSize: 6},
		{Period: 7, SeasonalMeans: means, Trend: true, TrendIntercept: 1, TrendSlope: -0.01, Shift: true, ShiftIndex: 90, ShiftSize: 6},
		{BoxCox: true, Lambda: 0.5, Period: 7, SeasonalMeans: means, Differences: 1},
		{BoxCox: true, Lambda: 0, Trend: true, TrendIntercept: 3.7, TrendSlope: 0.001},
		{Period: 7, SeasonalMeans: means, Shift: true, ShiftIndex: 90, ShiftSize: 6, Differences: 2},
	} {
		r := base
		y, status, err := r.Apply(x)
		if err != nil || status != stats.StatusOK {
			t.Fatalf("%+v: %v %s", base, err, status)
		}
		back, _, err := r.Restore(y)
		if err != nil {
			t.Fatal(err)
		}
		for i := range x {
			if math.Abs(back[i]-x[i]) > 1e-9*math.Abs(x[i]) {
				t.Fatalf("%+v: restored[%d] = %v, want %v", base, i, back[i], x[i])
			}
		}
		past := base
		if _, _, err := past.Apply(x[:130]); err != nil {
			t.Fatal(err)
		}
		whole := base
		yWhole, _, _ := whole.Apply(x)
		future := yWhole[len(yWhole)-30:]
		got, status, err := past.RestoreForecast(future)
		if err != nil || status != stats.StatusOK {
			t.Fatalf("%+v: %v %s", base, err, status)
		}
		for i, v := range got {
			if want := x[130+i]; math.Abs(v-want) > 1e-9*math.Abs(want) {
				t.Fatalf("%+v: forecast %d restored to %v, want %v", base, i, v, want)
			}
		}
	}
	for _, bad := range []Recipe{
		{Period: 7, SeasonalMeans: []float64{1, 2}},
		{SeasonalMeans: []float64{1, 2}},
		{Trend: true, TrendSlope: math.NaN()},
		{Shift: true, ShiftIndex: -1, ShiftSize: 1},
		{Shift: true, ShiftIndex: 500, ShiftSize: 1},
	} {
		if _, _, err := bad.Apply(x); err == nil {
			t.Errorf("%+v: no error", bad)
		}
	}
}
