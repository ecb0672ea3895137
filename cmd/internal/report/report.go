// Package report renders plumb's HTML report: counts by verdict, the ranked
// table, and for each of the worst groups a panel with the series and its
// rolling mean and spread, the series after its recommended transform, its
// autocorrelation, and its forecasts with their intervals. The file is self-contained: inline SVG and CSS,
// nothing fetched from anywhere.
package report

import (
	"context"
	"database/sql"
	"fmt"
	"html/template"
	"io"
	"math"
	"strings"
	"time"

	"github.com/plumb-sql/plumb/cmd/internal/diagnosis"
	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/defaults"
	"github.com/plumb-sql/plumb/stats/forecast"
	"github.com/plumb-sql/plumb/stats/verdict"
	"github.com/plumb-sql/plumb/udf"
)

// Options say what to show.
type Options struct {
	Top   int    // groups with panels (and rows in the ranked table)
	Title string // page title; empty for a default
}

// Counts tallies the verdicts and their causes.
type Counts struct {
	Groups, Stationary, Mean, Spread, Seasonal, Failed int
	// Why the mean moves, the spread changes, the pattern repeats.
	UnitRoot, Trend, Shift, SpreadLevel, SpreadTime, Fixed, Drifting int
	// Groups with intermittent or lumpy demand, with outliers set aside,
	// and whose recipe does not cure them.
	Intermittent, Outliers, NotCured int
}

// Row is one ranked group as the table shows it.
type Row struct {
	Rank  int64
	Group string
	Cells []string // in Columns order
}

// Columns are the ranked table's columns after rank and group.
var Columns = []string{"n", "status", "violations", "causes", "d", "D", "Box-Cox λ", "cured", "score", "ADF p", "KPSS p", "mean p", "spread p", "KPSS q"}

// Panel is one group's three pictures.
type Panel struct {
	Rank                                    int64
	Group, Verdict                          string
	Series, Transformed, Autocorr, Forecast template.HTML
}

type page struct {
	Title, Source, Generated string
	Counts                   Counts
	Columns                  []string
	Rows                     []Row
	Panels                   []Panel
}

// Render diagnoses spec on conn and writes the report to w. It returns the
// ranked rows it showed, for the caller (and the tests) to check.
func Render(ctx context.Context, conn *sql.Conn, spec diagnosis.Spec, opts Options, w io.Writer) ([]Row, error) {
	if opts.Top <= 0 {
		opts.Top = 12
	}
	const table = "plumb_report_diagnosis"
	if _, err := spec.Materialize(ctx, conn, table); err != nil {
		return nil, err
	}
	pg := page{Title: opts.Title, Source: spec.Source, Generated: time.Now().UTC().Format("2006-01-02 15:04 UTC"), Columns: Columns}
	if pg.Title == "" {
		pg.Title = "Stationarity of " + spec.Source
	}
	var err error
	if pg.Counts, err = counts(ctx, conn, table); err != nil {
		return nil, err
	}
	if pg.Rows, err = ranked(ctx, conn, table, spec, opts.Top); err != nil {
		return nil, err
	}
	if pg.Panels, err = panels(ctx, conn, table, spec, opts.Top); err != nil {
		return nil, err
	}
	if err := pageTemplate.Execute(w, pg); err != nil {
		return nil, err
	}
	return pg.Rows, nil
}

func counts(ctx context.Context, conn *sql.Conn, table string) (Counts, error) {
	var c Counts
	err := conn.QueryRowContext(ctx, fmt.Sprintf(`SELECT count(*),
		count(*) FILTER (WHERE stationary),
		count(*) FILTER (WHERE list_contains(violations, 'mean')),
		count(*) FILTER (WHERE list_contains(violations, 'spread')),
		count(*) FILTER (WHERE list_contains(violations, 'seasonal')),
		count(*) FILTER (WHERE stationary IS NULL),
		count(*) FILTER (WHERE mean_cause = 'unit_root'), count(*) FILTER (WHERE mean_cause = 'trend'),
		count(*) FILTER (WHERE mean_cause = 'level_shift'),
		count(*) FILTER (WHERE spread_cause = 'level'), count(*) FILTER (WHERE spread_cause = 'time'),
		count(*) FILTER (WHERE seasonal_kind = 'fixed'), count(*) FILTER (WHERE seasonal_kind = 'drifting'),
		count(*) FILTER (WHERE demand_class IN ('intermittent', 'lumpy')), count(*) FILTER (WHERE outliers > 0),
		count(*) FILTER (WHERE NOT cured)
		FROM %s`, udf.QuoteIdent(table))).Scan(&c.Groups, &c.Stationary, &c.Mean, &c.Spread, &c.Seasonal, &c.Failed,
		&c.UnitRoot, &c.Trend, &c.Shift, &c.SpreadLevel, &c.SpreadTime, &c.Fixed, &c.Drifting,
		&c.Intermittent, &c.Outliers, &c.NotCured)
	return c, err
}

