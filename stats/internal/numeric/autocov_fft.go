package numeric

import (
	"sync"

	"gonum.org/v1/gonum/dsp/fourier"
)

// Autocovariances returns γ_0..γ_maxLag of the mean-zero series e (biased,
// as autocovariance defines them). For long bandwidths it uses the
// Wiener-Khinchin route, γ = IFFT(|FFT(e zero-padded to ≥ 2n)|²)/n, which
// costs n·log n instead of n·maxLag.
func Autocovariances(e []float64, maxLag int) []float64 {
	n := len(e)
	maxLag = min(maxLag, n-1)
	if maxLag < 0 {
		return nil
	}
	out := make([]float64, maxLag+1)
	size, logSize := 1, 0
	for size < 2*n {
		size <<= 1
		logSize++
	}
	// Direct sums cost about maxLag·n; two real FFTs about 10·size·log2(size)
	// (measured on this machine); take the cheaper.
	if maxLag*n <= 10*size*logSize {
		// Σ_{t≥j} e_t·e_{t-j}: LagDots gives the terms with t ≥ maxLag for
		// every lag at once; the few earlier ones are added directly.
		LagDots(e[maxLag:], e, out)
		for j := range out {
			for t := j; t < maxLag; t++ {
				out[j] += e[t] * e[t-j]
			}
			out[j] /= float64(n)
		}
		return out
	}
	pool := fftPool(size)
	fft := pool.Get().(*fourier.FFT)
	defer pool.Put(fft)
	padded := make([]float64, size)
	copy(padded, e)
	coeff := fft.Coefficients(nil, padded)
	for i, c := range coeff {
		re, im := real(c), imag(c)
		coeff[i] = complex(re*re+im*im, 0)
	}
	seq := fft.Sequence(nil, coeff)
	// gonum's inverse is unnormalised: divide by size, then by n.
	for j := range out {
		out[j] = seq[j] / float64(size) / float64(n)
	}
	return out
}

var ffts sync.Map // size -> *sync.Pool of *fourier.FFT

// fftPool returns the pool of FFT plans of one size. A plan keeps work
// space, so one is taken from the pool for each call (DuckDB calls plumb's
// functions from several threads at once) and put back after.
func fftPool(size int) *sync.Pool {
	p, _ := ffts.LoadOrStore(size, &sync.Pool{New: func() any { return fourier.NewFFT(size) }})
	return p.(*sync.Pool)
}

// autocovariance returns γ_j = (1/n) Σ_{t>j} e_t·e_{t-j}, the biased sample
// autocovariance of a mean-zero series at lag j.
func autocovariance(e []float64, j int) float64 {
	if j >= len(e) {
		return 0
	}
	return Dot(e[j:], e[:len(e)-j]) / float64(len(e))
}
