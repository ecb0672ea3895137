package pgserver

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// byteSize reads a memory size as DuckDB's memory_limit takes it: a number
// and a unit, KB, MB, GB and TB counting in powers of 1000 and KiB, MiB,
// GiB and TiB in powers of 1024 (B or no unit: bytes).
func byteSize(s string) (int64, error) {
	t := strings.TrimSpace(s)
	k := strings.IndexFunc(t, func(r rune) bool { return (r < '0' || r > '9') && r != '.' })
	if k < 0 {
		k = len(t)
	}
	number, unit := t[:k], strings.ToLower(strings.TrimSpace(t[k:]))
	n, err := strconv.ParseFloat(number, 64)
	if err != nil || n <= 0 {
		return 0, fmt.Errorf("memory limit %q: want a positive size such as 4GB", s)
	}
	scale := map[string]float64{"": 1, "b": 1, "bytes": 1,
		"kb": 1e3, "mb": 1e6, "gb": 1e9, "tb": 1e12,
		"kib": 1 << 10, "mib": 1 << 20, "gib": 1 << 30, "tib": 1 << 40}[unit]
	if scale == 0 {
		return 0, fmt.Errorf("memory limit %q: unknown unit %q (use KB, MB, GB, TB or KiB, MiB, GiB, TiB)", s, unit)
	}
	if n*scale >= math.MaxInt64 {
		return 0, fmt.Errorf("memory limit %q is too large", s)
	}
	return int64(n * scale), nil
}

// processMemoryCap is the private memory the whole serving process may
// take under --memory-limit m: m for DuckDB's buffers, m for the Go heap
// (debug.SetMemoryLimit) and what DuckDB allocates outside its buffer
// manager, and 512 MiB for thread stacks and libraries (plumb's own rule).
func processMemoryCap(m int64) int64 { return 2*m + 512<<20 }
