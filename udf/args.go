package udf

import (
	"database/sql/driver"
	"fmt"
)

// optionalInt reads a BIGINT argument that may be NULL (nil result).
func optionalInt(v driver.Value, name string) (*int, error) {
	if v == nil {
		return nil, nil
	}
	i, err := integer(v, name)
	if err != nil {
		return nil, err
	}
	return &i, nil
}

// intOr reads an optional BIGINT argument, def when NULL.
func intOr(v driver.Value, name string, def int) (int, error) {
	p, err := optionalInt(v, name)
	if err != nil || p == nil {
		return def, err
	}
	return *p, nil
}

// floatOr reads an optional DOUBLE argument, def when NULL.
func floatOr(v driver.Value, name string, def float64) (float64, error) {
	switch x := v.(type) {
	case nil:
		return def, nil
	case float64:
		return x, nil
	default:
		return 0, fmt.Errorf("%s must be a number, got %T", name, v)
	}
}

// count renders a non-negative count, or NULL when the result is not ok.
func count(v int, ok bool) any {
	if !ok {
		return nil
	}
	return int64(v)
}

// value renders a number, or NULL when the result is not ok or not finite.
func value(v float64, ok bool) any {
	if !ok {
		return nil
	}
	return orNull(v)
}

// withSeries adapts an evaluation over a series to DuckDB's arguments: a
// NULL series gives NULL.
func withSeries(f func(x []float64, args []driver.Value) (any, error)) func([]driver.Value) (any, error) {
	return func(args []driver.Value) (any, error) {
		if args[0] == nil {
			return nil, nil
		}
		x, err := floats(args[0])
		if err != nil {
			return nil, err
		}
		return f(x, args)
	}
}
