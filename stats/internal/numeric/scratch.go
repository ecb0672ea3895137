package numeric

import (
	"math/bits"
	"sync"
)

// Scratch slices for the hot paths.
//
// The statistics need many short-lived []float64 per series (ADF's prefix
// sums, STL's work arrays, segment residuals); allocated afresh, they keep
// the garbage collector busy (DEVELOPERS.md, Performance notes, "Garbage",
// has the measurement). Functions that need a temporary slice take it from
// a pool by size class and give it back when done; nothing they return
// comes from the pool unless its doc comment says so.

// scratchClasses are pools of slices with capacity 2^c, c = 0..len-1.
var scratchClasses [28]sync.Pool

// GetScratch returns a slice of length n whose contents are unspecified.
func GetScratch(n int) []float64 {
	if n <= 0 {
		return nil
	}
	c := bits.Len(uint(n - 1)) // smallest c with 2^c >= n
	if c >= len(scratchClasses) {
		return make([]float64, n)
	}
	if p, ok := scratchClasses[c].Get().(*[]float64); ok {
		return (*p)[:n]
	}
	return make([]float64, n, 1<<c)
}

// GetZeroed returns a slice of length n filled with zeros.
func GetZeroed(n int) []float64 {
	s := GetScratch(n)
	clear(s)
	return s
}

// PutScratch gives s back for reuse; the caller must not use it again.
func PutScratch(s []float64) {
	c := cap(s)
	if c == 0 || c&(c-1) != 0 || bits.Len(uint(c))-1 >= len(scratchClasses) {
		return // not from GetScratch
	}
	s = s[:c]
	scratchClasses[bits.Len(uint(c))-1].Put(&s)
}
