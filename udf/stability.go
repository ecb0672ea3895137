package udf

import (
	"database/sql/driver"
	_ "embed"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/verdict"
)

// stability(series, segments := NULL) -> STRUCT: the series' mean and
// spread compared across segments, with the trend and ARCH tests.
//
// The maths: verdict.Stability (stats/verdict/stability.go).

//go:embed sql/stability.sql
var stabilityMacros string

func stabilityFunctions(t *types) []*function {
	return []*function{{
		name:     "plumb_stability",
		parallel: true,
		reuse:    true,
		params:   []duckdb.TypeInfo{t.doubles(), t.bigint()},
		result:   stabilityLayout.info(t),
		nullable: true,
		eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
			segments, err := intOr(args[1], "segments", 0)
			if err != nil {
				return nil, err
			}
			r, err := verdict.Stability(x, verdict.StabilityOptions{Segments: segments})
			if err != nil {
				return nil, err
			}
			return stabilityLayout.record(&r), nil
		}),
	}}
}

type stabilityResult = verdict.StabilityResult

// stabilityLayout is stability's STRUCT; every number is NULL unless the
// status is ok.
var stabilityLayout = func() *layout[stabilityResult] {
	ok := func(r *stabilityResult) bool { return r.Status == stats.StatusOK }
	n := func(name string, f func(*stabilityResult) float64) column[stabilityResult] {
		return num(name, func(r *stabilityResult) any { return value(f(r), ok(r)) })
	}
	c := func(name string, f func(*stabilityResult) int) column[stabilityResult] {
		return integer64(name, func(r *stabilityResult) any { return count(f(r), ok(r)) })
	}
	return newLayout(
		c("segments", func(r *stabilityResult) int { return r.Segments }),
		c("segment_length", func(r *stabilityResult) int { return r.SegmentLength }),
		n("mean_statistic", func(r *stabilityResult) float64 { return r.MeanStatistic }),
		n("mean_p_value", func(r *stabilityResult) float64 { return r.MeanPValue }),
		n("spread_statistic", func(r *stabilityResult) float64 { return r.SpreadStatistic }),
		n("spread_p_value", func(r *stabilityResult) float64 { return r.SpreadPValue }),
		n("brown_forsythe_f", func(r *stabilityResult) float64 { return r.BrownForsytheF }),
		n("brown_forsythe_p_value", func(r *stabilityResult) float64 { return r.BrownForsytheP }),
		n("spread_ratio", func(r *stabilityResult) float64 { return r.SpreadRatio }),
		n("mean_spread_correlation", func(r *stabilityResult) float64 { return r.MeanSpreadCorrelation }),
		n("arch_statistic", func(r *stabilityResult) float64 { return r.ArchStatistic }),
		n("arch_p_value", func(r *stabilityResult) float64 { return r.ArchPValue }),
		c("arch_lags", func(r *stabilityResult) int { return r.ArchLags }),
		n("trend_slope", func(r *stabilityResult) float64 { return r.TrendSlope }),
		n("trend_t", func(r *stabilityResult) float64 { return r.TrendT }),
		n("trend_p_value", func(r *stabilityResult) float64 { return r.TrendPValue }),
		n("mann_kendall_z", func(r *stabilityResult) float64 { return r.MannKendallZ }),
		n("mann_kendall_p_value", func(r *stabilityResult) float64 { return r.MannKendallPValue }),
		varchar("status", func(r *stabilityResult) any { return string(r.Status) }),
	)
}()
