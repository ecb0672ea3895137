package pgserver

import "golang.org/x/sys/unix"

// capProcessMemory lowers the process's RLIMIT_DATA (its private writable
// memory: heaps, malloc arenas, thread stacks) to limit bytes, never
// raising it. DuckDB's memory_limit governs only its buffer manager; what
// it allocates outside it (a constant list it folds while binding, such as
// range(0, 100000000)) then fails that statement with DuckDB's Out of
// Memory error instead of growing the process without bound.
func capProcessMemory(limit int64) error {
	var cur unix.Rlimit
	if err := unix.Getrlimit(unix.RLIMIT_DATA, &cur); err != nil {
		return err
	}
	if cur.Cur != unix.RLIM_INFINITY && cur.Cur <= uint64(limit) {
		return nil
	}
	cur.Cur = uint64(limit)
	return unix.Setrlimit(unix.RLIMIT_DATA, &cur)
}
