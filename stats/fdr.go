package stats

import (
	"math"
	"sort"
)

// BenjaminiHochberg returns the Benjamini & Hochberg (1995) adjusted
// p-values (q-values) of p: with the m finite p-values sorted as
// p_(1) ≤ ... ≤ p_(m),
//
//	q_(i) = min_{j ≥ i} min(1, m·p_(j)/j).
//
// Rejecting every hypothesis with q ≤ α controls the false discovery rate
// at α for independent (or positively dependent) tests. NaN p-values (tests
// that could not be run) get NaN and do not count in m.
func BenjaminiHochberg(p []float64) []float64 {
	idx := make([]int, 0, len(p))
	for i, v := range p {
		if !math.IsNaN(v) {
			idx = append(idx, i)
		}
	}
	sort.SliceStable(idx, func(a, b int) bool { return p[idx[a]] < p[idx[b]] })
	q := make([]float64, len(p))
	for i := range q {
		q[i] = math.NaN()
	}
	m := float64(len(idx))
	running := 1.0
	for r := len(idx) - 1; r >= 0; r-- {
		v := p[idx[r]] * m / float64(r+1)
		running = math.Min(running, v)
		q[idx[r]] = math.Min(running, 1)
	}
	return q
}