// groupExpr renders a group's key as "col=value, col=value" in SQL.
func groupExpr(spec diagnosis.Spec) string {
	parts := make([]string, len(spec.By))
	for i, b := range spec.By {
		parts[i] = fmt.Sprintf("%s || coalesce(%s::VARCHAR, 'NULL')", udf.QuoteLiteral(b+"="), udf.QuoteIdent(b))
	}
	return "concat_ws(', ', " + strings.Join(parts, ", ") + ")"
}

func ranked(ctx context.Context, conn *sql.Conn, table string, spec diagnosis.Spec, top int) ([]Row, error) {
	q := fmt.Sprintf(`SELECT rank, %s, n, status, array_to_string(violations, ', '), %s, differences, seasonal_differences,
		box_cox_lambda, cured, score, adf_p_value, kpss_p_value, mean_p_value, spread_p_value, kpss_q_value
		FROM %s ORDER BY rank, 2 LIMIT %d`, groupExpr(spec), diagnosis.CausesSQL, udf.QuoteIdent(table), top)
	rows, err := conn.QueryContext(ctx, q)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var out []Row
	for rows.Next() {
		var r Row
		vals := make([]any, len(Columns))
		ptrs := []any{&r.Rank, &r.Group}
		for i := range vals {
			ptrs = append(ptrs, &vals[i])
		}
		if err := rows.Scan(ptrs...); err != nil {
			return nil, err
		}
		for _, v := range vals {
			r.Cells = append(r.Cells, FormatCell(v))
		}
		out = append(out, r)
	}
	return out, rows.Err()
}

// FormatCell renders a table value: NULL as "–", numbers with up to four
// significant decimals.
func FormatCell(v any) string {
	switch x := v.(type) {
	case nil:
		return "–"
	case float64:
		if math.IsNaN(x) {
			return "–"
		}
		if x != 0 && math.Abs(x) < 1e-4 {
			return fmt.Sprintf("%.1e", x)
		}
		return strings.TrimRight(strings.TrimRight(fmt.Sprintf("%.4f", x), "0"), ".")
	default:
		return fmt.Sprint(x)
	}
}

// panels fetches the top groups' series in one query and draws them.
func panels(ctx context.Context, conn *sql.Conn, table string, spec diagnosis.Spec, top int) ([]Panel, error) {
	from, err := udf.SourceSQL(spec.Source)
	if err != nil {
		return nil, err
	}
	by := make([]string, len(spec.By))
	for i, b := range spec.By {
		by[i] = udf.QuoteIdent(b)
	}
	byList := strings.Join(by, ", ")
	at, value := udf.QuoteIdent(spec.At), udf.QuoteIdent(spec.Value)
	q := fmt.Sprintf(`WITH top AS (SELECT %[1]s, rank, status, reason, period
		FROM %[2]s ORDER BY rank, %[1]s LIMIT %[3]d)
		SELECT top.rank, %[4]s, top.status, top.reason, top.period,
		       list(src.%[5]s ORDER BY src.%[5]s), list(src.%[6]s::DOUBLE ORDER BY src.%[5]s)
		FROM (SELECT * FROM %[7]s) AS src JOIN top USING (%[1]s)
		GROUP BY ALL ORDER BY top.rank, 2`,
		byList, udf.QuoteIdent(table), top, groupExpr(spec), at, value, from)
	rows, err := conn.QueryContext(ctx, q)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var out []Panel
	for rows.Next() {
		var p Panel
		var status, reason sql.NullString
		var period sql.NullInt64
		var atList, valueList any
		if err := rows.Scan(&p.Rank, &p.Group, &status, &reason, &period, &atList, &valueList); err != nil {
			return nil, err
		}
		p.Verdict = reason.String
		if p.Verdict == "" {
			p.Verdict = "not judged: " + status.String
		}
		if err := drawPanel(&p, spec, atList, valueList, period); err != nil {
			return nil, fmt.Errorf("plots for %s: %w", p.Group, err)
		}
		out = append(out, p)
	}
	return out, rows.Err()
}

