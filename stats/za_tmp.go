package stats

// TEMPORARY proxy until the Zivot-Andrews test lands: ADF t at a given
// break date with an intercept dummy, compared with -4.80.
func zaProxyRejects(z []float64, breakIndex, lags int) bool {
	n := len(z)
	start := lags + 1
	m := n - start
	if m < lags+10 {
		return false
	}
	cols := [][]float64{make([]float64, m), make([]float64, m)}
	for i := 0; i < m; i++ {
		t := start + i
		cols[0][i] = 1
		if t >= breakIndex {
			cols[1][i] = 1
		}
	}
	for l := 1; l <= lags; l++ {
		c := make([]float64, m)
		for i := 0; i < m; i++ {
			t := start + i
			c[i] = z[t-l] - z[t-l-1]
		}
		cols = append(cols, c)
	}
	lev := make([]float64, m)
	dep := make([]float64, m)
	for i := 0; i < m; i++ {
		t := start + i
		lev[i] = z[t-1]
		dep[i] = z[t] - z[t-1]
	}
	cols = append(cols, lev)
	var ls nestedLS
	ls.factor(cols, dep)
	if ls.rank < len(cols) {
		return false
	}
	return ls.tLast(len(cols)) < -4.80
}
