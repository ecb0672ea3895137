package stats

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

func BenchmarkZZSTL(b *testing.B) {
	rng := rand.New(rand.NewPCG(3, 4))
	weekly := make([]float64, 1000)
	for i := range weekly {
		weekly[i] = 100 + 3*math.Sin(float64(i)*0.8976) + (rng.Float64()-0.5)*4
	}
	b.Run("stl", func(b *testing.B) {
		for b.Loop() {
			d, _ := STL(weekly, 7, STLOptions{})
			d.release()
		}
	})
	b.Run("seasonality", func(b *testing.B) {
		for b.Loop() {
			Seasonality(weekly, SeasonalityOptions{skipOCSBWhenSeasonal: true})
		}
	})
	sd, _ := Difference(weekly, 7, 1)
	b.Run("adf_sd", func(b *testing.B) {
		for b.Loop() {
			ADF(sd, ADFOptions{})
		}
	})
	b.Run("kpss_sd", func(b *testing.B) {
		for b.Loop() {
			KPSS(sd, KPSSOptions{})
		}
	})
	b.Run("stability", func(b *testing.B) {
		for b.Loop() {
			stability(weekly, StabilityOptions{Period: 7}, false)
		}
	})
	b.Run("spread", func(b *testing.B) {
		for b.Loop() {
			spreadPValue(sd, 0)
		}
	})
}

func BenchmarkZZChi(b *testing.B) {
	for b.Loop() {
		chiSquaredSurvival(9, 12.3)
	}
}

func chiSquaredSurvival(k, q float64) float64 {
	return distuv.ChiSquared{K: k}.Survival(q)
}
