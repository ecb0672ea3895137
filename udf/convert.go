package udf

import (
	"database/sql/driver"
	"fmt"
	"math"

	"github.com/plumb-sql/plumb/stats/verdict"
	"github.com/plumb-sql/plumb/udf/internal/vectors"
)

// floats converts a DuckDB LIST(DOUBLE) value into a []float64. NULL
// elements become NaN: plumb treats NULL and NaN alike as missing, and every
// function documents what it does with a missing value.
func floats(v driver.Value) ([]float64, error) {
	if x, ok := v.([]float64); ok { // read unboxed by vectors.List
		return x, nil
	}
	list, ok := v.([]any)
	if !ok {
		return nil, fmt.Errorf("expected a list of numbers, got %T", v)
	}
	out := make([]float64, len(list))
	for i, e := range list {
		switch x := e.(type) {
		case float64:
			out[i] = x
		case nil:
			out[i] = math.NaN()
		default:
			return nil, fmt.Errorf("expected a list of DOUBLE, got an element of type %T", e)
		}
	}
	return out, nil
}

// doubleList is a LIST(DOUBLE) result with NaN standing for NULL, alone or
// as a member of a STRUCT result. executeDirect writes them straight into
// DuckDB's vectors (vectors.Write); the fallback hands them to duckdb-go as
// listOrNull does.
type doubleList = vectors.Floats

// resultValue turns doubleLists, also inside a STRUCT's map, and records
// into what duckdb-go's setter takes.
func resultValue(v any) any {
	switch x := v.(type) {
	case doubleList:
		return listOrNull(x)
	case record:
		return resultValue(x.Map())
	case float64:
		return orNull(x)
	case map[string]any:
		for k, m := range x {
			switch y := m.(type) {
			case doubleList:
				x[k] = listOrNull(y)
			case float64:
				x[k] = orNull(y)
			}
		}
	}
	return v
}

// listOrNull returns x as a DuckDB list with NaN and ±Inf written as NULL,
// so that a missing input never reaches the user as a NaN that aggregates
// would absorb, and no number that could not be computed is printed as one.
func listOrNull(x []float64) []any {
	out := make([]any, len(x))
	for i, v := range x {
		if !math.IsNaN(v) && !math.IsInf(v, 0) {
			out[i] = v
		}
	}
	return out
}

// integer reads a BIGINT argument.
func integer(v driver.Value, name string) (int, error) {
	switch x := v.(type) {
	case int64:
		return int(x), nil
	case int32:
		return int(x), nil
	default:
		return 0, fmt.Errorf("%s must be an integer, got %T", name, v)
	}
}

// text reads a VARCHAR argument.
func text(v driver.Value, name string) (string, error) {
	s, ok := v.(string)
	if !ok {
		return "", fmt.Errorf("%s must be text, got %T", name, v)
	}
	return s, nil
}

// orNull returns v, or nil (SQL NULL) when v is NaN or ±Inf.
func orNull(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return v
}

// textList is a LIST(VARCHAR) value of violations.
func textList(v []verdict.Violation) []any {
	out := make([]any, len(v))
	for i, x := range v {
		out[i] = string(x)
	}
	return out
}

// textOrNull returns s, or SQL NULL for the empty string.
func textOrNull(s string) any {
	if s == "" {
		return nil
	}
	return s
}
