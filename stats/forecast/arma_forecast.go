package forecast

import (
	"math"

	"github.com/plumb-sql/plumb/stats"
	"gonum.org/v1/gonum/stat/distuv"
)

// ForecastARMA forecasts z horizon steps ahead when its stationary part
// w = (1-B)^d (1-B^s)^D z follows the fitted model m (FitARMA or
// ChooseARMA on in.Apply(z)). The forecasts and their error variances come
// from the same Kalman filter as the likelihood: the filter is run over w,
// and from its prediction of the state at n+1 (mean and covariance) the
// state space is extended by the last d + D·s values of z, which the
// differencing carries forward deterministically,
//
//	z_t = μ + x_t - Σ_{j≥1} δ_j·z_{t-j},   δ(B) = (1-B)^d (1-B^s)^D,
//
// so that the h-step mean and variance of z follow by the filter's
// prediction step without data (Harvey 1989, §3.5; Durbin & Koopman 2012,
// §4.11). The variance is exact for the fitted parameters at every horizon,
// also before the filter reached its steady state (it is then larger than
// the ψ-weight formula's). The interval is mean ± Φ⁻¹((1+coverage)/2)·StdErr,
// the parameters treated as known, as SARIMAX's forecasts at fixed
// parameters do.
func ForecastARMA(z []float64, in Integration, m ARMAModel, horizon int, coverage float64) (Forecast, error) {
	if err := checkForecastArgs(horizon, coverage); err != nil {
		return Forecast{}, err
	}
	if err := in.check(); err != nil {
		return Forecast{}, err
	}
	if m.Status != stats.StatusOK {
		return failedForecast(m.Status, horizon, coverage), nil
	}
	if s := stats.CheckFinite(z); s != stats.StatusOK {
		return failedForecast(s, horizon, coverage), nil
	}
	K := in.Lost()
	if len(z) < K+2 {
		return failedForecast(stats.StatusTooShort, horizon, coverage), nil
	}
	w := in.Apply(z)
	a, b := expandARMA(m.AR, m.MA, m.SeasonalAR, m.SeasonalMA, m.Order.Period)
	ss := newARMAStateSpace(a, b)
	mean := 0.0
	if m.Order.WithMean {
		mean = m.Mean
	}
	x := make([]float64, len(w))
	for i, v := range w {
		x[i] = v - mean
	}
	res := ss.filter(x, false)
	if !res.OK {
		return failedForecast(stats.StatusSingular, horizon, coverage), nil
	}
	r := ss.r
	dim := r + K
	delta := in.polynomial()
	// The extended state: α (r values), then z_{t-1}, ..., z_{t-K}.
	state := make([]float64, dim)
	copy(state, res.Next)
	for j := 1; j <= K; j++ {
		state[r+j-1] = z[len(z)-j]
	}
	cov := make([]float64, dim*dim)
	for i := 0; i < r; i++ {
		copy(cov[i*dim:i*dim+r], res.NextCov[i*r:i*r+r])
	}
	f := Forecast{
		Mean: make([]float64, horizon), Lower: make([]float64, horizon), Upper: make([]float64, horizon),
		StdErr: make([]float64, horizon), Coverage: coverage, Status: stats.StatusOK,
	}
	q := distuv.UnitNormal.Quantile((1 + coverage) / 2)
	// obs is the row that reads z_t off the extended state.
	obs := make([]float64, dim)
	obs[0] = 1
	for j := 1; j <= K; j++ {
		obs[r+j-1] = -delta[j]
	}
	tmp := make([]float64, dim*dim)
	next := make([]float64, dim)
	for h := 0; h < horizon; h++ {
		zt := mean
		for i, c := range obs {
			zt += c * state[i]
		}
		v := 0.0
		for i, ci := range obs {
			if ci == 0 {
				continue
			}
			for j, cj := range obs {
				if cj != 0 {
					v += ci * cov[i*dim+j] * cj
				}
			}
		}
		f.Mean[h] = zt
		f.StdErr[h] = math.Sqrt(math.Max(v, 0) * m.Variance)
		f.Lower[h] = zt - q*f.StdErr[h]
		f.Upper[h] = zt + q*f.StdErr[h]
		if h == horizon-1 {
			break
		}
		// Mean: α ← T·α, the lags shift with z_t in front.
		for i := 0; i < r; i++ {
			next[i] = ss.phi[i] * state[0]
			if i+1 < r {
				next[i] += state[i+1]
			}
		}
		if K > 0 {
			next[r] = zt
			for j := 1; j < K; j++ {
				next[r+j] = state[r+j-1]
			}
		}
		copy(state, next)
		// Covariance: G·cov·Gᵀ + R·Rᵀ on the α block.
		ss.extendedStep(tmp, cov, obs, K)
		transposeSquare(cov, tmp, dim)
		ss.extendedStep(tmp, cov, obs, K)
		copy(cov, tmp)
		for i := 0; i < r; i++ {
			for j := 0; j < r; j++ {
				cov[i*dim+j] += ss.theta[i] * ss.theta[j]
			}
		}
	}
	return f, nil
}

// extendedStep sets dst = G·src for the extended state's transition G
// (rows of T for α, the observation row for the newest lag of z, a shift
// for the older lags); src and dst are (r+K)×(r+K), row-major.
func (ss *armaStateSpace) extendedStep(dst, src, obs []float64, K int) {
	r := ss.r
	dim := r + K
	row := func(i int) []float64 { return src[i*dim : i*dim+dim] }
	for i := 0; i < r; i++ {
		d := dst[i*dim : i*dim+dim]
		s0 := row(0)
		for j := range d {
			d[j] = ss.phi[i] * s0[j]
		}
		if i+1 < r {
			s1 := row(i + 1)
			for j := range d {
				d[j] += s1[j]
			}
		}
	}
	if K == 0 {
		return
	}
	d := dst[r*dim : r*dim+dim]
	for j := range d {
		d[j] = 0
	}
	for k, c := range obs {
		if c == 0 {
			continue
		}
		sk := row(k)
		for j := range d {
			d[j] += c * sk[j]
		}
	}
	for k := 1; k < K; k++ {
		copy(dst[(r+k)*dim:(r+k)*dim+dim], row(r+k-1))
	}
}

// transposeSquare sets dst = srcᵀ for n×n row-major matrices.
func transposeSquare(dst, src []float64, n int) {
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			dst[j*n+i] = src[i*n+j]
		}
	}
}