// drawPanel makes the three pictures of one group. The transformed series
// is the group's own recipe (verdict.Stationarity with diagnose's period and
// level) applied to its values; a group with missing values, which diagnose
// may have filled, gets none.
func drawPanel(p *Panel, spec diagnosis.Spec, atList, valueList any, period sql.NullInt64) error {
	x, err := xAxis(atList, spec.At)
	if err != nil {
		return err
	}
	vals, _ := valueList.([]any)
	y := make([]float64, len(vals))
	for i, v := range vals {
		if f, ok := v.(float64); ok {
			y[i] = f
		} else {
			y[i] = math.NaN()
		}
	}
	width := defaults.RollingWidth
	if period.Valid && period.Int64 > 1 {
		width = int(max(period.Int64, 7))
	}
	width = max(2, min(width, len(y)/4))
	roll, err := stats.Rolling(y, width)
	if err != nil {
		return err
	}
	svg, err := seriesSVG(x, y, roll.Mean, roll.SD, spec.Value, width)
	if err != nil {
		return err
	}
	p.Series = template.HTML(svg)

	missing := `<p class="missing">no transformed series: %s</p>`
	v, err := verdict.Stationarity(y, verdict.StationarityOptions{Period: int(period.Int64), Alpha: spec.Alpha})
	switch {
	case err != nil:
		return err
	case v.Status != stats.StatusOK && v.Status != stats.StatusSeasonUnknown:
		p.Transformed = template.HTML(fmt.Sprintf(missing, template.HTMLEscapeString(string(v.Status))))
	default:
		recipe := v.Recipe()
		title := spec.Value + " after its recipe"
		if recipe.Identity() {
			title = spec.Value + " (no transform recommended)"
		}
		t, status, err := recipe.Apply(y)
		if err != nil || status != stats.StatusOK {
			p.Transformed = template.HTML(fmt.Sprintf(missing, template.HTMLEscapeString(string(status))))
			break
		}
		tx := axis{x: x.x[recipe.Lost():], isTime: x.isTime, label: x.label}
		if svg, err = lineSVG(title, tx, t, "transformed "+spec.Value); err != nil {
			return err
		}
		p.Transformed = template.HTML(svg)
		if svg, err = forecastPicture(spec, x, y, v); err != nil {
			return err
		}
		p.Forecast = template.HTML(svg)
	}
	lags := min(len(y)/4, 40)
	if period.Valid && period.Int64 > 1 {
		lags = min(len(y)/4, max(lags, int(3*period.Int64)))
	}
	clean := make([]float64, 0, len(y))
	for _, v := range y {
		if !math.IsNaN(v) {
			clean = append(clean, v)
		}
	}
	if acf := stats.Autocorrelation(clean, lags); len(acf) > 0 {
		if svg, err = acfSVG("autocorrelation of "+spec.Value+", ±1.96/√n bounds", acf, len(clean)); err != nil {
			return err
		}
		p.Autocorr = template.HTML(svg)
	} else {
		p.Autocorr = template.HTML(`<p class="missing">no autocorrelation: the series is constant or too short</p>`)
	}
	return nil
}

// forecastPicture forecasts a group through its own recipe (as the
// forecast table function does, 95% intervals) for a tenth of its length,
// at most 60 steps, and draws the last three horizons of history before
// the forecasts.
func forecastPicture(spec diagnosis.Spec, x axis, y []float64, v verdict.StationarityResult) (string, error) {
	missing := `<p class="missing">no forecast: %s</p>`
	h := max(1, min(60, len(y)/10))
	rec := v.Recipe()
	f, err := forecast.ForecastByRecipe(v.Judged(), rec, forecast.RecipeForecastOptions{Horizon: h, Coverage: defaults.Coverage, AR: forecast.AROptions{Period: rec.Period}})
	if err != nil {
		return "", err
	}
	if f.Status != stats.StatusOK || len(x.x) < 2 {
		return fmt.Sprintf(missing, template.HTMLEscapeString(string(f.Status))), nil
	}
	n := len(y)
	step := x.x[n-1] - x.x[n-2]
	fx := axis{x: make([]float64, h), isTime: x.isTime, label: x.label}
	for i := range fx.x {
		fx.x[i] = x.x[n-1] + float64(i+1)*step
	}
	from := max(0, n-3*h)
	hist := axis{x: x.x[from:], isTime: x.isTime, label: x.label}
	return forecastSVG(fmt.Sprintf("%s: the last values and %d forecasts, 95%% intervals", spec.Value, h), hist, y[from:], fx, f.Mean, f.Lower, f.Upper, spec.Value)
}

// xAxis turns the at values into plot coordinates.
func xAxis(atList any, label string) (axis, error) {
	list, _ := atList.([]any)
	a := axis{x: make([]float64, len(list)), label: label}
	for i, v := range list {
		switch t := v.(type) {
		case time.Time:
			a.x[i], a.isTime = float64(t.Unix()), true
		case int64:
			a.x[i] = float64(t)
		case int32:
			a.x[i] = float64(t)
		case int16:
			a.x[i] = float64(t)
		case float64:
			a.x[i] = t
		default:
			return a, fmt.Errorf("cannot draw %T values on the time axis", v)
		}
	}
	return a, nil
}
