// Package report renders plumb's HTML report: counts by verdict, the ranked
// table, and for each of the worst groups a panel with the series and its
// rolling mean and spread, the series after its recommended transform, and
// its autocorrelation. The file is self-contained: inline SVG and CSS,
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
	"github.com/plumb-sql/plumb/udf"
)

// Options say what to show.
type Options struct {
	Top   int    // groups with panels (and rows in the ranked table)
	Title string // page title; empty for a default
}

// Counts tallies the verdicts.
type Counts struct {
	Groups, Stationary, Mean, Spread, Seasonal, Failed int
}

// Row is one ranked group as the table shows it.
type Row struct {
	Rank  int64
	Group string
	Cells []string // in Columns order
}

// Columns are the ranked table's columns after rank and group.
var Columns = []string{"n", "status", "violations", "d", "D", "Box-Cox λ", "score", "ADF p", "KPSS p", "mean p", "spread p", "KPSS q"}

// Panel is one group's three pictures.
type Panel struct {
	Rank                          int64
	Group, Verdict                string
	Series, Transformed, Autocorr template.HTML
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
		count(*) FILTER (WHERE stationary IS NULL)
		FROM %s`, udf.QuoteIdent(table))).Scan(&c.Groups, &c.Stationary, &c.Mean, &c.Spread, &c.Seasonal, &c.Failed)
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
	q := fmt.Sprintf(`SELECT rank, %s, n, status, array_to_string(violations, ', '), differences, seasonal_differences,
		box_cox_lambda, score, adf_p_value, kpss_p_value, mean_p_value, spread_p_value, kpss_q_value
		FROM %s ORDER BY rank, 2 LIMIT %d`, groupExpr(spec), udf.QuoteIdent(table), top)
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
	q := fmt.Sprintf(`WITH top AS (SELECT %[1]s, rank, violations, differences, seasonal_differences, box_cox_lambda, period
		FROM %[2]s ORDER BY rank, %[1]s LIMIT %[3]d)
		SELECT top.rank, %[4]s, array_to_string(top.violations, ', '), top.differences, top.seasonal_differences,
		       top.box_cox_lambda, top.period, list(src.%[5]s ORDER BY src.%[5]s), list(src.%[6]s::DOUBLE ORDER BY src.%[5]s)
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
		var violations sql.NullString
		var d, bigD, period sql.NullInt64
		var lambda sql.NullFloat64
		var atList, valueList any
		if err := rows.Scan(&p.Rank, &p.Group, &violations, &d, &bigD, &lambda, &period, &atList, &valueList); err != nil {
			return nil, err
		}
		p.Verdict = verdictText(violations.String, d, bigD, lambda, period)
		if err := drawPanel(&p, spec, atList, valueList, d, bigD, lambda, period); err != nil {
			return nil, fmt.Errorf("plots for %s: %w", p.Group, err)
		}
		out = append(out, p)
	}
	return out, rows.Err()
}

func verdictText(violations string, d, bigD sql.NullInt64, lambda sql.NullFloat64, period sql.NullInt64) string {
	if !d.Valid {
		return "not judged"
	}
	if violations == "" {
		return "stationary: no transform needed"
	}
	var steps []string
	if lambda.Valid {
		steps = append(steps, fmt.Sprintf("Box-Cox λ = %.2f", lambda.Float64))
	}
	if bigD.Int64 > 0 {
		steps = append(steps, fmt.Sprintf("seasonal difference at lag %d", period.Int64))
	}
	if d.Int64 > 0 {
		steps = append(steps, fmt.Sprintf("%d difference(s)", d.Int64))
	}
	if len(steps) == 0 {
		steps = append(steps, "no transform plumb can recommend")
	}
	return "broken: " + violations + "; recipe: " + strings.Join(steps, ", then ")
}

// drawPanel makes the three pictures of one group.
func drawPanel(p *Panel, spec diagnosis.Spec, atList, valueList any, d, bigD sql.NullInt64, lambda sql.NullFloat64, period sql.NullInt64) error {
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
	width := 30
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

	recipe := stats.Recipe{Period: int(period.Int64), SeasonalDifferences: int(bigD.Int64), Differences: int(d.Int64)}
	if lambda.Valid {
		recipe.BoxCox, recipe.Lambda = true, lambda.Float64
	}
	title := spec.Value + " after its recipe"
	if recipe.Lost() == 0 && !recipe.BoxCox {
		title = spec.Value + " (no transform recommended)"
	}
	if t, status, err := recipe.Apply(y); err == nil && status == stats.StatusOK {
		tx := axis{x: x.x[recipe.Lost():], isTime: x.isTime, label: x.label}
		if svg, err = lineSVG(title, tx, t, "transformed "+spec.Value); err != nil {
			return err
		}
		p.Transformed = template.HTML(svg)
	} else {
		p.Transformed = template.HTML(`<p class="missing">no transformed series: ` + template.HTMLEscapeString(string(status)) + `</p>`)
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
