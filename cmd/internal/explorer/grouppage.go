package explorer

import (
	"context"
	"database/sql"
	"fmt"
	"html/template"
	"math"
	"net/http"
	"strconv"
	"strings"

	"github.com/plumb-sql/plumb/cmd/internal/report"
	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/verdict"
	"github.com/plumb-sql/plumb/udf"
)

type groupData struct {
	Title, Reason                                      string
	ListHref, PrevHref, NextHref, DownloadHref         string
	InList                                             bool
	Position, Matching                                 int
	Series, Transformed, ACFBefore, ACFAfter, Forecast template.HTML
	Facts                                              []fact
	Steps                                              []string
	Tests                                              []testRow
}

type fact struct{ Label, Value string }

type testRow struct{ Name, Statistic, P, Q, Note string }

// groupRow is one row of the run's table, by column name, with the
// group's key values as text.
type groupRow struct {
	Values map[string]any
	Keys   []sql.NullString
}

func readGroupRow(ctx context.Context, conn *sql.Conn, run *run, info *runInfo, id int64) (*groupRow, error) {
	cols := make([]string, 0, len(info.Columns)+len(run.Spec.By))
	for _, c := range info.Columns {
		cols = append(cols, udf.QuoteIdent(c))
	}
	for _, b := range run.Spec.By {
		cols = append(cols, udf.QuoteIdent(b)+"::VARCHAR")
	}
	q := fmt.Sprintf("SELECT %s FROM %s WHERE plumb_id = ?", strings.Join(cols, ", "), udf.QuoteIdent(run.table))
	vals := make([]any, len(info.Columns))
	keys := make([]sql.NullString, len(run.Spec.By))
	ptrs := make([]any, 0, len(cols))
	for i := range vals {
		ptrs = append(ptrs, &vals[i])
	}
	for i := range keys {
		ptrs = append(ptrs, &keys[i])
	}
	if err := conn.QueryRowContext(ctx, q, id).Scan(ptrs...); err != nil {
		if err == sql.ErrNoRows {
			return nil, fmt.Errorf("no group %d in this diagnosis", id)
		}
		return nil, err
	}
	g := &groupRow{Values: map[string]any{}, Keys: keys}
	for i, c := range info.Columns {
		g.Values[c] = vals[i]
	}
	return g, nil
}

func (g *groupRow) int(col string) int {
	switch v := g.Values[col].(type) {
	case int64:
		return int(v)
	case int32:
		return int(v)
	case float64:
		return int(v)
	}
	return 0
}

func (g *groupRow) text(col string) string {
	v, ok := g.Values[col]
	if !ok {
		return "–"
	}
	switch x := v.(type) {
	case []any:
		parts := make([]string, len(x))
		for i, e := range x {
			parts[i] = fmt.Sprint(e)
		}
		if len(parts) == 0 {
			return "none"
		}
		return strings.Join(parts, ", ")
	case string:
		if x == "" {
			return "–"
		}
		return strings.ReplaceAll(x, "_", " ")
	}
	return report.FormatCell(v)
}

func parseGroupID(r *http.Request) (int64, error) {
	id, err := strconv.ParseInt(r.PathValue("group"), 10, 64)
	if err != nil || id < 1 {
		return 0, fmt.Errorf("no group %q in this diagnosis", r.PathValue("group"))
	}
	return id, nil
}

// groupTitle is "shop=Mill Lane, product=dairy".
func groupTitle(by []string, keys []sql.NullString) string {
	parts := make([]string, len(by))
	for i, b := range by {
		parts[i] = b + "=" + nullText(keys[i])
	}
	return strings.Join(parts, ", ")
}

// handleGroup shows one group: its pictures, verdict, recipe and tests,
// with links to its neighbours in the filtered list.
func (e *Explorer) handleGroup(w http.ResponseWriter, r *http.Request, s *session, run *run, info *runInfo) {
	q, err := parseList(r.URL.Query(), info)
	if err != nil {
		e.fail(w, r, http.StatusBadRequest, err)
		return
	}
	id, err := parseGroupID(r)
	if err != nil {
		e.fail(w, r, http.StatusNotFound, err)
		return
	}
	ctx, cancel, ok := e.useSession(w, r, s)
	if !ok {
		return
	}
	defer cancel()
	d, err := e.groupPage(ctx, s.conn, run, info, q, id)
	s.release()
	if err != nil {
		e.fail(w, r, http.StatusNotFound, err)
		return
	}
	e.page(w, r, "group", d.Title, d)
}

