package testseries

import (
	"math"
	"math/rand/v2"
)

// Planted patterns for the verdict's tests: invented data, each kind drawn
// from its own seeded stream so that adding a kind does not move the others.
// Parameters are chosen to be plainly of their kind (a shift of 4 marginal
// standard deviations, a trend rising 3 to 6 of them over the series), not
// tuned to what the verdict finds.

// Pattern names one planted behaviour.
type Pattern string

const (
	PatStationary   Pattern = "stationary"
	PatLevelShift   Pattern = "level_shift"
	PatTrend        Pattern = "trend"
	PatRandomWalk   Pattern = "random_walk"
	PatLogWalk      Pattern = "log_random_walk"
	PatGrowingNoise Pattern = "growing_noise"
	PatIntermittent Pattern = "intermittent"
	PatOutliers     Pattern = "outliers"
	PatFixedWeekly  Pattern = "fixed_weekly"
	patDrifting     Pattern = "drifting_weekly"
	PatTwoPeriods   Pattern = "hourly_24_168"
)

// AllPatterns lists every planted pattern.
var AllPatterns = []Pattern{PatStationary, PatLevelShift, PatTrend, PatRandomWalk, PatLogWalk,
	PatGrowingNoise, PatIntermittent, PatOutliers, PatFixedWeekly, patDrifting, PatTwoPeriods}

// plantedSeries is one generated series and what was planted in it.
type plantedSeries struct {
	Kind   Pattern
	X      []float64
	Period int // the period a user would pass: 7 for daily data, 24 for hourly
	// ShiftAt is the 0-based index of the first observation after a level
	// shift (level_shift only).
	ShiftAt int
	// Outliers holds the 0-based positions of planted outliers.
	Outliers []int
}

// patternSeed gives each pattern its own stream.
func patternSeed(k Pattern) uint64 {
	var h uint64 = 1469598103934665603
	for _, c := range []byte(k) {
		h = (h ^ uint64(c)) * 1099511628211
	}
	return h
}

// PlantPanel returns n series of kind k and length T from seed.
func PlantPanel(k Pattern, n, T int, seed uint64) []plantedSeries {
	rng := rand.New(rand.NewPCG(seed, patternSeed(k)))
	out := make([]plantedSeries, n)
	for i := range out {
		out[i] = plant(rng, k, T)
	}
	return out
}

func plant(rng *rand.Rand, k Pattern, T int) plantedSeries {
	s := plantedSeries{Kind: k, Period: 7}
	x := make([]float64, T)
	const level, sd = 50.0, 5.0
	switch k {
	case PatStationary:
		e := AR1Noise(rng, T, 0.5, sd)
		for i := range x {
			x[i] = level + e[i]
		}
	case PatLevelShift:
		e := AR1Noise(rng, T, 0.5, sd)
		s.ShiftAt = int(float64(T) * (0.2 + 0.6*rng.Float64()))
		jump := 4 * sd
		if rng.IntN(2) == 0 {
			jump = -jump
		}
		for i := range x {
			x[i] = level + e[i]
			if i >= s.ShiftAt {
				x[i] += jump
			}
		}
	case PatTrend:
		e := AR1Noise(rng, T, 0.5, sd)
		rise := sd * (3 + 3*rng.Float64())
		if rng.IntN(2) == 0 {
			rise = -rise
		}
		for i := range x {
			x[i] = level + rise*float64(i)/float64(T) + e[i]
		}
	case PatRandomWalk:
		w := 100.0
		for i := range x {
			w += rng.NormFloat64()
			x[i] = w
		}
	case PatLogWalk:
		// A random walk in the logarithm: steps of 3% keep values positive
		// and make the spread of the changes follow the level.
		w := math.Log(100)
		for i := range x {
			w += 0.03 * rng.NormFloat64()
			x[i] = math.Exp(w)
		}
	case PatGrowingNoise:
		e := AR1Noise(rng, T, 0.5, 2)
		for i := range x {
			x[i] = level + (1+3*float64(i)/float64(T-1))*e[i]
		}
	case PatIntermittent:
		// Demand on 30% of days, 1 + Poisson(4) units when it comes.
		for i := range x {
			if rng.Float64() < 0.3 {
				x[i] = 1 + poisson(rng, 4)
			}
		}
	case PatOutliers:
		e := AR1Noise(rng, T, 0.5, sd)
		for i := range x {
			x[i] = level + e[i]
		}
		// Five isolated outliers of 10 marginal standard deviations, at
		// least 5 observations apart.
		for len(s.Outliers) < 5 {
			p := rng.IntN(T)
			clash := false
			for _, q := range s.Outliers {
				if p-q < 5 && q-p < 5 {
					clash = true
				}
			}
			if clash {
				continue
			}
			s.Outliers = append(s.Outliers, p)
			sign := 1.0
			if rng.IntN(2) == 0 {
				sign = -1
			}
			x[p] += sign * 10 * sd
		}
	case PatFixedWeekly:
		// A fixed weekly shape (effects of two standard deviations) over
		// AR(1) noise.
		shape := make([]float64, 7)
		for j := range shape {
			shape[j] = 2 * sd * rng.NormFloat64()
		}
		e := AR1Noise(rng, T, 0.5, sd)
		for i := range x {
			x[i] = level + shape[i%7] + e[i]
		}
	case patDrifting:
		// A weekly pattern that drifts: (1 - B^7) s_t = u_t, plus AR(1) noise.
		season := make([]float64, T)
		for i := range season {
			season[i] = 0.5 * rng.NormFloat64()
			if i >= 7 {
				season[i] += season[i-7]
			}
		}
		e := AR1Noise(rng, T, 0.5, 1)
		for i := range x {
			x[i] = level + season[i] + e[i]
		}
	case PatTwoPeriods:
		// Hourly: a daily cycle and a weekday/weekend pattern (period 168).
		s.Period = 24
		e := AR1Noise(rng, T, 0.6, 1)
		amp := 2 + rng.Float64()
		for i := range x {
			day := (i / 24) % 7
			week := 0.0
			if day >= 5 {
				week = -3
			}
			x[i] = 20 + amp*math.Sin(2*math.Pi*float64(i%24)/24) + week + e[i]
		}
	}
	s.X = x
	return s
}

// poisson draws a Poisson(mean) count by inversion (small means only).
func poisson(rng *rand.Rand, mean float64) float64 {
	u := rng.Float64()
	p := math.Exp(-mean)
	c := p
	k := 0.0
	for u > c && k < 100 {
		k++
		p *= mean / k
		c += p
	}
	return k
}
