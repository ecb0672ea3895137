package udf

import (
	"context"
	"database/sql"
	"database/sql/driver"
	"fmt"
	"runtime"
	"strings"
	"sync"
	"sync/atomic"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/udf/internal/vectors"
)

// function is one Go scalar function: its SQL name, parameter and result
// types, and the code that computes one row.
type function struct {
	name     string
	params   []duckdb.TypeInfo
	result   duckdb.TypeInfo
	volatile bool
	// nullable lets the function see NULL arguments; otherwise any NULL
	// argument makes the result NULL without calling eval.
	nullable bool
	// parallel evaluates the rows of a chunk on several goroutines. DuckDB
	// often calls a scalar function on one thread only (after a GROUP BY with
	// few thousand groups its hash table is scanned by one thread), so the
	// heavy per-group functions spread a chunk's rows over the cores
	// themselves.
	parallel bool
	// reuse lets each worker read list arguments into slices it reuses from
	// row to row (executeDirect): for functions whose result holds no slice
	// of their arguments, such as those returning a STRUCT of numbers.
	reuse bool
	eval  func(args []driver.Value) (any, error)
	// maxList is the longest list argument accepted (maxListValues; 0:
	// any).
	maxList int64
}

func (f *function) Config() duckdb.ScalarFuncConfig {
	return duckdb.ScalarFuncConfig{
		InputTypeInfos:      f.params,
		ResultTypeInfo:      f.result,
		Volatile:            f.volatile,
		SpecialNullHandling: f.nullable,
	}
}

// Executor uses the chunk executor: DuckDB hands over a chunk of rows at a
// time, cheaper than the row executor (DEVELOPERS.md, "Performance
// notes"). Where package vectors can reach duckdb-go's vectors, list
// arguments are read without boxing (executeDirect); otherwise, the one
// fallback, through duckdb-go's iterator (executeBoxed).
func (f *function) Executor() duckdb.ScalarFuncExecutor {
	return duckdb.ScalarFuncExecutor{
		ChunkContextExecutor: func(ctx context.Context, chunk *duckdb.ChunkIteratorState) error {
			if vectors.Available() && !forceIterator {
				return f.executeDirect(ctx, chunk)
			}
			return f.executeBoxed(ctx, chunk)
		},
	}
}

// evalSafely calls eval and turns a panic into an error, so that a bug
// met by one row fails that query rather than the whole process (plumb
// serve answers other clients from the same process).
func (f *function) evalSafely(args []driver.Value) (v any, err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("internal error, please report it: %v", r)
		}
	}()
	return f.eval(args)
}

// forceIterator makes every function use duckdb-go's boxed iterator; tests
// set it to compare the two ways of reading a chunk.
var forceIterator bool

// executeDirect evaluates a chunk whose list columns are read by
// vectors.ReadLists and whose other columns by duckdb-go's getter, then
// writes the results with vectors.Write (or, for a result it does not
// write, row by row through duckdb-go's setter). Parallel functions spread the rows over
// GOMAXPROCS goroutines, each reading its own rows' arguments.
//
// Every row checks the query's context first, so a cancelled statement
// stops after the rows being computed, not after the whole chunk.
func (f *function) executeDirect(ctx context.Context, state *duckdb.ChunkIteratorState) error {
	in := state.GetInputChunk()
	n := in.GetSize()
	lists := vectors.ReadLists(in, n)
	results := make([]any, n)
	skip := make([]bool, n)
	evalRow := func(row int, args []driver.Value, bufs []vectors.Buffers) error {
		if err := stopped(ctx); err != nil {
			return err
		}
		for c := range args {
			var err error
			if lists[c] != nil {
				if err := f.checkListLength(lists[c].Length(row)); err != nil {
					return err
				}
				var b *vectors.Buffers
				if f.reuse {
					b = &bufs[c]
				}
				args[c], err = lists[c].Value(row, b)
			} else {
				args[c], err = in.GetValue(c, row)
			}
			if err != nil {
				return err
			}
			if args[c] == nil && !f.nullable {
				skip[row] = true // duckdb-go writes NULL for this row afterwards
				return nil
			}
		}
		v, err := f.evalSafely(args)
		results[row] = v
		return err
	}
	workers := runtime.GOMAXPROCS(0)
	if !f.parallel || n < 2 {
		workers = 1
	}
	var next atomic.Int64
	var failed atomic.Pointer[error]
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			args := make([]driver.Value, len(lists))
			bufs := make([]vectors.Buffers, len(lists))
			for failed.Load() == nil {
				row := int(next.Add(1)) - 1
				if row >= n {
					return
				}
				if err := evalRow(row, args, bufs); err != nil {
					failed.CompareAndSwap(nil, &err)
				}
			}
		}()
	}
	wg.Wait()
	if err := failed.Load(); err != nil {
		return fmt.Errorf("%s: %w", f.name, *err)
	}
	if vectors.Write(state, results, skip) {
		return nil
	}
	for row := range n {
		if skip[row] {
			continue
		}
		vectors.MoveTo(state, row)
		if err := state.SetResult(resultValue(results[row])); err != nil {
			return fmt.Errorf("%s: %w", f.name, err)
		}
	}
	return nil
}

