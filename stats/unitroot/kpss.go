package unitroot

import (
	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/numeric"
)

// KPSSOptions configure the KPSS test. The zero value tests level
// stationarity with the automatic bandwidth.
type KPSSOptions struct {
	// Deterministic is level (level stationarity, the default) or
	// level_and_slope (trend stationarity); none is an error.
	Deterministic Deterministic
	// Bandwidth is the Bartlett bandwidth of the long-run variance; nil
	// means HobijnBandwidth of the residuals.
	Bandwidth *int
}

// KPSS performs the test of Kwiatkowski, Phillips, Schmidt & Shin (1992) of
// the null hypothesis that x is stationary around a level (or a linear
// trend). With e_t the residuals of x on a constant (and trend), S_t their
// partial sums and λ² their Bartlett long-run variance (LongRunVariance),
//
//	η = Σ S_t² / (T²·λ²).
//
// The p-value and the critical values come from η's asymptotic
// distribution under the null hypothesis, computed to about 1e-8 relative
// accuracy (KPSSPValue, kpss_limit.go), not from the four points of the
// paper's Table 1, so that p-values far into the tail stay usable by a
// false-discovery rule. They are asymptotic: how well they hold in finite
// samples, with the automatic bandwidth, is measured in
// TestKPSSUniform (README, "How far the p-values can be trusted"). Beyond
// P(η > x) = 1e-300 the p-value is reported as 1e-300 with PValueBound
// at_most.
func KPSS(x []float64, opts KPSSOptions) (UnitRootResult, error) {
	d, err := opts.Deterministic.normalize()
	if err != nil {
		return UnitRootResult{}, err
	}
	if d == DeterministicNone {
		return UnitRootResult{}, numeric.Errorf("kpss: deterministic terms must be level or level_and_slope, got none")
	}
	if opts.Bandwidth != nil && *opts.Bandwidth < 0 {
		return UnitRootResult{}, numeric.Errorf("kpss: the bandwidth must not be negative, got %d", *opts.Bandwidth)
	}
	fail := func(s stats.Status) (UnitRootResult, error) { return failed("kpss", d, NullStationary, s), nil }
	if s := stats.CheckFinite(x); s != stats.StatusOK {
		return fail(s)
	}
	T := len(x)
	if T < 2*d.terms()+2 {
		return fail(stats.StatusTooShort)
	}
	if numeric.IsConstant(x) {
		return fail(stats.StatusConstant)
	}
	e := numeric.ScaledInto(numeric.GetScratch(T), x)
	defer numeric.PutScratch(e)
	detrendInto(e, e, d)
	l := 0
	if opts.Bandwidth != nil {
		l = *opts.Bandwidth
		if l >= T {
			return fail(stats.StatusTooShort)
		}
	} else {
		l = HobijnBandwidth(e)
	}
	lrv := LongRunVariance(e, l)
	if !(lrv > 0) {
		return fail(stats.StatusSingular)
	}
	var s, eta float64
	for _, v := range e {
		s += v
		eta += s * s
	}
	stat := eta / (float64(T) * float64(T) * lrv)
	limit := kpssLimitFor(d)
	p, bound := limit.pValueBound(stat)
	return UnitRootResult{
		Method: "kpss", Deterministic: d, NullHypothesis: NullStationary, Status: stats.StatusOK,
		Statistic: stat, PValue: p, PValueBound: bound,
		CriticalValues: limit.critical,
		Lags:           l, Observations: T,
	}, nil
}

// detrend returns the residuals of x regressed on a constant, or on a
// constant and a linear trend (closed-form least squares).
func detrend(x []float64, d Deterministic) []float64 {
	return detrendInto(make([]float64, len(x)), x, d)
}

// detrendInto writes detrend's residuals into e (which may be x itself)
// and returns it.
func detrendInto(e, x []float64, d Deterministic) []float64 {
	T := float64(len(x))
	var mean float64
	for _, v := range x {
		mean += v
	}
	mean /= T
	if d != DeterministicLevelAndSlope {
		for i, v := range x {
			e[i] = v - mean
		}
		return e
	}
	tbar := (T - 1) / 2
	var sxy, sxx float64
	for i, v := range x {
		dt := float64(i) - tbar
		sxy += dt * (v - mean)
		sxx += dt * dt
	}
	b := sxy / sxx
	for i, v := range x {
		e[i] = v - mean - b*(float64(i)-tbar)
	}
	return e
}
