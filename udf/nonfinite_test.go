package udf

import (
	"strings"
	"testing"
)

// TestNumbersThatCannotBeComputedThroughSQL: 120 rows alternating ±1e308
// (each difference overflows) and a random walk of scale 1e300 are
// non_finite in diagnose, stationarity and forecast, with NULL results, no
// rank and never stationary = true; unit_root, which scales the series
// first, gives a status or a finite statistic; and no plumb function
// writes NaN or ±Inf as a number (DuckDB would print NaN).
func TestNumbersThatCannotBeComputedThroughSQL(t *testing.T) {
	db := openTest(t)
	exec(t, db, `CREATE TABLE big AS
		SELECT 'alternating' AS g, i AS t, CASE WHEN i % 2 = 0 THEN 1e308 ELSE -1e308 END AS v FROM range(120) r(i)
		UNION ALL
		SELECT 'walk', i, 1e300 * sum(sin(i * 7.1) + cos(i * 3.3)) OVER (ORDER BY i) FROM range(400) r(i)
		UNION ALL
		SELECT 'ordinary', i, 100 + sin(i * 7.1) + (i % 7) FROM range(400) r(i)`)
	for _, test := range []struct{ query, want string }{
		{`SELECT string_agg(g || ' ' || status || ' ' || coalesce(stationary::VARCHAR, 'NULL') || ' ' || coalesce(rank::VARCHAR, 'NULL') || ' ' ||
		         coalesce(score::VARCHAR, 'NULL') || ' ' || coalesce(ljung_box_p_value::VARCHAR, 'NULL'), '; ' ORDER BY g)
		  FROM diagnose('big', by := 'g', at := 't', value := 'v') WHERE g <> 'ordinary'`,
			"alternating non_finite NULL NULL NULL NULL; walk non_finite NULL NULL NULL NULL"},
		{`SELECT rank FROM diagnose('big', by := 'g', at := 't', value := 'v') WHERE g = 'ordinary'`, "1"},
		{`SELECT string_agg(DISTINCT g || ' ' || status || ' ' || coalesce(forecast::VARCHAR, 'NULL'), '; ' ORDER BY g || ' ' || status || ' ' || coalesce(forecast::VARCHAR, 'NULL'))
		  FROM forecast('big', by := 'g', at := 't', value := 'v', horizon := 3) WHERE g <> 'ordinary'`,
			"alternating non_finite NULL; walk non_finite NULL"},
		{`SELECT string_agg(g || ' ' || s.status || ' ' || coalesce(s.stationary::VARCHAR, 'NULL') || ' ' || coalesce(s.score::VARCHAR, 'NULL'), '; ' ORDER BY g)
		  FROM (SELECT g, stationarity(list(v ORDER BY t)) AS s FROM big WHERE g <> 'ordinary' GROUP BY g)`,
			"alternating non_finite NULL NULL; walk non_finite NULL NULL"},
		{`SELECT bool_and(u.status <> 'ok' OR isfinite(u.statistic)) FROM (SELECT unit_root(list(v ORDER BY t)) AS u FROM big GROUP BY g)`, "true"},
		{`SELECT bool_and(w.status <> 'ok' OR isfinite(w.statistic)) FROM (SELECT white_noise(list(v ORDER BY t)) AS w FROM big GROUP BY g)`, "true"},
	} {
		if got := queryString(t, db, test.query); got != test.want {
			t.Errorf("%s\n = %s, want %s", test.query, got, test.want)
		}
	}
	// No NaN or infinity anywhere in diagnose's or forecast's rows.
	for _, q := range []string{`FROM diagnose('big', by := 'g', at := 't', value := 'v')`, `FROM forecast_models('big', by := 'g', at := 't', value := 'v')`} {
		if got := queryString(t, db, `SELECT string_agg(to_json(r)::VARCHAR, ' ') FROM (`+q+`) r`); strings.Contains(got, "NaN") || strings.Contains(got, "Infinity") || strings.Contains(got, "inf") {
			t.Errorf("%s has a non-finite number: %s", q, got)
		}
	}
}