// executeBoxed evaluates a chunk through duckdb-go's iterator, on
// GOMAXPROCS goroutines for a parallel function and on one otherwise. Each
// row is handed to the workers as soon as DuckDB's thread has read its
// arguments, so reading overlaps computing; a second walk over the rows
// writes the results in order (the chunk API sets a result only at the
// row its iterator stands on). Like executeDirect, it checks the query's
// context and the lists' lengths before each row.
func (f *function) executeBoxed(ctx context.Context, chunk *duckdb.ChunkIteratorState) error {
	size := chunk.GetInputChunk().GetSize()
	results := make([]any, size)
	errs := make([]error, size)
	done := make([]chan struct{}, size)
	jobs := make(chan int, size)
	args := make([][]driver.Value, size)
	workers := runtime.GOMAXPROCS(0)
	if !f.parallel {
		workers = 1
	}
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range jobs {
				if errs[i] = stopped(ctx); errs[i] == nil {
					if errs[i] = f.checkBoxedLists(args[i]); errs[i] == nil {
						results[i], errs[i] = f.evalSafely(args[i])
					}
				}
				args[i] = nil
				close(done[i])
			}
		}()
	}
	n := 0
	var readErr error
	for row, err := range chunk.Rows() {
		if err == nil {
			err = stopped(ctx) // reading the rows boxes every value: stop early too
		}
		if err != nil {
			readErr = err
			break
		}
		a := make([]driver.Value, row.ColumnCount())
		for i := range a {
			a[i] = *row.GetValuePtr(i)
		}
		args[n], done[n] = a, make(chan struct{})
		jobs <- n
		n++
	}
	close(jobs)
	wg.Wait()
	if readErr != nil {
		return readErr
	}
	for i := 0; i < n; i++ {
		if errs[i] != nil {
			return fmt.Errorf("%s: %w", f.name, errs[i])
		}
	}
	i := 0
	for row, err := range chunk.Rows() {
		if err != nil {
			return err
		}
		if err := row.SetResult(resultValue(results[i])); err != nil {
			return fmt.Errorf("%s: %w", f.name, err)
		}
		i++
	}
	return nil
}

// register registers every function on the database behind conn. Scalar
// functions live in DuckDB's catalog, so one registration serves every
// connection of the database.
//
// Functions that share a name are registered as one overloaded set, DuckDB
// choosing the one whose parameter types fit (plumb_advance has one per
// type of time column).
func register(conn *sql.Conn, functions []*function) error {
	var names []string
	byName := map[string][]duckdb.ScalarFunc{}
	for _, f := range functions {
		if strings.HasSuffix(f.name, "_sql") {
			f = writesSQL(f)
		}
		if _, ok := byName[f.name]; !ok {
			names = append(names, f.name)
		}
		byName[f.name] = append(byName[f.name], f)
	}
	for _, name := range names {
		set := byName[name]
		var err error
		if len(set) == 1 {
			err = duckdb.RegisterScalarUDF(conn, name, set[0])
		} else {
			err = duckdb.RegisterScalarUDFSet(conn, name, set...)
		}
		if err != nil {
			return fmt.Errorf("udf: register %s: %w", name, err)
		}
	}
	return nil
}

// writesSQL wraps a function that writes the SELECT a table macro runs
// (plumb_<name>_sql) so that the plumb functions its SQL calls are
// qualified (qualifyCalls).
func writesSQL(f *function) *function {
	g := *f
	eval := f.eval
	g.eval = func(args []driver.Value) (any, error) {
		v, err := eval(args)
		if s, ok := v.(string); ok && err == nil {
			return qualifyCalls(s), nil
		}
		return v, err
	}
	return &g
}
