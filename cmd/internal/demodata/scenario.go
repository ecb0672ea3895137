// Package demodata generates plumb's demo scenario: the daily unit sales of
// a fictional grocery co-operative's shops and product lines, and the hourly
// temperatures of a fleet of refrigerated containers. Every series has one
// planted behaviour, and the truth is written beside the data so that tests
// can measure how often plumb finds it. The data is invented and for the
// demo only.
package demodata

// Kind is the behaviour planted in one series.
type Kind string

const (
	// Stationary is an AR(1) around a fixed level: every condition holds.
	Stationary Kind = "stationary"
	// Trend is a straight-line trend plus AR(1) noise: stationary once the
	// trend is removed, but its mean moves.
	Trend Kind = "trend"
	// RandomWalk has a unit root: its level wanders and needs differencing.
	RandomWalk Kind = "random_walk"
	// Seasonal repeats a fixed pattern every period (7 days, 24 hours) over
	// AR(1) noise: it needs seasonal differencing.
	Seasonal Kind = "seasonal"
	// GrowingSpread keeps a fixed level while the noise's standard
	// deviation grows fourfold over the series.
	GrowingSpread Kind = "growing_spread"
	// LevelShift is an AR(1) whose level jumps once, part-way through.
	LevelShift Kind = "level_shift"
)

// Kinds lists every planted behaviour in the order groups are dealt them.
var Kinds = []Kind{Stationary, Trend, RandomWalk, Seasonal, GrowingSpread, LevelShift}

// Truth is what was planted in one series.
type Truth struct {
	Kind Kind
	// Phi is the AR(1) coefficient of the noise (0 for a random walk).
	Phi float64
	// Period is the length of the planted seasonal pattern, 0 if none.
	Period int
	// Level is the series' base level.
	Level float64
}

// UnitRoot reports whether the series needs plain differencing.
func (t Truth) UnitRoot() bool { return t.Kind == RandomWalk }

// MeanChanges reports whether the series' mean moves over time.
func (t Truth) MeanChanges() bool {
	return t.Kind == RandomWalk || t.Kind == Trend || t.Kind == LevelShift
}

// SpreadChanges reports whether the series' spread moves over time.
func (t Truth) SpreadChanges() bool { return t.Kind == GrowingSpread }

// SeasonalPattern reports whether a seasonal pattern was planted.
func (t Truth) SeasonalPattern() bool { return t.Kind == Seasonal }

// Sizes says how much data to generate.
type Sizes struct {
	Shops, Products int // shop × product-line groups of daily units
	Days            int // observations per shop series
	Containers      int // container groups of hourly temperatures
	Hours           int // observations per container series
}

// DefaultSizes are the demo's sizes: 96 shop series of two years and 30
// container series of 60 days, about 115,000 rows, generated in well under a
// second.
var DefaultSizes = Sizes{Shops: 12, Products: 8, Days: 730, Containers: 30, Hours: 1440}

// ShopNames are the co-operative's shops; product lines are ProductLines.
var ShopNames = []string{
	"Larchmere Central", "Mill Lane", "Quayside", "Orchard Row", "Station Yard", "Bramble Hill",
	"Kiln Street", "Ferry Road", "Chapel Green", "Weir Bridge", "Tannery Close", "Hollow Oak",
}

// ProductLines are the product lines every shop sells.
var ProductLines = []string{"dairy", "bakery", "produce", "pantry", "frozen", "beverages", "household", "deli"}
