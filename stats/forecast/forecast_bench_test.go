package forecast

import (
	"math/rand/v2"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// BenchmarkForecast: the order search (AIC up to the default maximum,
// 21 at T = 1,000, 22 with period 7), the refit and a 14-step forecast
// with its 95% interval, on one seeded series of 1,000 values per case.
// It excludes the verdict and the recipe, which the lead's forecast(...)
// adds.
func BenchmarkForecast(b *testing.B) {
	rng := rand.New(rand.NewPCG(8, 8))
	cases := []struct {
		name string
		z    []float64
		in   Integration
	}{
		{"d1", integrate(testseries.AR1(rng, 1000, 0.1, 0.5, 1), []float64{100}), Integration{Differences: 1}},
		{"D7", integrate(testseries.AR1(rng, 1000, 0, 0.5, 1), []float64{5, 7, 6, 9, 4, 2, 1}), Integration{SeasonalDifferences: 1, Period: 7}},
		{"d1D7", integrate(integrate(testseries.AR1(rng, 1000, 0, 0.3, 1), []float64{0}), []float64{5, 7, 6, 9, 4, 2, 1}), Integration{Differences: 1, SeasonalDifferences: 1, Period: 7}},
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			opts := ForecastOptions{Integration: c.in, Horizon: 14, Coverage: 0.95}
			b.ReportAllocs()
			for b.Loop() {
				r, _ := ForecastSeries(c.z, opts)
				if r.Status != stats.StatusOK {
					b.Fatal(r.Status)
				}
			}
		})
	}
}
