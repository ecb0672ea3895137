//go:build !linux

package pgserver

// capProcessMemory has no portable counterpart here; DuckDB's
// memory_limit and Go's heap limit still apply.
func capProcessMemory(int64) error { return nil }
