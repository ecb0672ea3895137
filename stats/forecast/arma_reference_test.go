package forecast

import (
	"math"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// armaCase is one case of testdata/reference/arma_statsmodels.py
// (python3-statsmodels 0.13.5 SARIMAX, exact likelihood, σ² concentrated).
type armaCase struct {
	name, dataset string
	log           bool
	order         ARMAOrder
	in            Integration
	values        map[string][]float64
}

// readARMACases reads arma_statsmodels.csv in file order.
func readARMACases(t *testing.T) ([]*armaCase, map[string][]float64) {
	series := map[string][]float64{}
	for _, row := range testseries.ReadCSV(t, "datasets_arma_r.csv") {
		series[row["dataset"]] = append(series[row["dataset"]], testseries.Num(t, row["value"]))
	}
	var cases []*armaCase
	byName := map[string]*armaCase{}
	for _, row := range testseries.ReadCSV(t, "arma_statsmodels.csv") {
		c := byName[row["case"]]
		if c == nil {
			i := func(k string) int { return int(testseries.Num(t, row[k])) }
			c = &armaCase{name: row["case"], dataset: row["dataset"], log: row["log"] == "1",
				order:  ARMAOrder{AR: i("p"), MA: i("q"), SeasonalAR: i("P"), SeasonalMA: i("Q"), Period: i("s"), WithMean: row["mean"] == "1"},
				in:     Integration{Differences: i("d"), SeasonalDifferences: i("D"), Period: i("s")},
				values: map[string][]float64{}}
			byName[c.name] = c
			cases = append(cases, c)
		}
		c.values[row["check"]] = append(c.values[row["check"]], testseries.Num(t, row["value"]))
	}
	if len(cases) < 8 {
		t.Fatalf("only %d ARMA reference cases", len(cases))
	}
	return cases, series
}

func (c *armaCase) z(t *testing.T, series map[string][]float64) []float64 {
	x := append([]float64(nil), series[c.dataset]...)
	if len(x) == 0 {
		t.Fatalf("%s: no dataset %q", c.name, c.dataset)
	}
	if c.log {
		for i := range x {
			x[i] = math.Log(x[i])
		}
	}
	return x
}

// reference returns statsmodels' optimum as plumb's model type, scored by
// plumb's own likelihood.
func (c *armaCase) reference(t *testing.T, w []float64, shrink float64) ARMAModel {
	scaled := func(k string) []float64 {
		v := append([]float64{}, c.values[k]...)
		for i := range v {
			v[i] *= shrink
		}
		return v
	}
	ar, ma, sar, sma := scaled("ar"), scaled("ma"), scaled("seasonal_ar"), scaled("seasonal_ma")
	mean := 0.0
	if c.order.WithMean {
		// statsmodels' intercept c is kept; μ = c / (φ(1)Φ(1)) at the
		// (possibly shrunk) coefficients.
		mean = c.values["constant"][0] / (polynomialAtOne(ar) * polynomialAtOne(sar))
	}
	m, err := ARMAAt(w, c.order, ar, ma, sar, sma, mean)
	if err != nil || m.Status != stats.StatusOK {
		t.Fatalf("%s: ARMAAt: %v %s", c.name, err, m.Status)
	}
	return m
}

// TestARMALikelihoodAtReference is the strict check: plumb's exact
// log-likelihood (and σ̂²) at statsmodels' parameters, and at those
// parameters shrunk by 0.8, equal statsmodels' to 1e-8
// (python3-statsmodels 0.13.5 SARIMAX loglike, arma_statsmodels.py); the
// 24-step forecasts and 95% bounds of z at statsmodels' parameters equal
// its get_forecast to 1e-6 (relative to the value's magnitude; the largest
// difference is logged: statsmodels' forecasts come from its diffuse
// start of the differenced states, plumb's condition on the same values
// through w and the last d + D·s values of z).
func TestARMALikelihoodAtReference(t *testing.T) {
	cases, series := readARMACases(t)
	for _, c := range cases {
		z := c.z(t, series)
		w := c.in.Apply(z)
		m := c.reference(t, w, 1)
		if d := math.Abs(m.LogLikelihood - c.values["loglik"][0]); d > 1e-8*math.Max(1, math.Abs(m.LogLikelihood)) {
			t.Errorf("%s: log-likelihood %.12f, statsmodels %.12f", c.name, m.LogLikelihood, c.values["loglik"][0])
		}
		if d := math.Abs(m.Variance/c.values["sigma2"][0] - 1); d > 1e-8 {
			t.Errorf("%s: σ² %.12g, statsmodels %.12g", c.name, m.Variance, c.values["sigma2"][0])
		}
		shrunk := c.reference(t, w, 0.8)
		if d := math.Abs(shrunk.LogLikelihood - c.values["shrunk_loglik"][0]); d > 1e-8*math.Max(1, math.Abs(shrunk.LogLikelihood)) {
			t.Errorf("%s: log-likelihood at shrunk parameters %.12f, statsmodels %.12f", c.name, shrunk.LogLikelihood, c.values["shrunk_loglik"][0])
		}
		f, err := ForecastARMA(z, c.in, m, 24, 0.95)
		if err != nil || f.Status != stats.StatusOK {
			t.Fatalf("%s: ForecastARMA: %v %s", c.name, err, f.Status)
		}
		worst := 0.0
		for _, k := range []struct {
			name string
			got  []float64
		}{{"forecast", f.Mean}, {"lower", f.Lower}, {"upper", f.Upper}} {
			for h, want := range c.values[k.name] {
				d := math.Abs(k.got[h]-want) / math.Max(1, math.Abs(want))
				worst = math.Max(worst, d)
				if d > 1e-6 {
					t.Errorf("%s: %s[%d] = %.12g, statsmodels %.12g", c.name, k.name, h+1, k.got[h], want)
				}
			}
		}
		t.Logf("%s: log L difference %.2g, largest forecast or bound difference %.2g", c.name, m.LogLikelihood-c.values["loglik"][0], worst)
	}
}

// TestFitARMAAgainstReference is the loose check: plumb's own optimum
// (FitARMA from its default start) against statsmodels' lbfgs optimum:
// log-likelihood and coefficients to 1e-5, forecasts and bounds to 1e-6
// relative (python3-statsmodels 0.13.5, arma_statsmodels.py).
func TestFitARMAAgainstReference(t *testing.T) {
	cases, series := readARMACases(t)
	for _, c := range cases {
		z := c.z(t, series)
		w := c.in.Apply(z)
		m, err := FitARMA(w, c.order, nil)
		if err != nil || m.Status != stats.StatusOK {
			t.Fatalf("%s: FitARMA: %v %s", c.name, err, m.Status)
		}
		if m.LogLikelihood < c.values["loglik"][0]-1e-5 {
			t.Errorf("%s: log-likelihood %.10f below statsmodels' %.10f", c.name, m.LogLikelihood, c.values["loglik"][0])
		}
		coef, fc := 0.0, 0.0
		for _, k := range []struct {
			name string
			got  []float64
		}{{"ar", m.AR}, {"ma", m.MA}, {"seasonal_ar", m.SeasonalAR}, {"seasonal_ma", m.SeasonalMA}} {
			for i, want := range c.values[k.name] {
				coef = math.Max(coef, math.Abs(k.got[i]-want))
				if math.Abs(k.got[i]-want) > 1e-5 {
					t.Errorf("%s: %s[%d] = %.9f, statsmodels %.9f", c.name, k.name, i+1, k.got[i], want)
				}
			}
		}
		if c.order.WithMean {
			if want := c.values["mean"][0]; math.Abs(m.Mean-want) > 1e-5*math.Max(1, math.Abs(want)) {
				t.Errorf("%s: mean %.9g, statsmodels %.9g", c.name, m.Mean, want)
			}
		}
		f, err := ForecastARMA(z, c.in, m, 24, 0.95)
		if err != nil || f.Status != stats.StatusOK {
			t.Fatalf("%s: ForecastARMA: %v %s", c.name, err, f.Status)
		}
		for _, k := range []struct {
			name string
			got  []float64
		}{{"forecast", f.Mean}, {"lower", f.Lower}, {"upper", f.Upper}} {
			for h, want := range c.values[k.name] {
				d := math.Abs(k.got[h]-want) / math.Max(1, math.Abs(want))
				fc = math.Max(fc, d)
				if d > 1e-6 {
					t.Errorf("%s: %s[%d] = %.10g, statsmodels %.10g", c.name, k.name, h+1, k.got[h], want)
				}
			}
		}
		t.Logf("%s: log L %.10f (statsmodels %.10f), difference %.2g; largest coefficient difference %.2g, forecast or bound %.2g",
			c.name, m.LogLikelihood, c.values["loglik"][0], m.LogLikelihood-c.values["loglik"][0], coef, fc)
	}
}

// TestARMAFastLikelihood: the Chandrasekhar recursions (fastSums) give the
// full Kalman filter's sums (plumb's own, checked against statsmodels
// above) to 1e-10 relative, at statsmodels' optimum and at 0.8 times it,
// on every reference case.
func TestARMAFastLikelihood(t *testing.T) {
	cases, series := readARMACases(t)
	for _, c := range cases {
		w := c.in.Apply(c.z(t, series))
		for _, shrink := range []float64{1, 0.8} {
			m := c.reference(t, w, shrink)
			a, b := expandARMA(m.AR, m.MA, m.SeasonalAR, m.SeasonalMA, c.order.Period)
			ss := newARMAStateSpace(a, b)
			x := make([]float64, len(w))
			for i, v := range w {
				x[i] = v - m.Mean
			}
			full := ss.filter(x, false)
			sq, lf, ok := ss.fastSums(x)
			if !ok || !full.OK {
				t.Fatalf("%s: fast %v, full %v", c.name, ok, full.OK)
			}
			if math.Abs(sq/full.SumSquares-1) > 1e-10 || math.Abs(lf-full.SumLogF) > 1e-10*math.Max(1, math.Abs(full.SumLogF)) {
				t.Errorf("%s ×%.1f: fast sums %.15g, %.15g; full filter %.15g, %.15g", c.name, shrink, sq, lf, full.SumSquares, full.SumLogF)
			}
		}
	}
}
