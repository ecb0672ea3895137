package udf

import (
	"database/sql/driver"
	_ "embed"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
)

// white_noise(series, lags, fitted) -> STRUCT (udf/sql/white_noise.sql): the Ljung-Box
// test that the first lags autocorrelations are zero, with df = lags −
// fitted.
//
// The maths: stats.LjungBox (stats/ljungbox.go).

//go:embed sql/white_noise.sql
var whiteNoiseMacros string

func whiteNoiseFunctions(t *types) []*function {
	return []*function{{
		name:     "plumb_white_noise",
		params:   []duckdb.TypeInfo{t.doubles(), t.bigint(), t.bigint()},
		result:   whiteNoiseLayout.info(t),
		nullable: true,
		eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
			lags, fitted, err := whiteNoiseArgs(args[1], args[2])
			if err != nil {
				return nil, err
			}
			r, err := stats.LjungBox(x, lags, fitted)
			if err != nil {
				return nil, err
			}
			return whiteNoiseLayout.record(&r), nil
		}),
	}}
}

type whiteNoiseResult = stats.WhiteNoiseResult

// whiteNoiseLayout is white_noise's STRUCT: the statistic and p-value are
// NULL unless the status is ok.
var whiteNoiseLayout = func() *layout[whiteNoiseResult] {
	ok := func(r *whiteNoiseResult) bool { return r.Status == stats.StatusOK }
	return newLayout(
		num("statistic", func(r *whiteNoiseResult) any { return value(r.Statistic, ok(r)) }),
		num("p_value", func(r *whiteNoiseResult) any { return value(r.PValue, ok(r)) }),
		integer64("lags", func(r *whiteNoiseResult) any { return int64(r.Lags) }),
		integer64("df", func(r *whiteNoiseResult) any { return int64(r.DF) }),
		integer64("observations", func(r *whiteNoiseResult) any { return int64(r.Observations) }),
		varchar("status", func(r *whiteNoiseResult) any { return string(r.Status) }),
	)
}()
