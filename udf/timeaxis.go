package udf

import (
	"database/sql/driver"
	"fmt"
	"math"
	"time"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/udf/internal/vectors"
)

// errNullTime is the error for a NULL in the at column: a time point
// that is not known cannot be placed on the series' axis.
var errNullTime = vectors.ErrNullTime

// times reads a list of at values (DATE, TIMESTAMP or an integer type) as
// int64 positions: microseconds since 1970 for dates and timestamps, the
// numbers themselves otherwise.
func times(v driver.Value) ([]int64, error) {
	if ts, ok := v.([]int64); ok { // read unboxed by vectors.List
		return ts, nil
	}
	list, ok := v.([]any)
	if !ok {
		return nil, fmt.Errorf("expected a list of times, got %T", v)
	}
	out := make([]int64, len(list))
	for i, e := range list {
		switch t := e.(type) {
		case time.Time:
			out[i] = t.UnixMicro()
		case int64:
			out[i] = t
		case int32:
			out[i] = int64(t)
		case int16:
			out[i] = int64(t)
		case int8:
			out[i] = int64(t)
		case uint64:
			out[i] = int64(t)
		case uint32:
			out[i] = int64(t)
		case uint16:
			out[i] = int64(t)
		case uint8:
			out[i] = int64(t)
		case nil:
			return nil, errNullTime
		case float64:
			if t != math.Trunc(t) {
				return nil, fmt.Errorf("the at column must be a DATE, a TIMESTAMP or whole numbers, got %v", t)
			}
			out[i] = int64(t)
		default:
			return nil, fmt.Errorf("the at column must be a DATE, a TIMESTAMP or an integer, got %T", e)
		}
	}
	return out, nil
}

// timeAxisFunctions provides plumb_repeats(at_list), the number of values
// of a sorted list of times that equal the one before: the rows that repeat
// a time point. The table functions' group query (seriesQuery.seriesCTEs)
// fails a group with repeats; counting them here, on the list DuckDB has
// already ordered, replaced count(DISTINCT at), which cost DuckDB about a
// second per ten million rows.
func timeAxisFunctions(t *types) []*function {
	return []*function{{
		name:     "plumb_repeats",
		parallel: true,
		params:   []duckdb.TypeInfo{t.anyType()},
		result:   t.bigint(),
		eval: func(args []driver.Value) (any, error) {
			at, err := times(args[0])
			if err != nil {
				return nil, err
			}
			repeats := int64(0)
			for i := 1; i < len(at); i++ {
				if at[i] == at[i-1] {
					repeats++
				}
			}
			return repeats, nil
		},
	}}
}
