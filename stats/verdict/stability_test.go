package verdict

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
	"sync"
	"testing"

	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/internal/testseries"
)

// TestMannKendallMatchesPairCount checks the O(n log n) count against the
// definition S = Σ_{i<j} sign(x_j - x_i) counted pair by pair, with ties.
func TestMannKendallMatchesPairCount(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	for _, n := range []int{3, 10, 57, 200} {
		x := make([]float64, n)
		for i := range x {
			x[i] = math.Round(rng.NormFloat64()*3) + 0.02*float64(i) // rounding makes ties
		}
		var s float64
		for i := 0; i < n; i++ {
			for j := i + 1; j < n; j++ {
				switch {
				case x[j] > x[i]:
					s++
				case x[j] < x[i]:
					s--
				}
			}
		}
		ties := map[float64]float64{}
		for _, v := range x {
			ties[v]++
		}
		nf := float64(n)
		variance := nf * (nf - 1) * (2*nf + 5)
		for _, c := range ties {
			variance -= c * (c - 1) * (2*c + 5)
		}
		variance /= 18
		want := 0.0
		if s > 0 {
			want = (s - 1) / math.Sqrt(variance)
		} else if s < 0 {
			want = (s + 1) / math.Sqrt(variance)
		}
		if z, _ := MannKendall(x); math.Abs(z-want) > 1e-12 {
			t.Errorf("n=%d: Z %v, want %v", n, z, want)
		}
	}
}

// TestStabilitySize: on 500 seeded AR(1) series (φ = 0.5, T = 500) the
// long-run-variance Wald tests of segment means and spreads reject at 5% in
// 5% ± 3% of series; the classic Brown-Forsythe test, which assumes
// independence, is reported for contrast. On 500 series whose spread grows
// fourfold, the spread test rejects in more than 90%.
func TestStabilitySize(t *testing.T) {
	if testing.Short() {
		t.Skip("a seeded simulation: runs without -short")
	}
	rng := rand.New(rand.NewPCG(23, 24))
	const reps, n = 500, 500
	var meanRej, spreadRej, classic, grow int
	x := make([]float64, n)
	for r := 0; r < reps; r++ {
		a := rng.NormFloat64() / 0.866
		for i := range x {
			a = 0.5*a + rng.NormFloat64()
			x[i] = a
		}
		s, _ := Stability(x, StabilityOptions{})
		if s.MeanPValue < 0.05 {
			meanRej++
		}
		if s.SpreadPValue < 0.05 {
			spreadRej++
		}
		if s.BrownForsytheP < 0.05 {
			classic++
		}
		for i := range x {
			x[i] *= 1 + 3*float64(i)/float64(n-1)
		}
		if s, _ := Stability(x, StabilityOptions{}); s.SpreadPValue < 0.05 {
			grow++
		}
	}
	rate := func(k int) float64 { return float64(k) / reps }
	t.Logf("AR(1) φ=0.5: means rejected %.3f, spreads %.3f, classic Brown-Forsythe %.3f; growing spread detected %.3f",
		rate(meanRej), rate(spreadRej), rate(classic), rate(grow))
	if r := rate(meanRej); r < 0.02 || r > 0.08 {
		t.Errorf("means test size %.3f, want 0.05 ± 0.03", r)
	}
	if r := rate(spreadRej); r < 0.02 || r > 0.08 {
		t.Errorf("spread test size %.3f, want 0.05 ± 0.03", r)
	}
	if r := rate(grow); r < 0.90 {
		t.Errorf("growing spread detected %.3f, want above 0.90", r)
	}
}

func TestStabilityBadInput(t *testing.T) {
	for _, test := range []struct {
		x    []float64
		want stats.Status
	}{
		{nil, stats.StatusTooShort},
		{[]float64{1, 2, 3}, stats.StatusTooShort},
		{[]float64{2, 2, 2, 2, 2, 2, 2, 2, 2, 2, 2, 2}, stats.StatusConstant},
		{[]float64{1, 2, 3, 4, 5, 6, math.NaN(), 8, 9, 10, 11}, stats.StatusNonFinite},
	} {
		r, err := Stability(test.x, StabilityOptions{})
		if err != nil || r.Status != test.want || !math.IsNaN(r.MeanPValue) {
			t.Errorf("%v: %s %v (p %v), want %s", test.x, r.Status, err, r.MeanPValue, test.want)
		}
	}
	if _, err := Stability(make([]float64, 20), StabilityOptions{Segments: 1}); err == nil {
		t.Error("one segment gave no error")
	}
	// Segments aligned to the period: 730 days with period 7 cut into
	// segments of 70 (10 weeks), the oldest taking the remainder.
	b := segmentBounds(730, 0, 7)
	if len(b) != 11 || b[10]-b[9] != 70 || b[1]-b[0] != 100 {
		t.Errorf("bounds for 730 days, period 7: %v", b)
	}
}

