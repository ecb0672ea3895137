package demo

import (
	"testing"
)

// TestStationarizeThenRestore: every demo group stationarized by its own
// recipe and restored from the stored recipes gives back its original
// series within 1e-9 relative.
func TestStationarizeThenRestore(t *testing.T) {
	db := openDemo(t, t.TempDir())
	for _, test := range []struct{ table, by, at, value, period string }{
		{"shops", "['shop', 'product']", "day", "units", "7"},
		{"containers", "'container'", "hour", "temperature", "24"},
		{"shops", "['shop', 'product']", "day", "units", "NULL"},
	} {
		setup := `CREATE OR REPLACE TABLE st AS FROM stationarize('` + test.table + `', by := ` + test.by + `, at := '` + test.at + `', value := '` + test.value + `', period := ` + test.period + `);
			CREATE OR REPLACE TABLE rc AS FROM stationarize_recipes('` + test.table + `', by := ` + test.by + `, at := '` + test.at + `', value := '` + test.value + `', period := ` + test.period + `)`
		if _, err := db.Exec(setup); err != nil {
			t.Fatal(err)
		}
		var rows, restored, groups, transformed int
		q := `WITH back AS (FROM restore('(SELECT * EXCLUDE (` + test.value + `) FROM st)', 'rc', by := ` + test.by + `, at := '` + test.at + `', value := 'stationary_value', anchor := 'first'))
			SELECT count(*),
			       count(*) FILTER (WHERE abs(back.stationary_value - o.` + test.value + `) <= 1e-9 * greatest(1, abs(o.` + test.value + `))),
			       (SELECT count(*) FROM rc),
			       (SELECT count(*) FROM rc WHERE differences + seasonal_differences > 0 OR box_cox_lambda IS NOT NULL)
			FROM back JOIN ` + test.table + ` AS o USING (` + map[string]string{"shops": "shop, product", "containers": "container"}[test.table] + `, ` + test.at + `)`
		if err := db.QueryRow(q).Scan(&rows, &restored, &groups, &transformed); err != nil {
			t.Fatal(err)
		}
		if rows == 0 || restored != rows {
			t.Errorf("%s period %s: %d of %d rows restored", test.table, test.period, restored, rows)
		}
		if transformed == 0 {
			t.Errorf("%s: no group was transformed, the test shows nothing", test.table)
		}
		t.Logf("%s period %s: %d rows restored exactly, %d of %d groups transformed", test.table, test.period, restored, transformed, groups)
	}
}

// TestRestoreForecast: a forecast of "no change" on the transformed scale
// (zeros) restored by restore() must be the naive forecast of the recipe:
// the last value for one plain difference, the value one period back for
// one seasonal difference (plain algebra of undifferencing), for 14 steps
// of every demo group with such a recipe and no Box-Cox transform.
func TestRestoreForecast(t *testing.T) {
	db := openDemo(t, t.TempDir())
	setup := `CREATE TABLE rc AS FROM stationarize_recipes('shops', by := ['shop', 'product'], at := 'day', value := 'units', period := 7);
		CREATE TABLE fc AS SELECT shop, product, last_at + h::INTEGER AS day, 0.0 AS units, h
			FROM rc, range(1, 15) r(h) WHERE box_cox_lambda IS NULL`
	if _, err := db.Exec(setup); err != nil {
		t.Fatal(err)
	}
	q := `WITH back AS (FROM restore('fc', 'rc', by := ['shop', 'product'], at := 'day', value := 'units')),
		want AS (
			SELECT f.shop, f.product, f.day, r.differences AS d, r.seasonal_differences AS sd,
			       CASE WHEN r.differences = 1 AND r.seasonal_differences = 0 THEN
			                (SELECT units FROM shops s WHERE s.shop = f.shop AND s.product = f.product AND s.day = r.last_at)
			            WHEN r.differences = 0 AND r.seasonal_differences = 1 THEN
			                (SELECT units FROM shops s WHERE s.shop = f.shop AND s.product = f.product
			                 AND s.day = r.last_at - 7 + ((f.h - 1) % 7 + 1)::INTEGER)
			       END AS naive
			FROM fc f JOIN rc r USING (shop, product))
		SELECT count(*) FILTER (WHERE naive IS NOT NULL),
		       count(*) FILTER (WHERE naive IS NOT NULL AND abs(back.units - naive) <= 1e-9 * greatest(1, abs(naive))),
		       count(DISTINCT (w.shop, w.product)) FILTER (WHERE d = 1),
		       count(DISTINCT (w.shop, w.product)) FILTER (WHERE sd = 1)
		FROM back JOIN want w USING (shop, product, day)`
	var checked, same, plain, seasonal int
	if err := db.QueryRow(q).Scan(&checked, &same, &plain, &seasonal); err != nil {
		t.Fatal(err)
	}
	if checked == 0 || same != checked || plain == 0 || seasonal == 0 {
		t.Errorf("%d of %d forecasts restored to the naive forecast (%d groups with d = 1, %d with D = 1)", same, checked, plain, seasonal)
	}
	t.Logf("%d forecasts checked over %d plain and %d seasonal recipes", checked, plain, seasonal)
}
