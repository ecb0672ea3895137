package stats

import "math"

// KPSSOptions configure the KPSS test. The zero value tests level
// stationarity with the automatic bandwidth.
type KPSSOptions struct {
	// Deterministic is constant (level stationarity, the default) or trend
	// (trend stationarity); none is an error.
	Deterministic Deterministic
	// Bandwidth is the Bartlett bandwidth of the long-run variance; nil
	// means HobijnBandwidth of the residuals.
	Bandwidth *int
}

// kpssTable is Kwiatkowski, Phillips, Schmidt & Shin (1992), Table 1: upper
// tail critical values at 10, 5, 2.5 and 1%.
var kpssTable = map[Deterministic][4]float64{
	DeterministicConstant: {0.347, 0.463, 0.574, 0.739},
	DeterministicTrend:    {0.119, 0.146, 0.176, 0.216},
}

var kpssLevels = [4]float64{0.10, 0.05, 0.025, 0.01}

// KPSS performs the test of Kwiatkowski, Phillips, Schmidt & Shin (1992) of
// the null hypothesis that x is stationary around a level (or a linear
// trend). With e_t the residuals of x on a constant (and trend), S_t their
// partial sums and λ² their Bartlett long-run variance (LongRunVariance),
//
//	η = Σ S_t² / (T²·λ²).
//
// The p-value interpolates linearly in the paper's Table 1; beyond the table
// it is the table's end with PValueBound saying which way the truth lies
// (at_most 0.01, at_least 0.10).
func KPSS(x []float64, opts KPSSOptions) (UnitRootResult, error) {
	d, err := opts.Deterministic.normalize()
	if err != nil {
		return UnitRootResult{}, err
	}
	if d == DeterministicNone {
		return UnitRootResult{}, errorf("kpss: deterministic terms must be constant or trend, got none")
	}
	if opts.Bandwidth != nil && *opts.Bandwidth < 0 {
		return UnitRootResult{}, errorf("kpss: the bandwidth must not be negative, got %d", *opts.Bandwidth)
	}
	fail := func(s Status) (UnitRootResult, error) { return failed("kpss", d, NullStationary, s), nil }
	if s := checkFinite(x); s != StatusOK {
		return fail(s)
	}
	T := len(x)
	if T < 2*d.terms()+2 {
		return fail(StatusTooShort)
	}
	if isConstant(x) {
		return fail(StatusConstant)
	}
	e := scaledInto(getScratch(T), x)
	defer putScratch(e)
	detrendInto(e, e, d)
	l := 0
	if opts.Bandwidth != nil {
		l = *opts.Bandwidth
		if l >= T {
			return fail(StatusTooShort)
		}
	} else {
		l = HobijnBandwidth(e)
	}
	lrv := LongRunVariance(e, l)
	if !(lrv > 0) {
		return fail(StatusSingular)
	}
	var s, eta float64
	for _, v := range e {
		s += v
		eta += s * s
	}
	stat := eta / (float64(T) * float64(T) * lrv)
	table := kpssTable[d]
	p, bound := interpolateUpperTail(stat, table, kpssLevels)
	return UnitRootResult{
		Method: "kpss", Deterministic: d, NullHypothesis: NullStationary, Status: StatusOK,
		Statistic: stat, PValue: p, PValueBound: bound,
		CriticalValues: [3]float64{table[3], table[1], table[0]},
		Lags:           l, NObs: T,
	}, nil
}

// interpolateUpperTail returns the p-value of stat by linear interpolation in
// a table of increasing critical values crit with their decreasing levels.
func interpolateUpperTail(stat float64, crit, levels [4]float64) (float64, PValueBound) {
	switch {
	case math.IsNaN(stat):
		return math.NaN(), PValueEstimate
	case stat <= crit[0]:
		return levels[0], PValueAtLeast
	case stat >= crit[3]:
		return levels[3], PValueAtMost
	}
	for i := 1; i < 4; i++ {
		if stat <= crit[i] {
			f := (stat - crit[i-1]) / (crit[i] - crit[i-1])
			return levels[i-1] + f*(levels[i]-levels[i-1]), PValueEstimate
		}
	}
	return levels[3], PValueAtMost
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
	if d != DeterministicTrend {
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
