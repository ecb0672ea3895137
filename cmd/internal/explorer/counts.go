package explorer

import (
	"context"
	"database/sql"
	"fmt"

	"github.com/plumb-sql/plumb/udf"
)

// counts are the numbers at the top of the list, each a filter.
type counts struct {
	Groups, Stationary, NotStationary, NotJudged int
	Mean, Spread, Seasonal                       int
	UnitRoot, Trend, Shift                       int
	SpreadLevel, SpreadTime                      int
	Fixed, Drifting                              int
	Outliers, Cured, NotCured                    int
	// Statuses and DemandClasses count each value that occurs; they are
	// also the allow-lists of those two filters.
	Statuses, DemandClasses []valueCount
}

type valueCount struct {
	Value string
	Count int
}

// countRun counts the run's groups by verdict and cause, once, when its
// table is made.
func countRun(ctx context.Context, conn *sql.Conn, table string) (counts, error) {
	var c counts
	t := udf.QuoteIdent(table)
	err := conn.QueryRowContext(ctx, fmt.Sprintf(`SELECT count(*),
		count(*) FILTER (WHERE stationary), count(*) FILTER (WHERE NOT stationary), count(*) FILTER (WHERE stationary IS NULL),
		count(*) FILTER (WHERE list_contains(violations, 'mean')),
		count(*) FILTER (WHERE list_contains(violations, 'spread')),
		count(*) FILTER (WHERE list_contains(violations, 'seasonal')),
		count(*) FILTER (WHERE mean_cause = 'unit_root'), count(*) FILTER (WHERE mean_cause = 'trend'),
		count(*) FILTER (WHERE mean_cause = 'level_shift'),
		count(*) FILTER (WHERE spread_cause = 'level'), count(*) FILTER (WHERE spread_cause = 'time'),
		count(*) FILTER (WHERE seasonal_kind = 'fixed'), count(*) FILTER (WHERE seasonal_kind = 'drifting'),
		count(*) FILTER (WHERE outliers > 0), count(*) FILTER (WHERE cured), count(*) FILTER (WHERE NOT cured)
		FROM %s`, t)).Scan(&c.Groups, &c.Stationary, &c.NotStationary, &c.NotJudged, &c.Mean, &c.Spread, &c.Seasonal,
		&c.UnitRoot, &c.Trend, &c.Shift, &c.SpreadLevel, &c.SpreadTime, &c.Fixed, &c.Drifting,
		&c.Outliers, &c.Cured, &c.NotCured)
	if err != nil {
		return c, err
	}
	if c.Statuses, err = valueCounts(ctx, conn, t, "status"); err != nil {
		return c, err
	}
	c.DemandClasses, err = valueCounts(ctx, conn, t, "demand_class")
	return c, err
}

func valueCounts(ctx context.Context, conn *sql.Conn, table, col string) ([]valueCount, error) {
	rows, err := conn.QueryContext(ctx, fmt.Sprintf("SELECT %[1]s, count(*) FROM %[2]s WHERE %[1]s IS NOT NULL GROUP BY 1 ORDER BY 2 DESC, 1 LIMIT 100",
		udf.QuoteIdent(col), table))
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var out []valueCount
	for rows.Next() {
		var v valueCount
		if err := rows.Scan(&v.Value, &v.Count); err != nil {
			return nil, err
		}
		out = append(out, v)
	}
	return out, rows.Err()
}
