package unitroot

import (
	"testing"

	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// BenchmarkADF: AIC lag choice at T = 1000 with the default maximum lag
// (floor(12·10^(1/4)) = 21 lags, 22 nested models), then the re-fit.
func BenchmarkADF(b *testing.B) {
	x := testseries.RandomWalk(1000, 1)
	b.ReportAllocs()
	for b.Loop() {
		ADF(x, ADFOptions{})
	}
}

func BenchmarkKPSS(b *testing.B) {
	x := testseries.RandomWalk(1000, 1)
	b.ReportAllocs()
	for b.Loop() {
		KPSS(x, KPSSOptions{})
	}
}

func BenchmarkPhillipsPerron(b *testing.B) {
	x := testseries.RandomWalk(1000, 1)
	b.ReportAllocs()
	for b.Loop() {
		PhillipsPerron(x, PPOptions{})
	}
}

func BenchmarkDFGLS(b *testing.B) {
	x := testseries.RandomWalk(1000, 1)
	b.ReportAllocs()
	for b.Loop() {
		DFGLS(x, DFGLSOptions{})
	}
}