func (e *Explorer) groupPage(ctx context.Context, conn *sql.Conn, run *run, info *runInfo, q listQuery, id int64) (*groupData, error) {
	row, err := readGroupRow(ctx, conn, run, info, id)
	if err != nil {
		return nil, err
	}
	d := &groupData{Title: groupTitle(run.Spec.By, row.Keys), Reason: row.text("reason")}
	if d.Reason == "–" {
		d.Reason = "not judged: " + row.text("status")
	}
	base := fmt.Sprintf("/runs/%d/groups", run.ID)
	suffix := ""
	if v := q.values(false).Encode(); v != "" {
		suffix = "?" + v
	}
	listQ := q
	d.DownloadHref = fmt.Sprintf("%s/%d", base, id)
	for _, after := range []bool{false, true} {
		sqlText, args := q.neighbourSQL(run.table, run.Spec.By, id, after)
		var nb int64
		switch err := conn.QueryRowContext(ctx, sqlText, args...).Scan(&nb); {
		case err == sql.ErrNoRows:
		case err != nil:
			return nil, err
		default:
			href := fmt.Sprintf("%s/%d%s", base, nb, suffix)
			if after {
				d.NextHref = href
			} else {
				d.PrevHref = href
			}
		}
	}
	posSQL, posArgs := q.positionSQL(run.table, run.Spec.By, id)
	var before, self int
	if err := conn.QueryRowContext(ctx, posSQL, posArgs...).Scan(&before, &self, &d.Matching); err != nil {
		return nil, err
	}
	d.InList, d.Position = self == 1, before+1
	listQ.Page, listQ.After, listQ.Before = before/q.Size+1, nil, nil
	d.ListHref = base
	if v := listQ.values(true).Encode(); v != "" {
		d.ListHref += "?" + v
	}

	g, err := loadSeries(ctx, conn, run, info, row.Keys, row.int("period"))
	if err != nil {
		return nil, err
	}
	if err := drawGroup(d, g, run.Spec.Value, row.int("period")); err != nil {
		return nil, fmt.Errorf("plots for %s: %w", d.Title, err)
	}
	d.Facts = []fact{
		{"rank", row.text("rank")}, {"observations", row.text("n")}, {"status", row.text("status")},
		{"stationary", row.text("stationary")}, {"violations", row.text("violations")},
		{"why the mean moves", row.text("mean_cause")}, {"why the spread changes", row.text("spread_cause")},
		{"seasonal pattern", row.text("seasonal_kind")}, {"period", row.text("period")},
		{"demand class", row.text("demand_class")}, {"outliers", row.text("outliers")},
		{"cured by the recipe", row.text("cured")}, {"score (0 to 3)", row.text("score")},
	}
	if g.Judged {
		d.Steps = recipeSteps(g.Verdict.Recipe(), g.X)
	} else {
		d.Steps = []string{g.Why}
	}
	d.Tests = testRows(row)
	return d, nil
}

// testRows are the verdict's tests as the diagnosis row has them: each
// test's statistic where diagnose reports one, its p-value and its
// Benjamini-Hochberg q-value across the diagnosed groups.
func testRows(row *groupRow) []testRow {
	tests := []struct{ name, prefix, stat, note string }{
		{"ADF (unit root)", "adf", "adf_statistic", "lags " + row.text("adf_lags") + "; small p: no unit root"},
		{"KPSS (level stationarity)", "kpss", "kpss_statistic", "lags " + row.text("kpss_lags") + "; small p: not stationary"},
		{"segment means (mean stable)", "mean", "", "small p: the mean moves"},
		{"segment spreads (spread stable)", "spread", "", "small p: the spread changes"},
		{"Ljung-Box (white noise)", "ljung_box", "", "small p: autocorrelated"},
	}
	var out []testRow
	for _, t := range tests {
		tr := testRow{Name: t.name, Statistic: "–", P: row.text(t.prefix + "_p_value"), Q: row.text(t.prefix + "_q_value"), Note: t.note}
		if t.stat != "" {
			tr.Statistic = row.text(t.stat)
		}
		out = append(out, tr)
	}
	return out
}

// drawGroup draws the group's five pictures with the report's helpers.
func drawGroup(d *groupData, g *groupSeries, value string, period int) error {
	missing := func(why string) template.HTML {
		return template.HTML(`<p class="missing">` + template.HTMLEscapeString(why) + `</p>`)
	}
	width := report.RollingWidth(len(g.Y), period)
	roll, err := stats.Rolling(g.Y, width)
	if err != nil {
		return err
	}
	marks := report.Marks{Shift: -1}
	if g.Verdict.MeanCause == verdict.MeanLevelShift {
		marks.Shift = g.Verdict.ShiftIndex
	}
	marks.Outliers = g.Verdict.Outliers
	if d.Series, err = report.SeriesFigure(g.X, g.Y, roll.Mean, roll.SD, value, width, marks); err != nil {
		return err
	}
	d.ACFBefore, err = acfFigure("autocorrelation of "+value, finiteOnly(g.Y), period)
	if err != nil {
		return err
	}
	if !g.Judged {
		d.Transformed, d.ACFAfter, d.Forecast = missing("no transformed series: "+g.Why), missing(g.Why), missing("no forecast: "+g.Why)
		return nil
	}
	title := value + " after its recipe"
	if rec := g.Verdict.Recipe(); rec.Identity() {
		title = value + " (no transform recommended)"
	}
	if d.Transformed, err = report.LineFigure(title, g.TX, g.Transformed, "transformed "+value); err != nil {
		return err
	}
	if d.ACFAfter, err = acfFigure("autocorrelation after the recipe", finiteOnly(g.Transformed), period); err != nil {
		return err
	}
	if g.FX.X == nil {
		d.Forecast = missing(g.Why)
		return nil
	}
	n, h := len(g.Y), len(g.FX.X)
	from := max(0, n-3*h)
	hist := report.Axis{X: g.X.X[from:], IsTime: g.X.IsTime, Label: g.X.Label}
	d.Forecast, err = report.ForecastFigure(fmt.Sprintf("%s: the last values and %d forecasts, 95%% intervals", value, h),
		hist, g.Y[from:], g.FX, g.Forecast.Mean, g.Forecast.Lower, g.Forecast.Upper, value)
	return err
}

func acfFigure(title string, y []float64, period int) (template.HTML, error) {
	acf := stats.Autocorrelation(y, report.AutocorrelationLags(len(y), period))
	if len(acf) == 0 {
		return template.HTML(`<p class="missing">no autocorrelation: the series is constant or too short</p>`), nil
	}
	return report.AutocorrelationFigure(title+", ±1.96/√n bounds", acf, len(y))
}

func finiteOnly(y []float64) []float64 {
	out := make([]float64, 0, len(y))
	for _, v := range y {
		if !math.IsNaN(v) && !math.IsInf(v, 0) {
			out = append(out, v)
		}
	}
	return out
}
