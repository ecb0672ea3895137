package stats

import (
	"math"
	"sort"

	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// FillMethod says how missing time points and missing values are filled.
type FillMethod string

const (
	// FillNone inserts nothing: a series with gaps is tested as if its
	// observations were adjacent, and a missing value makes it non_finite.
	FillNone FillMethod = "none"
	// FillLinear interpolates linearly in time between the neighbouring
	// observed values.
	FillLinear FillMethod = "linear"
	// FillPrevious carries the last observed value forward.
	FillPrevious FillMethod = "previous"
)

// Regular is a series put on a regular time grid.
type Regular struct {
	Values []float64
	// Step is the usual step between consecutive time points: the most
	// common positive difference (the smallest of equally common ones).
	Step int64
	// Gaps is the number of time points missing from the grid; Missing the
	// number of observed points whose value is missing (NaN).
	Gaps, Missing int
	// Irregular counts steps that are not a whole multiple of Step.
	Irregular int
	// TooSparse says that a fill was asked for but not done: the grid
	// would hold more than MaxFillFactor points per observation. Values is
	// then x itself, unfilled, and the series should not be judged
	// (StatusTooSparse).
	TooSparse bool
}

// MaxFillFactor bounds a fill: the regular grid may hold at most this many
// points per observation, so at most nine in ten values are invented. A
// wider span (four observations a billion steps apart) is refused before
// the grid is allocated: what would be judged is the fill, not the data,
// and its size is set by the times, not by what the input holds.
const MaxFillFactor = 10

// Regularize puts the observations x at strictly increasing times at on
// the grid of their usual step, filling missing points and missing values
// by method. It is an error for at and x to differ in length or for at not
// to increase. Values is x itself (not a copy) when nothing is filled.
func Regularize(at []int64, x []float64, method FillMethod) (Regular, error) {
	switch method {
	case "", FillNone, FillLinear, FillPrevious:
	default:
		return Regular{}, numeric.Errorf("unknown fill method %q: use none, linear or previous", string(method))
	}
	if len(at) != len(x) {
		return Regular{}, numeric.Errorf("regularize: %d times for %d values", len(at), len(x))
	}
	r := Regular{}
	for _, v := range x {
		if math.IsNaN(v) {
			r.Missing++
		}
	}
	if len(at) < 2 {
		r.Values = x
		return r, nil
	}
	// The common case first: every step the same.
	first := at[1] - at[0]
	regular := first > 0
	for i := 2; i < len(at) && regular; i++ {
		regular = at[i]-at[i-1] == first
	}
	if regular {
		r.Step = first
		r.Values = x
		if r.Missing > 0 && method != "" && method != FillNone {
			r.Values = append([]float64(nil), x...)
			fillGrid(r.Values, method)
		}
		return r, nil
	}
	counts := map[int64]int{}
	for i := 1; i < len(at); i++ {
		d := at[i] - at[i-1]
		if d <= 0 {
			return Regular{}, numeric.Errorf("regularize: times must increase")
		}
		counts[d]++
	}
	steps := make([]int64, 0, len(counts))
	for d := range counts {
		steps = append(steps, d)
	}
	sort.Slice(steps, func(i, j int) bool {
		if counts[steps[i]] != counts[steps[j]] {
			return counts[steps[i]] > counts[steps[j]]
		}
		return steps[i] < steps[j]
	})
	r.Step = steps[0]
	for i := 1; i < len(at); i++ {
		d := at[i] - at[i-1]
		if d%r.Step != 0 {
			r.Irregular++
			continue
		}
		r.Gaps += int(d/r.Step) - 1
	}
	if method == "" || method == FillNone {
		r.Values = x
		return r, nil
	}
	// Place each observation on the grid (rounding irregular times to the
	// nearest point, keeping the first of any that land on one), then fill.
	// The span is checked before anything is allocated (a negative span is
	// an overflow of extreme times).
	span := at[len(at)-1] - at[0]
	if span < 0 || span/r.Step >= int64(MaxFillFactor*len(at)) {
		r.TooSparse = true
		r.Values = x
		return r, nil
	}
	n := int(span/r.Step) + 1
	grid := make([]float64, n)
	for i := range grid {
		grid[i] = math.NaN()
	}
	for i, t := range at {
		k := int(math.Round(float64(t-at[0]) / float64(r.Step)))
		if k >= 0 && k < n && math.IsNaN(grid[k]) {
			grid[k] = x[i]
		}
	}
	fillGrid(grid, method)
	r.Values = grid
	return r, nil
}

// fillGrid fills NaN entries in place: linearly between the observed
// neighbours (ends take the nearest observed value), or with the previous
// observed value (leading NaNs take the first observed value).
func fillGrid(g []float64, method FillMethod) {
	first := -1
	for i, v := range g {
		if !math.IsNaN(v) {
			first = i
			break
		}
	}
	if first < 0 {
		return
	}
	for i := 0; i < first; i++ {
		g[i] = g[first]
	}
	last := first
	for i := first + 1; i < len(g); i++ {
		if math.IsNaN(g[i]) {
			continue
		}
		if method == FillLinear {
			for k := last + 1; k < i; k++ {
				f := float64(k-last) / float64(i-last)
				g[k] = g[last] + f*(g[i]-g[last])
			}
		} else {
			for k := last + 1; k < i; k++ {
				g[k] = g[last]
			}
		}
		last = i
	}
	for k := last + 1; k < len(g); k++ {
		g[k] = g[last]
	}
}
