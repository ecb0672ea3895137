package udf

import (
	"math"
	"strings"
	"testing"
)

// TestUnitRootSQL runs unit_root over R's Nile series read from
// testdata/reference/datasets_r.csv and checks the STRUCT against
// python3-statsmodels 0.13.5 (rows of unit_root_statsmodels.csv).
func TestUnitRootSQL(t *testing.T) {
	db := openTest(t)
	exec(t, db, `CREATE TABLE nile AS SELECT t, value FROM read_csv('../testdata/reference/datasets_r.csv') WHERE dataset = 'nile'`)
	for _, test := range []struct {
		call      string
		statistic float64
		lags, n   int64
		null      string
	}{
		// python3-statsmodels 0.13.5: adfuller(nile, maxlag=12, regression='c', autolag='AIC')
		{"unit_root(x)", -4.048705096914342, 1, 98, "unit root"},
		// adfuller(nile, maxlag=12, regression='ct', autolag='BIC')
		{"unit_root(x, deterministic := 'level_and_slope', lag_rule := 'bic')", -6.607991420815025, 0, 99, "unit root"},
		// kpss(nile, regression='c', nlags='auto')
		{"unit_root(x, method := 'kpss')", 0.8691205593783892, 5, 100, "stationary"},
	} {
		var stat, p float64
		var lags, n int64
		var null, status string
		q := `SELECT r.statistic, r.p_value, r.lags, r.observations, r.null_hypothesis, r.status
			FROM (SELECT ` + test.call + ` AS r FROM (SELECT list(value ORDER BY t) AS x FROM nile))`
		if err := db.QueryRow(q).Scan(&stat, &p, &lags, &n, &null, &status); err != nil {
			t.Fatalf("%s: %v", test.call, err)
		}
		if math.Abs(stat-test.statistic) > 1e-6*math.Abs(test.statistic) || lags != test.lags || n != test.n || null != test.null || status != "ok" {
			t.Errorf("%s = %v (lags %d, observations %d, %s, %s), want %v (lags %d, observations %d, %s)",
				test.call, stat, lags, n, null, status, test.statistic, test.lags, test.n, test.null)
		}
	}
}

func TestUnitRootSQLStatuses(t *testing.T) {
	db := openTest(t)
	for _, test := range []struct{ call, want string }{
		{"unit_root([1, 2, 3])", "too_short"},
		{"unit_root([5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 5])", "constant"},
		{"unit_root([1, 2, NULL, 4, 3, 5, 4, 6, 5, 7, 6, 8, 7, 9])", "non_finite"},
		{"unit_root([1, 2, 1, 4, 3, 5, 4, 6, 5, 7, 6, 8, 7, 9], lags := 50, lag_rule := 'given')", "too_short"},
		{"unit_root([]::DOUBLE[], method := 'pp')", "too_short"},
		{"unit_root([]::DOUBLE[], method := 'dfgls')", "too_short"},
	} {
		if got := queryString(t, db, "SELECT ("+test.call+").status"); got != test.want {
			t.Errorf("%s: status %s, want %s", test.call, got, test.want)
		}
		if got := queryString(t, db, "SELECT ("+test.call+").statistic"); got != "NULL" {
			t.Errorf("%s: statistic %s, want NULL", test.call, got)
		}
	}
	if got := queryString(t, db, "SELECT unit_root(NULL::DOUBLE[])"); got != "NULL" {
		t.Errorf("NULL series: %s", got)
	}
	for _, test := range []struct{ call, want string }{
		{"unit_root([1, 2, 3], method := 'adf2')", `unknown method "adf2"`},
		{"unit_root([1, 2, 3], deterministic := 'quadratic')", `unknown deterministic terms "quadratic"`},
		{"unit_root([1, 2, 3], lag_rule := 'hqic')", `unknown lag rule "hqic"`},
		{"unit_root([1, 2, 3], method := 'kpss', deterministic := 'none')", "level or level_and_slope"},
		{"unit_root([1, 2, 3], lags := -1)", "must not be negative"},
	} {
		if msg := queryError(t, db, "SELECT "+test.call); !strings.Contains(msg, test.want) {
			t.Errorf("%s: error %q does not say %q", test.call, msg, test.want)
		}
	}
}
