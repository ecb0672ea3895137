package explorer

import (
	"context"
	"database/sql"
	"fmt"
	"math"
	"strings"
	"time"

	"github.com/plumb-sql/plumb/cmd/internal/report"
	"github.com/plumb-sql/plumb/stats"
	"github.com/plumb-sql/plumb/stats/forecast"
	"github.com/plumb-sql/plumb/stats/verdict"
	"github.com/plumb-sql/plumb/udf"
)

// groupSeries is one group's values and what its verdict does with them.
// The verdict is recomputed in Go (verdict.Stationarity with diagnose's
// period and level, as the report does), which gives the recipe, the
// outliers' positions, the transformed series and the forecasts.
type groupSeries struct {
	X       report.Axis
	Y       []float64
	Verdict verdict.StationarityResult
	Judged  bool // the verdict could judge the series (recipe, transform and forecast exist)
	// Transformed is the series after its recipe, at TX.
	Transformed []float64
	TX          report.Axis
	// Forecast: Horizon steps at FX, with 95% intervals (Status not ok: none).
	Forecast forecast.Forecast
	FX       report.Axis
	Why      string // why there is no transformed series or forecast
}

// loadSeries reads the group's points from the source, in time order, and
// judges them.
func loadSeries(ctx context.Context, conn *sql.Conn, r *run, info *runInfo, keys []sql.NullString, period int) (*groupSeries, error) {
	from, err := udf.SourceSQL(r.Spec.Source)
	if err != nil {
		return nil, err
	}
	conds := make([]string, len(r.Spec.By))
	args := make([]any, len(r.Spec.By))
	for i, b := range r.Spec.By {
		conds[i] = fmt.Sprintf("%s IS NOT DISTINCT FROM CAST(? AS %s)", udf.QuoteIdent(b), info.KeyTypes[i])
		if keys[i].Valid {
			args[i] = keys[i].String
		}
	}
	at, value := udf.QuoteIdent(r.Spec.At), udf.QuoteIdent(r.Spec.Value)
	q := fmt.Sprintf("SELECT list(%[1]s ORDER BY %[1]s), list(%[2]s::DOUBLE ORDER BY %[1]s) FROM %[3]s WHERE %[4]s",
		at, value, from, strings.Join(conds, " AND "))
	var atList, valueList any
	if err := conn.QueryRowContext(ctx, q, args...).Scan(&atList, &valueList); err != nil {
		return nil, fmt.Errorf("cannot read %s: %s", r.Src.Name, firstLine(err.Error()))
	}
	ats, _ := atList.([]any)
	vals, _ := valueList.([]any)
	g := &groupSeries{}
	if g.X, err = report.AxisOf(ats, r.Spec.At); err != nil {
		return nil, err
	}
	g.Y = make([]float64, len(vals))
	for i, v := range vals {
		if f, ok := v.(float64); ok {
			g.Y[i] = f
		} else {
			g.Y[i] = math.NaN()
		}
	}
	alpha := r.Spec.Alpha
	if alpha == 0 {
		alpha = 0.05
	}
	if g.Verdict, err = verdict.Stationarity(g.Y, verdict.StationarityOptions{Period: period, Alpha: alpha}); err != nil {
		return nil, err
	}
	if s := g.Verdict.Status; s != stats.StatusOK && s != stats.StatusSeasonUnknown {
		g.Why = "not judged: " + string(s)
		return g, nil
	}
	rec := g.Verdict.Recipe()
	t, status, err := rec.Apply(g.Y)
	if err != nil {
		return nil, err
	}
	if status != stats.StatusOK {
		g.Why = "the recipe could not be applied: " + string(status)
		return g, nil
	}
	g.Judged, g.Transformed = true, t
	g.TX = report.Axis{X: g.X.X[rec.Lost():], IsTime: g.X.IsTime, Label: g.X.Label}
	// As the report: a tenth of the series ahead, at most 60 steps, 95% intervals.
	h := max(1, min(60, len(g.Y)/10))
	f, err := forecast.ForecastByRecipe(g.Verdict.Judged(), rec, forecast.RecipeForecastOptions{Horizon: h, Coverage: 0.95, AR: forecast.AROptions{Period: rec.Period}})
	if err != nil {
		return nil, err
	}
	g.Forecast = f.Forecast
	if n := len(g.Y); f.Status == stats.StatusOK && n >= 2 {
		step := g.X.X[n-1] - g.X.X[n-2]
		g.FX = report.Axis{X: make([]float64, h), IsTime: g.X.IsTime, Label: g.X.Label}
		for i := range g.FX.X {
			g.FX.X[i] = g.X.X[n-1] + float64(i+1)*step
		}
	} else if f.Status != stats.StatusOK {
		g.Why = "no forecast: " + string(f.Status)
	}
	return g, nil
}

// xText writes an x value as the CSV downloads do: a time as RFC 3339 in
// UTC (a date alone at midnight), a number plainly.
func xText(a report.Axis, x float64) string {
	if !a.IsTime {
		return fmt.Sprint(x)
	}
	t := time.Unix(int64(x), 0).UTC()
	if t.Hour() == 0 && t.Minute() == 0 && t.Second() == 0 {
		return t.Format("2006-01-02")
	}
	return t.Format(time.RFC3339)
}

// recipeSteps says the recipe's steps in words, in the order applied
// (verdict.Recipe).
func recipeSteps(rec verdict.Recipe, x report.Axis) []string {
	var out []string
	if rec.BoxCox {
		if rec.Lambda == 0 {
			out = append(out, "take the natural logarithm (Box-Cox λ = 0)")
		} else {
			out = append(out, fmt.Sprintf("Box-Cox transform with λ = %.3g", rec.Lambda))
		}
	}
	if rec.SeasonalMeans != nil {
		out = append(out, fmt.Sprintf("subtract the fixed seasonal pattern (%d seasonal means)", rec.Period))
	}
	if rec.Trend {
		out = append(out, fmt.Sprintf("subtract the straight line %.4g + %.4g·t (t from 0)", rec.TrendIntercept, rec.TrendSlope))
	}
	if rec.Shift && rec.ShiftIndex >= 0 && rec.ShiftIndex < len(x.X) {
		out = append(out, fmt.Sprintf("subtract the level shift of %.4g from %s on (observation %d)", rec.ShiftSize, xText(x, x.X[rec.ShiftIndex]), rec.ShiftIndex+1))
	}
	for i := 0; i < rec.SeasonalDifferences; i++ {
		out = append(out, fmt.Sprintf("seasonal difference at lag %d", rec.Period))
	}
	for i := 0; i < rec.Differences; i++ {
		out = append(out, "difference (lag 1)")
	}
	if len(out) == 0 {
		out = append(out, "none: the series is left as it came")
	}
	return out
}
