package stats

import (
	"math"
	"math/rand/v2"
)

// Planted patterns for the verdict's tests: invented data, each kind drawn
// from its own seeded stream so that adding a kind does not move the others.
// Parameters are chosen to be plainly of their kind (a shift of 4 marginal
// standard deviations, a trend rising 3 to 6 of them over the series), not
// tuned to what the verdict finds.

// pattern names one planted behaviour.
type pattern string

const (
	patStationary   pattern = "stationary"
	patLevelShift   pattern = "level_shift"
	patTrend        pattern = "trend"
	patRandomWalk   pattern = "random_walk"
	patLogWalk      pattern = "log_random_walk"
	patGrowingNoise pattern = "growing_noise"
	patIntermittent pattern = "intermittent"
	patOutliers     pattern = "outliers"
	patFixedWeekly  pattern = "fixed_weekly"
	patDrifting     pattern = "drifting_weekly"
	patTwoPeriods   pattern = "hourly_24_168"
)

var allPatterns = []pattern{patStationary, patLevelShift, patTrend, patRandomWalk, patLogWalk,
	patGrowingNoise, patIntermittent, patOutliers, patFixedWeekly, patDrifting, patTwoPeriods}

// plantedSeries is one generated series and what was planted in it.
type plantedSeries struct {
	kind   pattern
	x      []float64
	period int // the period a user would pass: 7 for daily data, 24 for hourly
	// shiftAt is the 0-based index of the first observation after a level
	// shift (level_shift only).
	shiftAt int
	// outliers holds the 0-based positions of planted outliers.
	outliers []int
}

// patternSeed gives each pattern its own stream.
func patternSeed(k pattern) uint64 {
	var h uint64 = 1469598103934665603
	for _, c := range []byte(k) {
		h = (h ^ uint64(c)) * 1099511628211
	}
	return h
}

// plantPanel returns n series of kind k and length T from seed.
func plantPanel(k pattern, n, T int, seed uint64) []plantedSeries {
	rng := rand.New(rand.NewPCG(seed, patternSeed(k)))
	out := make([]plantedSeries, n)
	for i := range out {
		out[i] = plant(rng, k, T)
	}
	return out
}

func plant(rng *rand.Rand, k pattern, T int) plantedSeries {
	s := plantedSeries{kind: k, period: 7}
	x := make([]float64, T)
	const level, sd = 50.0, 5.0
	switch k {
	case patStationary:
		e := ar1Noise(rng, T, 0.5, sd)
		for i := range x {
			x[i] = level + e[i]
		}
	case patLevelShift:
		e := ar1Noise(rng, T, 0.5, sd)
		s.shiftAt = int(float64(T) * (0.2 + 0.6*rng.Float64()))
		jump := 4 * sd
		if rng.IntN(2) == 0 {
			jump = -jump
		}
		for i := range x {
			x[i] = level + e[i]
			if i >= s.shiftAt {
				x[i] += jump
			}
		}
	case patTrend:
		e := ar1Noise(rng, T, 0.5, sd)
		rise := sd * (3 + 3*rng.Float64())
		if rng.IntN(2) == 0 {
			rise = -rise
		}
		for i := range x {
			x[i] = level + rise*float64(i)/float64(T) + e[i]
		}
	case patRandomWalk:
		w := 100.0
		for i := range x {
			w += rng.NormFloat64()
			x[i] = w
		}
	case patLogWalk:
		// A random walk in the logarithm: steps of 3% keep values positive
		// and make the spread of the changes follow the level.
		w := math.Log(100)
		for i := range x {
			w += 0.03 * rng.NormFloat64()
			x[i] = math.Exp(w)
		}
	case patGrowingNoise:
		e := ar1Noise(rng, T, 0.5, 2)
		for i := range x {
			x[i] = level + (1+3*float64(i)/float64(T-1))*e[i]
		}
	case patIntermittent:
		// Demand on 30% of days, 1 + Poisson(4) units when it comes.
		for i := range x {
			if rng.Float64() < 0.3 {
				x[i] = 1 + poisson(rng, 4)
			}
		}
	case patOutliers:
		e := ar1Noise(rng, T, 0.5, sd)
		for i := range x {
			x[i] = level + e[i]
		}
		// Five isolated outliers of 10 marginal standard deviations, at
		// least 5 observations apart.
		for len(s.outliers) < 5 {
			p := rng.IntN(T)
			clash := false
			for _, q := range s.outliers {
				if p-q < 5 && q-p < 5 {
					clash = true
				}
			}
			if clash {
				continue
			}
			s.outliers = append(s.outliers, p)
			sign := 1.0
			if rng.IntN(2) == 0 {
				sign = -1
			}
			x[p] += sign * 10 * sd
		}
	case patFixedWeekly:
		// A fixed weekly shape (effects of two standard deviations) over
		// AR(1) noise.
		shape := make([]float64, 7)
		for j := range shape {
			shape[j] = 2 * sd * rng.NormFloat64()
		}
		e := ar1Noise(rng, T, 0.5, sd)
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
		e := ar1Noise(rng, T, 0.5, 1)
		for i := range x {
			x[i] = level + season[i] + e[i]
		}
	case patTwoPeriods:
		// Hourly: a daily cycle and a weekday/weekend pattern (period 168).
		s.period = 24
		e := ar1Noise(rng, T, 0.6, 1)
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
	s.x = x
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
