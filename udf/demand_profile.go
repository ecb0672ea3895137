package udf

import (
	"database/sql/driver"
	_ "embed"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/verdict"
)

// demand_profile(series) -> STRUCT(zero_share, average_interval,
// size_variation, demand_class); a series with a missing value gives NULL.
//
// The maths: verdict.Demand (stats/verdict/demand.go).

//go:embed sql/demand_profile.sql
var demandProfileMacros string

func demandProfileFunctions(t *types) []*function {
	return []*function{{
		name:     "plumb_demand_profile",
		parallel: true,
		params:   []duckdb.TypeInfo{t.doubles()},
		result:   demandProfileLayout.info(t),
		nullable: true,
		eval: withSeries(func(x []float64, args []driver.Value) (any, error) {
			if stats.CheckFinite(x) != stats.StatusOK {
				return nil, nil
			}
			p := verdict.Demand(x)
			return demandProfileLayout.record(&p), nil
		}),
	}}
}

type demandProfile = verdict.DemandProfile

// demandProfileLayout is demand_profile's STRUCT.
var demandProfileLayout = newLayout(
	num("zero_share", func(p *demandProfile) any { return orNull(p.ZeroShare) }),
	num("average_interval", func(p *demandProfile) any { return orNull(p.AverageInterval) }),
	num("size_variation", func(p *demandProfile) any { return orNull(p.SizeVariation) }),
	varchar("demand_class", func(p *demandProfile) any { return textOrNull(string(p.Class)) }),
)
