package report

import (
	"bytes"
	"fmt"
	"image/color"
	"math"
	"regexp"
	"time"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

var (
	seriesColor = color.RGBA{R: 31, G: 84, B: 140, A: 255}
	meanColor   = color.RGBA{R: 200, G: 90, B: 20, A: 255}
	bandColor   = color.NRGBA{R: 230, G: 150, B: 90, A: 110} // not premultiplied: a light orange at 43% opacity
	boundColor  = color.RGBA{R: 150, G: 30, B: 30, A: 255}
)

// The plots' size as drawn; the page scales them to its width, two a row.
const plotWidth, plotHeight = 5.2 * vg.Inch, 2.2 * vg.Inch

// tickMargin is kept free right of the plot: half a date label's width.
const tickMargin = 0.45 * vg.Inch

// axis describes the x values: times (seconds since 1970, shown as dates)
// or plain numbers.
type axis struct {
	x      []float64
	isTime bool
	label  string
}

// newPlot makes a plot with labelled axes.
func newPlot(title string, x axis, yLabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = x.label
	p.Y.Label.Text = yLabel
	if x.isTime {
		p.X.Tick.Marker = plot.TimeTicks{Format: "2006-01-02", Time: func(t float64) time.Time { return time.Unix(int64(t), 0).UTC() }}
	}
	p.Add(plotter.NewGrid())
	return p
}

// seriesSVG draws the series with its rolling mean and a band of ±2 rolling
// standard deviations.
func seriesSVG(x axis, y, mean, sd []float64, yLabel string, width int) (string, error) {
	p, err := seriesPlot(x, y, mean, sd, yLabel, width)
	if err != nil {
		return "", err
	}
	return render(p)
}

// seriesPlot is seriesSVG's picture before it is drawn, for callers that
// mark more on it.
func seriesPlot(x axis, y, mean, sd []float64, yLabel string, width int) (*plot.Plot, error) {
	p := newPlot(fmt.Sprintf("%s with rolling mean ± 2 SD (window %d)", yLabel, width), x, yLabel)
	var upper, lower, mid plotter.XYs
	for i := range y {
		if math.IsNaN(mean[i]) || math.IsNaN(sd[i]) {
			continue
		}
		upper = append(upper, plotter.XY{X: x.x[i], Y: mean[i] + 2*sd[i]})
		lower = append(lower, plotter.XY{X: x.x[i], Y: mean[i] - 2*sd[i]})
		mid = append(mid, plotter.XY{X: x.x[i], Y: mean[i]})
	}
	if len(mid) > 1 {
		if err := addBand(p, upper, lower); err != nil {
			return nil, err
		}
	}
	if err := addSeries(p, points(x.x, y)); err != nil {
		return nil, err
	}
	if len(mid) > 1 {
		if err := addHighlight(p, mid, "rolling mean"); err != nil {
			return nil, err
		}
	}
	return p, nil
}

// addBand fills the area between upper and lower (each in x order).
func addBand(p *plot.Plot, upper, lower plotter.XYs) error {
	band := append(plotter.XYs{}, upper...)
	for i := len(lower) - 1; i >= 0; i-- {
		band = append(band, lower[i])
	}
	poly, err := plotter.NewPolygon(band)
	if err != nil {
		return err
	}
	poly.Color = bandColor
	poly.LineStyle.Width = 0
	p.Add(poly)
	return nil
}

// addSeries draws the series itself, thin.
func addSeries(p *plot.Plot, xy plotter.XYs) error {
	line, err := plotter.NewLine(xy)
	if err != nil {
		return err
	}
	line.Color = seriesColor
	line.Width = vg.Points(0.7)
	p.Add(line)
	return nil
}

// addHighlight draws a line over the series in the highlight colour, with
// a legend entry.
func addHighlight(p *plot.Plot, xy plotter.XYs, name string) error {
	m, err := plotter.NewLine(xy)
	if err != nil {
		return err
	}
	m.Color = meanColor
	m.Width = vg.Points(1.4)
	p.Add(m)
	p.Legend.Add(name, m)
	// The legend gets a row of its own between the title and the data, so
	// that it covers neither; at the left, icon first, so that a browser
	// font wider than the one measured here runs into empty space.
	row := p.Legend.TextStyle.Rectangle(name).Size().Y
	p.Title.Padding += row
	p.Legend.Top, p.Legend.Left = true, true
	p.Legend.YOffs = row
	return nil
}

// lineSVG draws one series.
func lineSVG(title string, x axis, y []float64, yLabel string) (string, error) {
	p := newPlot(title, x, yLabel)
	if err := addSeries(p, points(x.x, y)); err != nil {
		return "", err
	}
	return render(p)
}

// forecastSVG draws the last stretch of a series and its forecasts with
// their prediction interval as a band.
func forecastSVG(title string, x axis, y []float64, fx axis, mean, lower, upper []float64, yLabel string) (string, error) {
	p := newPlot(title, x, yLabel)
	hi, lo := points(fx.x, upper), points(fx.x, lower)
	if len(hi) > 1 && len(lo) > 1 {
		if err := addBand(p, hi, lo); err != nil {
			return "", err
		}
	}
	if err := addSeries(p, points(x.x, y)); err != nil {
		return "", err
	}
	if err := addHighlight(p, points(fx.x, mean), "forecast"); err != nil {
		return "", err
	}
	return render(p)
}

// acfSVG draws autocorrelations at lags 1..len(acf) as bars with the
// ±1.96/√n bounds of white noise.
func acfSVG(title string, acf []float64, n int) (string, error) {
	p := newPlot(title, axis{label: "lag"}, "autocorrelation")
	values := make(plotter.Values, len(acf))
	copy(values, acf)
	bars, err := plotter.NewBarChart(values, vg.Points(3))
	if err != nil {
		return "", err
	}
	bars.Color = seriesColor
	bars.LineStyle.Width = 0
	bars.XMin = 1
	p.Add(bars)
	bound := 1.96 / math.Sqrt(float64(n))
	for _, b := range []float64{bound, -bound} {
		l, err := plotter.NewLine(plotter.XYs{{X: 0.5, Y: b}, {X: float64(len(acf)) + 0.5, Y: b}})
		if err != nil {
			return "", err
		}
		l.Color = boundColor
		l.Dashes = []vg.Length{vg.Points(3), vg.Points(2)}
		p.Add(l)
	}
	p.Y.Min, p.Y.Max = math.Min(-1, p.Y.Min), 1
	return render(p)
}

// points pairs x and y, leaving out missing values.
func points(x, y []float64) plotter.XYs {
	out := make(plotter.XYs, 0, len(y))
	for i := range y {
		if !math.IsNaN(y[i]) && !math.IsInf(y[i], 0) {
			out = append(out, plotter.XY{X: x[i], Y: y[i]})
		}
	}
	return out
}

var (
	xmlHeader = regexp.MustCompile(`<\?xml[^>]*\?>\s*|<!--[^>]*-->\s*`)
	xmlns     = regexp.MustCompile(`\s*xmlns(:xlink)?="[^"]*"`)
)

// render draws p as an SVG element for inline use in HTML: the XML header
// and namespace declarations (an HTML parser supplies the SVG namespace
// itself) are dropped, so the report names no external address.
func render(p *plot.Plot) (string, error) {
	c := vgsvg.New(plotWidth, plotHeight)
	// A margin on the right, so that the last tick's label (a date is
	// centred on its tick) is not cut at the edge.
	p.Draw(draw.Crop(draw.New(c), 0, -tickMargin, 0, 0))
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return "", err
	}
	s := xmlHeader.ReplaceAllString(b.String(), "")
	return xmlns.ReplaceAllString(s, ""), nil
}