func TestRolling(t *testing.T) {
	r, err := stats.Rolling([]float64{1, 2, 3, 4, 5}, 3)
	if err != nil {
		t.Fatal(err)
	}
	// Plain arithmetic: means of (1,2,3), (2,3,4), (3,4,5) = 2, 3, 4; each
	// window's SD is 1; global mean 3, global SD √2.5.
	if !math.IsNaN(r.Mean[1]) || r.Mean[2] != 2 || r.Mean[4] != 4 || r.SD[3] != 1 {
		t.Errorf("rolling %v %v", r.Mean, r.SD)
	}
	if math.Abs(r.SDRatio[4]-1/math.Sqrt(2.5)) > 1e-15 || r.MeanRatio[4] != 4.0/3 || math.Abs(r.MeanDeviation[2]+1/math.Sqrt(2.5)) > 1e-15 {
		t.Errorf("ratios %v %v %v", r.SDRatio, r.MeanRatio, r.MeanDeviation)
	}
	if _, err := stats.Rolling([]float64{1, 2}, 1); err == nil {
		t.Error("width 1 gave no error")
	}
}

func TestSeasonalityDetects(t *testing.T) {
	rng := rand.New(rand.NewPCG(25, 26))
	for _, period := range []int{7, 12, 24} {
		x := make([]float64, 40*period)
		for i := range x {
			x[i] = 3*math.Sin(2*math.Pi*float64(i)/float64(period)) + rng.NormFloat64()
		}
		r, err := Seasonality(x, SeasonalityOptions{})
		if err != nil || r.Status != stats.StatusOK || r.Period != period || !r.Detected || !r.Seasonal {
			t.Errorf("period %d: %+v %v", period, r, err)
		}
	}
	// White noise: no period found, so the season is unknown and not seasonal.
	x := make([]float64, 400)
	for i := range x {
		x[i] = rng.NormFloat64()
	}
	if r, _ := Seasonality(x, SeasonalityOptions{}); r.Seasonal || r.Status != stats.StatusSeasonUnknown {
		t.Errorf("white noise: %+v", r)
	}
	// Shorter than two periods: unknown.
	if r, _ := Seasonality(x[:20], SeasonalityOptions{Period: 12}); r.Status != stats.StatusSeasonUnknown {
		t.Errorf("20 values at period 12: %s", r.Status)
	}
	if _, err := Seasonality(x, SeasonalityOptions{Period: 1}); err == nil {
		t.Error("period 1 gave no error")
	}
}

func TestStationarityBadInput(t *testing.T) {
	for _, test := range []struct {
		x    []float64
		want stats.Status
	}{
		{nil, stats.StatusTooShort},
		{[]float64{1, 2, 3, 4, 5}, stats.StatusTooShort},
		{[]float64{3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3}, stats.StatusConstant},
		{append(make([]float64, 30), math.Inf(1)), stats.StatusNonFinite},
	} {
		r, err := Stationarity(test.x, StationarityOptions{})
		if err != nil || r.Status != test.want {
			t.Errorf("%v: %s %v, want %s", test.x, r.Status, err, test.want)
		}
	}
	if _, err := Stationarity(make([]float64, 30), StationarityOptions{Alpha: 2}); err == nil {
		t.Error("alpha 2 gave no error")
	}
}

// FuzzStationarity: no input may panic, and every ok verdict is coherent.
func FuzzStationarity(f *testing.F) {
	f.Add([]byte{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20, 21, 22, 23, 24, 25, 26, 27, 28, 29, 30, 31, 32, 33, 34}, uint8(7))
	f.Add([]byte{9, 0, 9, 0, 9, 0, 9, 0, 9, 0, 9, 0, 9, 0, 9, 0, 9, 0, 9, 0, 9, 0, 9, 0, 9, 0, 9, 0, 9, 0, 9, 0, 9, 0}, uint8(0))
	f.Fuzz(func(t *testing.T, data []byte, period uint8) {
		x := make([]float64, len(data))
		for i, b := range data {
			x[i] = float64(b) * math.Pow(10, float64(int(b%9)-4))
		}
		p := int(period % 30)
		if p == 1 {
			p = 0
		}
		r, err := Stationarity(x, StationarityOptions{Period: p})
		if err != nil {
			t.Fatal(err)
		}
		if r.Status == stats.StatusOK && r.Stationary != (len(r.Violations) == 0) {
			t.Fatalf("incoherent verdict %+v", r)
		}
		if r.Differences < 0 || r.Differences > 2 || math.IsNaN(r.Score) {
			t.Fatalf("bad recommendation %+v", r)
		}
	})
}

// BenchmarkStationarity: the whole verdict at T = 1000 with period 7.
func BenchmarkStationarity(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, 1000)
	a := 0.0
	for i := range x {
		a = 0.5*a + rng.NormFloat64()
		x[i] = 100 + a + 2*math.Sin(2*math.Pi*float64(i)/7)
	}
	b.ReportAllocs()
	for b.Loop() {
		Stationarity(x, StationarityOptions{Period: 7})
	}
}

