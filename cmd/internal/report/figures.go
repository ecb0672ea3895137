package report

import (
	"fmt"
	"html/template"
	"image/color"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The report's pictures for other pages (plumb serve's explorer): the same
// helpers draw them, so both look alike. Each returns inline SVG.

// Axis is a figure's x axis: times in seconds since 1970 (shown as dates)
// when IsTime, else plain numbers.
type Axis struct {
	X      []float64
	IsTime bool
	Label  string
}

func (a Axis) inner() axis { return axis{x: a.X, isTime: a.IsTime, label: a.Label} }

// AxisOf turns a list of at values as DuckDB returns them (timestamps,
// dates, integers or numbers) into an Axis labelled label.
func AxisOf(values []any, label string) (Axis, error) {
	a, err := xAxis(values, label)
	return Axis{X: a.x, IsTime: a.isTime, Label: a.label}, err
}

// Marks are the points of a series its verdict names: the first
// observation after a level shift (-1: none) and isolated outliers
// (0-based positions).
type Marks struct {
	Shift    int
	Outliers []int
}

var (
	shiftColor   = color.RGBA{R: 120, G: 40, B: 140, A: 255}
	outlierColor = color.RGBA{R: 190, G: 20, B: 20, A: 255}
)

// RollingWidth is the window of a series picture's rolling mean and
// spread: the period (at least 7) for a seasonal series, 30 otherwise, and
// never more than a quarter of the series.
func RollingWidth(n, period int) int {
	width := 30
	if period > 1 {
		width = max(period, 7)
	}
	return max(2, min(width, n/4))
}

// AutocorrelationLags is how many lags an autocorrelation picture shows:
// up to 40, or three periods of a seasonal series, and at most a quarter of
// the series.
func AutocorrelationLags(n, period int) int {
	lags := min(n/4, 40)
	if period > 1 {
		lags = min(n/4, max(lags, 3*period))
	}
	return lags
}

// SeriesFigure draws the series with its rolling mean and ±2 rolling SD
// band (window width), as the report's first picture, with the marks: a
// dashed vertical line where a level shift starts and a circle on each
// outlier.
func SeriesFigure(x Axis, y, mean, sd []float64, yLabel string, width int, marks Marks) (template.HTML, error) {
	p, err := seriesPlot(x.inner(), y, mean, sd, yLabel, width)
	if err != nil {
		return "", err
	}
	if marks.Shift > 0 && marks.Shift < len(y) {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, v := range y {
			if !math.IsNaN(v) && !math.IsInf(v, 0) {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
		}
		if lo <= hi {
			at := x.X[marks.Shift]
			l, err := plotter.NewLine(plotter.XYs{{X: at, Y: lo}, {X: at, Y: hi}})
			if err != nil {
				return "", err
			}
			l.Color = shiftColor
			l.Width = vg.Points(1.2)
			l.Dashes = []vg.Length{vg.Points(4), vg.Points(2)}
			p.Add(l)
			p.Legend.Add("level shift", l)
		}
	}
	var out plotter.XYs
	for _, i := range marks.Outliers {
		if i >= 0 && i < len(y) && !math.IsNaN(y[i]) {
			out = append(out, plotter.XY{X: x.X[i], Y: y[i]})
		}
	}
	if len(out) > 0 {
		sc, err := plotter.NewScatter(out)
		if err != nil {
			return "", err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: outlierColor, Radius: vg.Points(3), Shape: draw.CircleGlyph{}}
		p.Add(sc)
		p.Legend.Add(fmt.Sprintf("outliers (%d)", len(out)), sc)
	}
	svg, err := render(p)
	return template.HTML(svg), err
}

// LineFigure draws one series.
func LineFigure(title string, x Axis, y []float64, yLabel string) (template.HTML, error) {
	svg, err := lineSVG(title, x.inner(), y, yLabel)
	return template.HTML(svg), err
}

// AutocorrelationFigure draws autocorrelations at lags 1..len(acf) with
// the ±1.96/√n bounds of white noise for a series of n values.
func AutocorrelationFigure(title string, acf []float64, n int) (template.HTML, error) {
	svg, err := acfSVG(title, acf, n)
	return template.HTML(svg), err
}

// ForecastFigure draws the end of a series (x, y) and its forecasts at fx
// with their interval as a band.
func ForecastFigure(title string, x Axis, y []float64, fx Axis, mean, lower, upper []float64, yLabel string) (template.HTML, error) {
	svg, err := forecastSVG(title, x.inner(), y, fx.inner(), mean, lower, upper, yLabel)
	return template.HTML(svg), err
}
