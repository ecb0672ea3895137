package demodata

import (
	"fmt"
	"math"
	"math/rand/v2"
	"time"
)

// Series is one generated group.
type Series struct {
	Key    []string // shop and product line, or container id
	Truth  Truth
	Values []float64
}

// Dataset is one generated table: its groups share a time axis.
type Dataset struct {
	Name   string    // table name: "shops" or "containers"
	KeyCol []string  // group columns
	AtCol  string    // time column
	ValCol string    // value column
	Start  time.Time // first time point
	Step   time.Duration
	Period int // the seasonal period planted in seasonal groups
	Series []Series
}

// Generate builds both demo datasets from one seed. The same seed and sizes
// always give the same data.
func Generate(seed uint64, sizes Sizes) ([]Dataset, error) {
	if sizes.Shops < 0 || sizes.Shops > len(ShopNames)*100 || sizes.Products < 0 || sizes.Products > len(ProductLines) {
		return nil, fmt.Errorf("demo sizes: shops must be 0 to %d and products 0 to %d", len(ShopNames)*100, len(ProductLines))
	}
	if sizes.Days < 0 || sizes.Hours < 0 || sizes.Containers < 0 {
		return nil, fmt.Errorf("demo sizes must not be negative")
	}
	rng := rand.New(rand.NewPCG(seed, 0x706c756d62)) // second word: "plumb"
	shops := Dataset{
		Name: "shops", KeyCol: []string{"shop", "product"}, AtCol: "day", ValCol: "units",
		Start: time.Date(2025, 1, 1, 0, 0, 0, 0, time.UTC), Step: 24 * time.Hour, Period: 7,
	}
	var shopKeys [][]string
	for s := 0; s < sizes.Shops; s++ {
		name := ShopNames[s%len(ShopNames)]
		if s >= len(ShopNames) {
			name = fmt.Sprintf("%s %d", name, s/len(ShopNames)+1)
		}
		for p := 0; p < sizes.Products; p++ {
			shopKeys = append(shopKeys, []string{name, ProductLines[p]})
		}
	}
	kinds := deal(rng, len(shopKeys))
	for i, key := range shopKeys {
		truth := Truth{Kind: kinds[i], Level: 150 + 450*rng.Float64(), Phi: 0.2 + 0.4*rng.Float64()}
		values := shopUnits(rng, truth, sizes.Days, shops.Period)
		if truth.Kind == Seasonal {
			truth.Period = shops.Period
		}
		if truth.Kind == RandomWalk {
			truth.Phi = 0
		}
		shops.Series = append(shops.Series, Series{Key: key, Truth: truth, Values: values})
	}

	containers := Dataset{
		Name: "containers", KeyCol: []string{"container"}, AtCol: "hour", ValCol: "temperature",
		Start: time.Date(2026, 3, 1, 0, 0, 0, 0, time.UTC), Step: time.Hour, Period: 24,
	}
	kinds = deal(rng, sizes.Containers)
	for i := 0; i < sizes.Containers; i++ {
		truth := Truth{Kind: kinds[i], Level: -20 + 4*rng.Float64(), Phi: 0.3 + 0.4*rng.Float64()}
		values := containerTemperatures(rng, truth, sizes.Hours, containers.Period)
		if truth.Kind == Seasonal {
			truth.Period = containers.Period
		}
		if truth.Kind == RandomWalk {
			truth.Phi = 0
		}
		containers.Series = append(containers.Series, Series{
			Key: []string{fmt.Sprintf("RC-%03d", i+1)}, Truth: truth, Values: values,
		})
	}
	return []Dataset{shops, containers}, nil
}

// deal gives n groups their kinds: each kind equally often (to within one),
// in a shuffled order.
func deal(rng *rand.Rand, n int) []Kind {
	out := make([]Kind, n)
	for i := range out {
		out[i] = Kinds[i%len(Kinds)]
	}
	rng.Shuffle(n, func(i, j int) { out[i], out[j] = out[j], out[i] })
	return out
}

