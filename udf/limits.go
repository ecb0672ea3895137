package udf

import (
	"context"
	"database/sql/driver"
	"fmt"
)

// listShareOfMemory is the share of the memory limit one list argument's
// copy may take: a list of n values is read into n 8-byte values, and the
// statistics work on a few more copies of it (differences, residuals,
// fitted values), on several workers at once, beside DuckDB's own memory.
// One sixteenth leaves room for that (plumb's own rule of thumb).
const listShareOfMemory = 16

// maxListValues is the longest list argument plumb's functions take under a
// memory limit of memoryLimit bytes (0: no limit).
func maxListValues(memoryLimit int64) int64 {
	if memoryLimit <= 0 {
		return 0
	}
	return max(memoryLimit/listShareOfMemory/8, 1)
}

// checkListLength refuses a list argument longer than limit values (0: no
// limit) before anything is allocated for it.
func (f *function) checkListLength(n uint64) error {
	if f.maxList > 0 && n > uint64(f.maxList) {
		return fmt.Errorf("a list of %d values is longer than the %d the memory limit allows (1/%d of it as 8-byte values); raise the memory limit or shorten the series",
			n, f.maxList, listShareOfMemory)
	}
	return nil
}

// checkBoxedLists applies checkListLength to the list arguments duckdb-go
// has already read (the boxed paths), before plumb copies them.
func (f *function) checkBoxedLists(args []driver.Value) error {
	for _, a := range args {
		if l, ok := a.([]any); ok {
			if err := f.checkListLength(uint64(len(l))); err != nil {
				return err
			}
		}
	}
	return nil
}

// stopped is the query's context error once the statement is cancelled (a
// cancel request, a closed client, a timeout): the chunk is dropped.
func stopped(ctx context.Context) error { return ctx.Err() }
