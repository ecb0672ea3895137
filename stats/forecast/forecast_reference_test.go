package forecast

import (
	"math"
	"sort"
	"strconv"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
	"github.com/plumb-sql/plumb/stats/unitroot"
)

// forecastCase is one case of testdata/reference/forecast_statsmodels.py:
// a dataset, a recipe, and the reference values keyed by check, order and
// index.
type forecastCase struct {
	name, dataset string
	boxCox        bool
	lambda        float64
	in            Integration
	values        map[string]map[[2]int]float64
}

// readForecastCases reads forecast_statsmodels.csv (python3-statsmodels
// 0.13.5 via testdata/reference/forecast_statsmodels.py) in file order.
func readForecastCases(t *testing.T) []*forecastCase {
	var cases []*forecastCase
	byName := map[string]*forecastCase{}
	for _, row := range testseries.ReadCSV(t, "forecast_statsmodels.csv") {
		c := byName[row["case"]]
		if c == nil {
			c = &forecastCase{name: row["case"], dataset: row["dataset"], values: map[string]map[[2]int]float64{}}
			if row["lambda"] != "none" {
				c.boxCox, c.lambda = true, testseries.Num(t, row["lambda"])
			}
			c.in = Integration{
				Differences:         int(testseries.Num(t, row["d"])),
				SeasonalDifferences: int(testseries.Num(t, row["D"])),
				Period:              int(testseries.Num(t, row["s"])),
			}
			byName[c.name] = c
			cases = append(cases, c)
		}
		if c.values[row["check"]] == nil {
			c.values[row["check"]] = map[[2]int]float64{}
		}
		key := [2]int{int(testseries.Num(t, row["order"])), int(testseries.Num(t, row["index"]))}
		c.values[row["check"]][key] = testseries.Num(t, row["value"])
	}
	if len(cases) < 6 {
		t.Fatalf("only %d forecast reference cases", len(cases))
	}
	return cases
}

// series returns the case's z (after Box-Cox) and original x.
func (c *forecastCase) series(t *testing.T, all map[string][]float64) (x, z []float64) {
	x = append([]float64(nil), all[c.dataset]...)
	if generated := c.values["series"]; generated != nil { // near_sine: written by the script
		x = make([]float64, len(generated))
		for k, v := range generated {
			x[k[1]] = v
		}
	}
	if len(x) == 0 {
		t.Fatalf("%s: no dataset %q", c.name, c.dataset)
	}
	if c.dataset == "log_airpassengers" { // the script undoes the file's log
		for i := range x {
			x[i] = math.Exp(x[i])
		}
	}
	z = x
	if c.boxCox {
		var s stats.Status
		if z, s = stats.BoxCox(x, c.lambda); s != stats.StatusOK {
			t.Fatalf("%s: Box-Cox status %s", c.name, s)
		}
	}
	return x, z
}

