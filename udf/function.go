package udf

import (
	"context"
	"database/sql"
	"database/sql/driver"
	"fmt"

	"github.com/duckdb/duckdb-go/v2"
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
	eval     func(args []driver.Value) (any, error)
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
// time, which measured 10-15% cheaper than the row executor (DESIGN.md).
func (f *function) Executor() duckdb.ScalarFuncExecutor {
	return duckdb.ScalarFuncExecutor{
		ChunkContextExecutor: func(ctx context.Context, chunk *duckdb.ChunkIteratorState) error {
			args := make([]driver.Value, chunk.ColumnCount())
			for row, err := range chunk.Rows() {
				if err != nil {
					return err
				}
				for i := range args {
					args[i] = *row.GetValuePtr(i)
				}
				v, err := f.eval(args)
				if err != nil {
					return fmt.Errorf("%s: %w", f.name, err)
				}
				if err := row.SetResult(v); err != nil {
					return fmt.Errorf("%s: %w", f.name, err)
				}
			}
			return nil
		},
	}
}

// register registers every function on the database behind conn. Scalar
// functions live in DuckDB's catalog, so one registration serves every
// connection of the database.
func register(conn *sql.Conn, functions []*function) error {
	for _, f := range functions {
		if err := duckdb.RegisterScalarUDF(conn, f.name, f); err != nil {
			return fmt.Errorf("udf: register %s: %w", f.name, err)
		}
	}
	return nil
}
