package numeric

// LagDots sets out[l] = Σ_{r<len(a)} a[r]·b[L-l+r] for l = 0..L, L =
// len(out)-1: the dot products of a with the L+1 windows of b that start
// L-l elements in (b must hold len(a)+L values). With b a series and a a
// column of the same sample, out[l] is a's product with the series lagged
// l steps, which is how ADF's cross products and autocovariances are built.
//
// Four lags share each load of a, and each lag keeps two running sums, so
// eight additions are in flight at once, which is faster than one dot
// product per lag (BenchmarkLagDots; DEVELOPERS.md has the measurement).
func LagDots(a, b, out []float64) {
	n := len(a)
	L := len(out) - 1
	l := 0
	for ; l+4 <= len(out); l += 4 {
		b0 := b[L-l : L-l+n]
		b1 := b[L-l-1 : L-l-1+n]
		b2 := b[L-l-2 : L-l-2+n]
		b3 := b[L-l-3 : L-l-3+n]
		var s0, s1, s2, s3, t0, t1, t2, t3 float64
		r := 0
		for ; r+1 < n; r += 2 {
			a0, a1 := a[r], a[r+1]
			s0 += a0 * b0[r]
			s1 += a0 * b1[r]
			s2 += a0 * b2[r]
			s3 += a0 * b3[r]
			t0 += a1 * b0[r+1]
			t1 += a1 * b1[r+1]
			t2 += a1 * b2[r+1]
			t3 += a1 * b3[r+1]
		}
		if r < n {
			s0 += a[r] * b0[r]
			s1 += a[r] * b1[r]
			s2 += a[r] * b2[r]
			s3 += a[r] * b3[r]
		}
		out[l], out[l+1], out[l+2], out[l+3] = s0+t0, s1+t1, s2+t2, s3+t3
	}
	for ; l < len(out); l++ {
		out[l] = Dot(a, b[L-l:L-l+n])
	}
}