// ar1 returns n values of a zero-mean AR(1) with coefficient phi whose
// marginal standard deviation is sd, started from its stationary distribution.
func ar1(rng *rand.Rand, n int, phi, sd float64) []float64 {
	out := make([]float64, n)
	innov := sd * math.Sqrt(1-phi*phi)
	prev := sd * rng.NormFloat64()
	for i := range out {
		prev = phi*prev + innov*rng.NormFloat64()
		out[i] = prev
	}
	return out
}

// shopUnits plants a behaviour in daily unit sales around level. Units are
// whole and never negative.
func shopUnits(rng *rand.Rand, t Truth, n, period int) []float64 {
	noise := ar1(rng, n, t.Phi, 0.08*t.Level)
	out := make([]float64, n)
	switch t.Kind {
	case Stationary:
		for i := range out {
			out[i] = t.Level + noise[i]
		}
	case Trend:
		slope := t.Level * (0.4 + 0.6*rng.Float64()) / float64(max(n, 1)) // grows 40-100% over the span
		for i := range out {
			out[i] = t.Level + slope*float64(i) + noise[i]
		}
	case RandomWalk:
		// A random walk in the logarithm keeps units positive; steps of 2%.
		logLevel := math.Log(t.Level)
		for i := range out {
			logLevel += 0.02 * rng.NormFloat64()
			out[i] = math.Exp(logLevel)
		}
	case Seasonal:
		// A weekly shape: quiet early week, busy Friday and Saturday.
		shape := []float64{-0.25, -0.2, -0.1, 0.0, 0.2, 0.3, 0.05}
		for i := range out {
			out[i] = t.Level*(1+shape[i%len(shape)]*float64(period)/7) + noise[i]
		}
	case GrowingSpread:
		for i := range out {
			grow := 1 + 3*float64(i)/float64(max(n-1, 1))
			out[i] = t.Level + grow*noise[i]
		}
	case LevelShift:
		at := n/3 + rng.IntN(max(n/3, 1))
		jump := t.Level * (0.3 + 0.2*rng.Float64())
		for i := range out {
			out[i] = t.Level + noise[i]
			if i >= at {
				out[i] += jump
			}
		}
	}
	for i, v := range out {
		out[i] = math.Max(0, math.Round(v))
	}
	return out
}

// containerTemperatures plants a behaviour in hourly temperatures (°C)
// around a set point, recorded to a hundredth of a degree.
func containerTemperatures(rng *rand.Rand, t Truth, n, period int) []float64 {
	noise := ar1(rng, n, t.Phi, 0.4)
	out := make([]float64, n)
	switch t.Kind {
	case Stationary:
		for i := range out {
			out[i] = t.Level + noise[i]
		}
	case Trend:
		slope := (1.5 + 1.5*rng.Float64()) / float64(max(n, 1)) // warms 1.5-3 °C over the voyage
		for i := range out {
			out[i] = t.Level + slope*float64(i) + noise[i]
		}
	case RandomWalk:
		level := t.Level
		for i := range out {
			level += 0.12 * rng.NormFloat64()
			out[i] = level
		}
	case Seasonal:
		// Daily cycle: warmest mid-afternoon as the sun heats the box.
		amp := 1.0 + rng.Float64()
		for i := range out {
			out[i] = t.Level + amp*math.Sin(2*math.Pi*float64(i%period-9)/float64(period)) + noise[i]
		}
	case GrowingSpread:
		for i := range out {
			grow := 1 + 3*float64(i)/float64(max(n-1, 1))
			out[i] = t.Level + grow*noise[i]
		}
	case LevelShift:
		at := n/3 + rng.IntN(max(n/3, 1))
		jump := 1.5 + rng.Float64()
		for i := range out {
			out[i] = t.Level + noise[i]
			if i >= at {
				out[i] += jump
			}
		}
	}
	for i, v := range out {
		out[i] = math.Round(v*100) / 100
	}
	return out
}
