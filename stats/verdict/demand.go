package verdict

import "math"

// DemandClass is a series' demand pattern in the classification of
// Syntetos, Boylan & Croston (2005), "On the categorization of demand
// patterns", J. Operational Research Society 56(5).
type DemandClass string

const (
	// DemandSmooth: demand in most periods, sizes of steady magnitude.
	DemandSmooth DemandClass = "smooth"
	// DemandErratic: demand in most periods, sizes that vary a lot.
	DemandErratic DemandClass = "erratic"
	// DemandIntermittent: many periods without demand, steady sizes.
	DemandIntermittent DemandClass = "intermittent"
	// DemandLumpy: many periods without demand and sizes that vary a lot.
	DemandLumpy DemandClass = "lumpy"
)

// The cut-offs of Syntetos, Boylan & Croston (2005): an average
// inter-demand interval of 1.32 periods and a squared coefficient of
// variation of the non-zero demand sizes of 0.49.
const (
	IntervalCutoff  = 1.32
	VariationCutoff = 0.49
)

// DemandProfile describes how often a series is zero and, for a series
// that is never negative, its demand class.
type DemandProfile struct {
	// ZeroShare is the share of values equal to zero.
	ZeroShare float64
	// AverageInterval is the average inter-demand interval: the number of
	// periods divided by the number of periods with a non-zero value (NaN
	// when every value is zero).
	AverageInterval float64
	// SizeVariation is the squared coefficient of variation of the
	// non-zero values, Var/mean² with the n divisor (NaN for fewer than
	// two of them).
	SizeVariation float64
	// Class is empty when the series has a negative value, or no non-zero
	// value: the classification is for demand, which is never negative.
	Class DemandClass
}

// Intermittent reports whether demand is absent in many periods
// (intermittent or lumpy): ARMA-type models describe such series poorly, and
// no power transform applies to their zeros.
func (p DemandProfile) Intermittent() bool {
	return p.Class == DemandIntermittent || p.Class == DemandLumpy
}

// Demand computes the DemandProfile of x (finite values assumed).
func Demand(x []float64) DemandProfile {
	p := DemandProfile{AverageInterval: math.NaN(), SizeVariation: math.NaN()}
	if len(x) == 0 {
		p.ZeroShare = math.NaN()
		return p
	}
	var zeros, nonzero int
	var sum, sumSq float64
	negative := false
	for _, v := range x {
		switch {
		case v == 0:
			zeros++
			continue
		case v < 0:
			negative = true
		}
		nonzero++
		sum += v
		sumSq += v * v
	}
	p.ZeroShare = float64(zeros) / float64(len(x))
	if nonzero == 0 {
		return p
	}
	p.AverageInterval = float64(len(x)) / float64(nonzero)
	if nonzero >= 2 {
		mean := sum / float64(nonzero)
		p.SizeVariation = math.Max(0, sumSq/float64(nonzero)-mean*mean) / (mean * mean)
	}
	if negative || math.IsNaN(p.SizeVariation) {
		return p
	}
	frequent := p.AverageInterval < IntervalCutoff
	steady := p.SizeVariation < VariationCutoff
	switch {
	case frequent && steady:
		p.Class = DemandSmooth
	case frequent:
		p.Class = DemandErratic
	case steady:
		p.Class = DemandIntermittent
	default:
		p.Class = DemandLumpy
	}
	return p
}
