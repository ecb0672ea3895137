package bench

import (
	"context"
	"fmt"
	"image/color"
	"io"
	"math"
	"os"
	"sort"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Point is one size of the scaling grid with its measured phases.
type Point struct {
	Groups, Length int
	Results        []Result
}

// ScalingGrid is the grid the README reports: G ∈ {1k, 10k, 100k} at
// T = 500, and T ∈ {100, 1k, 10k} at G = 1k.
var ScalingGrid = [][2]int{{1000, 500}, {10000, 500}, {100000, 500}, {1000, 100}, {1000, 1000}, {1000, 10000}}

// Scaling measures every size of grid, with base's directory, layout and
// repeats, and writes a Markdown table to w and the two curves to plotPath
// (SVG), unless plotPath is empty.
func Scaling(ctx context.Context, base Config, self string, grid [][2]int, w io.Writer, plotPath string) ([]Point, error) {
	var points []Point
	for _, gt := range grid {
		cfg := base
		cfg.Groups, cfg.Length, cfg.Reference = gt[0], gt[1], 0
		res, err := Run(ctx, cfg, self, io.Discard)
		if err != nil {
			return points, err
		}
		// The generated file is large at 100k groups; keep the disk tidy.
		if path, _, err := dataFile(cfg); err == nil {
			os.Remove(path)
		}
		points = append(points, Point{Groups: gt[0], Length: gt[1], Results: res})
		fmt.Fprintf(os.Stderr, "measured G=%d T=%d\n", gt[0], gt[1])
	}
	fmt.Fprintln(w, "| groups G | length T | floor wall | floor RSS | diagnose wall | diagnose groups/s | diagnose RSS | diagnose / floor |")
	fmt.Fprintln(w, "|---|---|---|---|---|---|---|---|")
	for _, p := range points {
		f, d := find(p.Results, PhaseFloor), find(p.Results, PhaseDiagnose)
		fmt.Fprintf(w, "| %d | %d | %.2f s | %.0f MB | %.2f s | %.0f | %.0f MB | %.1f× |\n", p.Groups, p.Length,
			f.Wall.Seconds(), mb(f.PeakRSS), d.Wall.Seconds(), float64(p.Groups)/d.Wall.Seconds(), mb(d.PeakRSS), d.Wall.Seconds()/f.Wall.Seconds())
	}
	if plotPath != "" {
		return points, plotScaling(points, plotPath)
	}
	return points, nil
}

func find(rs []Result, p Phase) Result {
	for _, r := range rs {
		if r.Phase == string(p) {
			return r
		}
	}
	return Result{}
}

func mb(b int64) float64 { return float64(b) / (1 << 20) }

// plotScaling draws wall time against G (at T = 500) and against T (at
// G = 1,000), for the floor and for diagnose, on log-log axes.
func plotScaling(points []Point, path string) error {
	c := vgsvg.New(9*vg.Inch, 3.6*vg.Inch)
	dc := draw.New(c)
	tiles := draw.Tiles{Rows: 1, Cols: 2, PadX: vg.Inch / 4, PadTop: vg.Inch / 8, PadBottom: vg.Inch / 8, PadLeft: vg.Inch / 8, PadRight: vg.Inch / 8}
	panels := []struct {
		title, x string
		keep     func(Point) bool
		at       func(Point) float64
	}{
		{"wall time against groups (T = 500)", "groups G", func(p Point) bool { return p.Length == 500 }, func(p Point) float64 { return float64(p.Groups) }},
		{"wall time against length (G = 1,000)", "observations per group T", func(p Point) bool { return p.Groups == 1000 }, func(p Point) float64 { return float64(p.Length) }},
	}
	for i, panel := range panels {
		p := plot.New()
		p.Title.Text = panel.title
		p.X.Label.Text = panel.x
		p.Y.Label.Text = "wall time (s)"
		p.X.Scale, p.Y.Scale = plot.LogScale{}, plot.LogScale{}
		p.X.Tick.Marker, p.Y.Tick.Marker = plot.LogTicks{Prec: -1}, plot.LogTicks{Prec: -1}
		p.Add(plotter.NewGrid())
		for j, phase := range []Phase{PhaseFloor, PhaseDiagnose} {
			var xy plotter.XYs
			for _, pt := range points {
				if panel.keep(pt) {
					xy = append(xy, plotter.XY{X: panel.at(pt), Y: math.Max(find(pt.Results, phase).Wall.Seconds(), 1e-3)})
				}
			}
			if len(xy) == 0 {
				continue
			}
			sort.Slice(xy, func(a, b int) bool { return xy[a].X < xy[b].X })
			line, pts, err := plotter.NewLinePoints(xy)
			if err != nil {
				return err
			}
			col := plotter.DefaultLineStyle.Color
			if j == 1 {
				col = seriesColorBench
			}
			line.Color, pts.Color = col, col
			p.Add(line, pts)
			p.Legend.Add(strings.ReplaceAll(string(phase), "_", " "), line, pts)
		}
		p.Legend.Top, p.Legend.Left = true, true
		p.Draw(tiles.At(dc, i, 0))
	}
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	defer f.Close()
	_, err = c.WriteTo(f)
	return err
}

// seriesColorBench tells diagnose's curve from the floor's.
var seriesColorBench = color.RGBA{R: 200, G: 90, B: 20, A: 255}

// LargeRow is the size of the bounded-memory row: a million groups of a
// year of days, 365 million rows (a 3 GB Parquet file).
var LargeRow = [2]int{1000000, 365}

// Large measures diagnose at LargeRow with DuckDB's default memory_limit
// and under base.MemoryLimit ("4GB" when empty), with base's directory,
// layout and repeats, and writes a Markdown table to w. DuckDB's floor is
// not run: its ordered lists cannot spill and need more memory than the
// default limit allows at this size.
func Large(ctx context.Context, base Config, self string, w io.Writer) ([]Result, error) {
	cfg := base
	cfg.Groups, cfg.Length, cfg.Reference = LargeRow[0], LargeRow[1], 0
	if cfg.MemoryLimit == "" {
		cfg.MemoryLimit = "4GB"
	}
	res, err := RunPhases(ctx, cfg, self, []Phase{PhaseDiagnose}, io.Discard)
	if err != nil {
		return res, err
	}
	fmt.Fprintln(w, "| groups G | length T | memory_limit | diagnose wall | groups/s | peak RSS | wall against the default limit |")
	fmt.Fprintln(w, "|---|---|---|---|---|---|---|")
	for _, r := range res {
		limit := r.MemoryLimit
		if limit == "" {
			limit = "default (80% of RAM)"
		}
		fmt.Fprintf(w, "| %d | %d | %s | %.1f s | %.0f | %.2f GB | %.2f× |\n", cfg.Groups, cfg.Length, limit, r.Wall.Seconds(),
			float64(cfg.Groups)/r.Wall.Seconds(), float64(r.PeakRSS)/1e9, r.Wall.Seconds()/res[0].Wall.Seconds())
	}
	return res, nil
}