// sortedKeys returns a check's keys in order.
func sortedKeys(m map[[2]int]float64) [][2]int {
	keys := make([][2]int, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Slice(keys, func(i, j int) bool {
		if keys[i][0] != keys[j][0] {
			return keys[i][0] < keys[j][0]
		}
		return keys[i][1] < keys[j][1]
	})
	return keys
}

// relErr is |got - want| / max(1, |want|).
func relErr(got, want float64) float64 {
	return math.Abs(got-want) / math.Max(1, math.Abs(want))
}

// TestARAgainstAutoReg: AutoReg(w, lags=p, trend="c") for p = 0..4 on
// eleven recipes of eight open datasets and a noisy sine wave whose design
// is nearly singular (python3-statsmodels 0.13.5, forecast_statsmodels.py): constant and coefficients within 1e-8
// (relative above 1), sigma2 within 1e-8 relative, the same number of observations, AIC and
// BIC within 1e-8 relative; and the residuals of the order chosen at
// maxlag 12 within 1e-8 of σ.
func TestARAgainstAutoReg(t *testing.T) {
	_, all := testseries.ReferenceSeries(t)
	var worstParam, worstVar, worstIC, worstResid float64
	checked := 0
	for _, c := range readForecastCases(t) {
		_, z := c.series(t, all)
		w := c.in.Apply(z)
		for _, k := range sortedKeys(c.values["ar_sigma2"]) {
			p := k[0]
			m, err := FitAROrder(w, p)
			if err != nil || m.Status != stats.StatusOK {
				t.Fatalf("%s p=%d: %v %s", c.name, p, err, m.Status)
			}
			params := append([]float64{m.Constant}, m.Coefficients...)
			for i, got := range params {
				want, ok := c.values["ar_param"][[2]int{p, i}]
				if !ok {
					t.Fatalf("%s p=%d: no reference parameter %d", c.name, p, i)
				}
				e := relErr(got, want)
				worstParam = math.Max(worstParam, e)
				if e > 1e-8 {
					t.Errorf("%s p=%d: parameter %d = %.12g, AutoReg %.12g", c.name, p, i, got, want)
				}
				checked++
			}
			want := c.values["ar_sigma2"][k]
			e := math.Abs(m.Variance-want) / want
			worstVar = math.Max(worstVar, e)
			if e > 1e-8 {
				t.Errorf("%s p=%d: σ² = %.12g, AutoReg sigma2 %.12g", c.name, p, m.Variance, want)
			}
			if float64(m.Observations) != c.values["ar_observations"][k] {
				t.Errorf("%s p=%d: observations %d, AutoReg %v", c.name, p, m.Observations, c.values["ar_observations"][k])
			}
			for _, ic := range []struct {
				got  float64
				want float64
			}{{m.AIC, c.values["ar_aic"][k]}, {m.BIC, c.values["ar_bic"][k]}} {
				e := math.Abs(ic.got-ic.want) / math.Abs(ic.want)
				worstIC = math.Max(worstIC, e)
				if e > 1e-8 {
					t.Errorf("%s p=%d: criterion %.12g, AutoReg %.12g", c.name, p, ic.got, ic.want)
				}
			}
			checked += 2
		}
		resid := c.values["ar_resid"]
		keys := sortedKeys(resid)
		p := keys[0][0]
		m, _ := FitAROrder(w, p)
		if len(m.Residuals) != len(keys) {
			t.Fatalf("%s p=%d: %d residuals, AutoReg %d", c.name, p, len(m.Residuals), len(keys))
		}
		sigma := math.Sqrt(m.Variance)
		for _, k := range keys {
			e := math.Abs(m.Residuals[k[1]]-resid[k]) / sigma
			worstResid = math.Max(worstResid, e)
			if e > 1e-8 {
				t.Errorf("%s p=%d: residual %d = %.12g, AutoReg %.12g", c.name, p, k[1], m.Residuals[k[1]], resid[k])
			}
			checked++
		}
	}
	t.Logf("AutoReg agreement over %d values: parameters %.1e, sigma2 %.1e, AIC/BIC %.1e, residuals %.1e of σ",
		checked, worstParam, worstVar, worstIC, worstResid)
}

// TestAROrderAgainstSelectOrder: ar_select_order(w, maxlag=M, ic=aic|bic,
// trend="c") at M = 4 and 12 (python3-statsmodels 0.13.5,
// forecast_statsmodels.py) chooses the same order as FitAR with MaxOrder
// M, and every order's criterion on the common sample agrees within 1e-8
// relative. ar_select_order's criteria count only the regression's
// coefficients (k = p + 1) where AutoReg's fitted results (and ARModel)
// count σ² too (k = p + 2): the two differ by 2 (AIC) or log N (BIC) at
// every order, which changes no choice; the comparison removes it.
func TestAROrderAgainstSelectOrder(t *testing.T) {
	_, all := testseries.ReferenceSeries(t)
	agreed, total := 0, 0
	var worst float64
	for _, c := range readForecastCases(t) {
		_, z := c.series(t, all)
		w := c.in.Apply(z)
		for _, rule := range []unitroot.LagRule{unitroot.LagAIC, unitroot.LagBIC} {
			orders := c.values["select_"+string(rule)+"_order"]
			values := c.values["select_"+string(rule)+"_value"]
			for _, k := range sortedKeys(orders) {
				maxOrder := k[0]
				m, err := FitAR(w, AROptions{MaxOrder: maxOrder, Rule: rule})
				if err != nil || m.Status != stats.StatusOK {
					t.Fatalf("%s: %v %s", c.name, err, m.Status)
				}
				want := int(orders[k])
				total++
				if m.Order == want {
					agreed++
				} else {
					t.Errorf("%s %s maxlag %d: order %d, ar_select_order %d", c.name, rule, maxOrder, m.Order, want)
				}
				crit, status := newARDesign(w).criteria(maxOrder, rule)
				if status != stats.StatusOK || len(crit) != maxOrder+1 {
					t.Fatalf("%s: %d criteria, status %s", c.name, len(crit), status)
				}
				perParameter := 2.0
				if rule == unitroot.LagBIC {
					perParameter = math.Log(float64(len(w) - maxOrder))
				}
				for order, got := range crit {
					got -= perParameter
					ref := values[[2]int{maxOrder, order}]
					e := math.Abs(got-ref) / math.Abs(ref)
					worst = math.Max(worst, e)
					if e > 1e-8 {
						t.Errorf("%s %s maxlag %d order %d: %.12g, ar_select_order %.12g", c.name, rule, maxOrder, order, got, ref)
					}
				}
			}
		}
	}
	t.Logf("ar_select_order: same order in %d of %d searches; criteria within %.1e relative", agreed, total, worst)
}

// TestForecastAgainstSARIMAX: SARIMAX(z, order=(p, d, 0),
// seasonal_order=(0, D, 0, s), trend="c") filtered at AutoReg's
// parameters (intercept = ARModel.Constant), 24 steps (python3-statsmodels
// 0.13.5, forecast_statsmodels.py): forecasts and standard errors on z's
// scale, and median and 95% and 80% bounds in original units (SARIMAX's
// values mapped through the inverse Box-Cox transform), within 1e-6
// relative. Recipes with d = 1, d = 2, D = 1 and both, with and without
// Box-Cox (λ = 0, -0.5, 0.5).
func TestForecastAgainstSARIMAX(t *testing.T) {
	_, all := testseries.ReferenceSeries(t)
	worst := map[string]float64{}
	checked := 0
	for _, c := range readForecastCases(t) {
		_, z := c.series(t, all)
		m, err := FitAR(c.in.Apply(z), AROptions{MaxOrder: 12})
		if err != nil || m.Status != stats.StatusOK {
			t.Fatalf("%s: %v %s", c.name, err, m.Status)
		}
		if _, ok := c.values["fc_z_mean"][[2]int{m.Order, 1}]; !ok {
			t.Fatalf("%s: FitAR chose order %d, which the reference did not forecast with", c.name, m.Order)
		}
		for _, coverage := range []float64{0.95, 0.80} {
			f, err := ForecastAR(z, c.in, m, 24, coverage)
			if err != nil || f.Status != stats.StatusOK {
				t.Fatalf("%s: %v %s", c.name, err, f.Status)
			}
			units, err := ToOriginalUnits(f, BackTransform{BoxCox: c.boxCox, Lambda: c.lambda})
			if err != nil {
				t.Fatal(err)
			}
			tag := strconv.Itoa(int(math.Round(coverage * 100)))
			compare := map[string][]float64{
				"fc_z_mean":       f.Mean,
				"fc_z_se":         f.StdErr,
				"fc_median":       units.Mean,
				"fc_lower_" + tag: units.Lower,
				"fc_upper_" + tag: units.Upper,
			}
			for check, got := range compare {
				for h := 1; h <= 24; h++ {
					want, ok := c.values[check][[2]int{m.Order, h}]
					if !ok {
						t.Fatalf("%s: no %s at step %d", c.name, check, h)
					}
					e := math.Abs(got[h-1]-want) / math.Abs(want)
					family := strings.TrimSuffix(strings.TrimSuffix(check, "_95"), "_80")
					worst[family] = math.Max(worst[family], e)
					if e > 1e-6 {
						t.Errorf("%s %s step %d: %.12g, SARIMAX %.12g", c.name, check, h, got[h-1], want)
					}
					checked++
				}
			}
		}
	}
	t.Logf("SARIMAX agreement over %d values, largest relative error: %v", checked, worst)
}