// TestMedian checks quickselect against sorting, odd and even lengths, ties.
func TestMedian(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 32))
	for n := 1; n < 60; n++ {
		x := make([]float64, n)
		for i := range x {
			x[i] = math.Round(rng.NormFloat64() * 3)
		}
		s := append([]float64(nil), x...)
		sort.Float64s(s)
		want := s[n/2]
		if n%2 == 0 {
			want = (s[n/2-1] + s[n/2]) / 2
		}
		if got := median(x); got != want {
			t.Fatalf("median of %v = %v, want %v", x, got, want)
		}
	}
}

// BenchmarkStationarityDetect: the verdict at T = 1000 with the period
// detected, on the two kinds of series plumb bench generates: a random walk
// of uniform steps, and uniform noise around a weekly sine.
func BenchmarkStationarityDetect(b *testing.B) {
	rng := rand.New(rand.NewPCG(3, 4))
	walk := make([]float64, 1000)
	weekly := make([]float64, 1000)
	w := 100.0
	for i := range walk {
		w += rng.Float64() - 0.5
		walk[i] = w
		weekly[i] = 100 + 3*math.Sin(float64(i)*0.8976) + (rng.Float64()-0.5)*4
	}
	for _, c := range []struct {
		name string
		x    []float64
	}{{"walk", walk}, {"weekly", weekly}} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				Stationarity(c.x, StationarityOptions{})
			}
		})
	}
}

// TestStationarityConcurrent: the verdicts computed on eight goroutines at
// once equal those computed one by one, so scratch slices (scratch.go) are
// never shared between calls.
func TestStationarityConcurrent(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	series := make([][]float64, 64)
	for k := range series {
		series[k] = testseries.Series(rng, 200+10*k, k)
	}
	want := make([]string, len(series))
	for k, x := range series {
		r, err := Stationarity(x, StationarityOptions{})
		if err != nil {
			t.Fatal(err)
		}
		want[k] = fmt.Sprintf("%v", r)
	}
	got := make([]string, len(series))
	var wg sync.WaitGroup
	for g := 0; g < 8; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := g; k < len(series); k += 8 {
				r, _ := Stationarity(series[k], StationarityOptions{})
				got[k] = fmt.Sprintf("%v", r)
			}
		}()
	}
	wg.Wait()
	for k := range series {
		if got[k] != want[k] {
			t.Errorf("series %d: concurrent verdict differs:\n got %s\nwant %s", k, got[k], want[k])
		}
	}
}

// TestSelectKth checks every k against sorting, and the partition around
// it, on lengths up to 130 with values from wide to all equal, and on a
// long series that is mostly zeros (intermittent demand).
func TestSelectKth(t *testing.T) {
	rng := rand.New(rand.NewPCG(33, 34))
	check := func(x []float64) {
		sorted := append([]float64(nil), x...)
		sort.Float64s(sorted)
		for k := range x {
			s := append([]float64(nil), x...)
			got := selectKth(s, k)
			if got != sorted[k] || s[k] != got {
				t.Fatalf("selectKth(%v, %d) = %v, want %v", x, k, got, sorted[k])
			}
			for i := range s {
				if (i < k && s[i] > got) || (i > k && s[i] < got) {
					t.Fatalf("selectKth(%v, %d): %v at %d is on the wrong side of %v", x, k, s[i], i, got)
				}
			}
		}
	}
	for n := 1; n <= 130; n++ {
		for _, distinct := range []int{1, 2, 5, 1000} {
			x := make([]float64, n)
			for i := range x {
				x[i] = float64(rng.IntN(distinct))
			}
			check(x)
		}
	}
	x := make([]float64, 2000)
	for i := range x {
		if rng.IntN(10) == 0 {
			x[i] = float64(1 + rng.IntN(5))
		}
	}
	for _, k := range []int{0, 1000, 1799, 1800, 1999} {
		s := append([]float64(nil), x...)
		sorted := append([]float64(nil), x...)
		sort.Float64s(sorted)
		if got := selectKth(s, k); got != sorted[k] {
			t.Fatalf("mostly zeros, k=%d: got %v, want %v", k, got, sorted[k])
		}
	}
}

// BenchmarkSelectKth: the median of a fresh segment of 100 Gaussian values
// each time, as Stability meets them (4,096 segments cycled, so that the
// branch predictor cannot learn one).
func BenchmarkSelectKth(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 1))
	const m = 4096
	data := make([][]float64, m)
	for i := range data {
		data[i] = make([]float64, 100)
		for j := range data[i] {
			data[i][j] = rng.NormFloat64()
		}
	}
	s := make([]float64, 100)
	i := 0
	for b.Loop() {
		copy(s, data[i%m])
		selectKth(s, 50)
		i++
	}
}
