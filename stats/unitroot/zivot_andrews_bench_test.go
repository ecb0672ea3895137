package unitroot

import (
	"fmt"
	"testing"

	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// BenchmarkZivotAndrews: one random walk of T = 730 or 1,000, each break
// kind, with the default AIC lag choice (ADF's lag search with a trend over
// 0..Schwert's maximum, then one scan of the break dates with the chosen lag:
// the mode the verdict uses, and python3-statsmodels' own) and with 12
// fixed lags (no search, a wider scan: each row costs (lags+4)²/2).
//
//	flock /work/bench.lock go test ./stats/unitroot -run XXX -bench ZivotAndrews
func BenchmarkZivotAndrews(b *testing.B) {
	twelve := 12
	for _, T := range []int{730, 1000} {
		x := testseries.RandomWalk(T, 1)
		for _, kind := range []BreakKind{BreakLevel, BreakSlope, BreakLevelAndSlope} {
			b.Run(fmt.Sprintf("T=%d/%s/aic", T, kind), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					ZivotAndrews(x, ZivotAndrewsOptions{Break: kind})
				}
			})
			b.Run(fmt.Sprintf("T=%d/%s/fixed12", T, kind), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					ZivotAndrews(x, ZivotAndrewsOptions{Break: kind, LagRule: LagGiven, MaxLag: &twelve})
				}
			})
		}
	}
}
