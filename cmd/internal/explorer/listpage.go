package explorer

import (
	"context"
	"database/sql"
	"fmt"
	"net/http"
	"strings"
	"time"

	"github.com/plumb-sql/plumb/cmd/internal/report"
)

type listData struct {
	RunID                      int
	Source, At, Value, Saved   string
	By                         []string
	Counts                     counts
	CountLinks                 []countLink
	Selects                    []selectBox
	Sorts                      []option
	Text                       string
	Desc                       bool
	Labels                     []string
	Rows                       []listRow
	Matching, First, Last      int
	PrevHref, NextHref         string
	CSVHref, ParquetHref, Took string
}

type countLink struct {
	ID, Label, Href string
	Count           int
	On              bool
	Sub             []countLink
}

type selectBox struct {
	Name, Label string
	Options     []option
}

type option struct {
	Value, Label string
	Selected     bool
}

type listRow struct {
	Rank  int64
	Href  string
	Keys  []string
	Cells []string
}

// page is one page of the list: its rows and the number of groups the
// filters keep. Both queries run in DuckDB over the run's table.
type listPage struct {
	Labels            []string
	Rows              []listRow
	Matching          int
	FirstKey, LastKey int64 // the sort keys of the first and last row, for keyset links
}

func readPage(ctx context.Context, conn *sql.Conn, run *run, q listQuery) (listPage, error) {
	var p listPage
	countSQL, countArgs := q.countSQL(run.table, run.Spec.By)
	if err := conn.QueryRowContext(ctx, countSQL, countArgs...).Scan(&p.Matching); err != nil {
		return p, err
	}
	pageSQL, args, labels := q.pageSQL(run.table, run.Spec.By)
	p.Labels = labels
	rows, err := conn.QueryContext(ctx, pageSQL, args...)
	if err != nil {
		return p, err
	}
	defer rows.Close()
	nk := len(run.Spec.By)
	for rows.Next() {
		var id, key, rank sql.NullInt64
		keys := make([]sql.NullString, nk)
		cells := make([]any, len(labels))
		ptrs := []any{&id, &key, &rank}
		for i := range keys {
			ptrs = append(ptrs, &keys[i])
		}
		for i := range cells {
			ptrs = append(ptrs, &cells[i])
		}
		if err := rows.Scan(ptrs...); err != nil {
			return p, err
		}
		row := listRow{Rank: rank.Int64, Href: fmt.Sprintf("/runs/%d/groups/%d", run.ID, id.Int64)}
		for _, k := range keys {
			row.Keys = append(row.Keys, nullText(k))
		}
		for _, c := range cells {
			row.Cells = append(row.Cells, report.FormatCell(c))
		}
		if len(p.Rows) == 0 {
			p.FirstKey = key.Int64
		}
		p.LastKey = key.Int64
		p.Rows = append(p.Rows, row)
	}
	return p, rows.Err()
}

func nullText(s sql.NullString) string {
	if !s.Valid {
		return "NULL"
	}
	return s.String
}

// handleList shows the filtered, sorted page of groups with the counts.
func (e *Explorer) handleList(w http.ResponseWriter, r *http.Request, s *session, run *run, info *runInfo) {
	q, err := parseList(r.URL.Query(), info)
	if err != nil {
		e.fail(w, r, http.StatusBadRequest, err)
		return
	}
	ctx, cancel, ok := e.useSession(w, r, s)
	if !ok {
		return
	}
	defer cancel()
	start := time.Now()
	p, err := readPage(ctx, s.conn, run, q)
	s.release()
	if err != nil {
		e.fail(w, r, http.StatusInternalServerError, err)
		return
	}
	base := fmt.Sprintf("/runs/%d/groups", run.ID)
	d := listData{RunID: run.ID, Source: run.Src.Name, By: run.Spec.By, At: run.Spec.At, Value: run.Spec.Value, Saved: run.Saved,
		Counts: info.Counts, Text: q.Text, Desc: q.Desc, Labels: p.Labels, Rows: p.Rows, Matching: p.Matching,
		Took: time.Since(start).Round(100 * time.Microsecond).String()}
	filterQuery := q.values(true).Encode()
	for i := range d.Rows {
		if filterQuery != "" {
			d.Rows[i].Href += "?" + filterQuery
		}
	}
	if p.Matching > 0 {
		d.First = (q.Page-1)*q.Size + 1
		d.Last = d.First + len(p.Rows) - 1
	}
	link := func(lq listQuery) string {
		if v := lq.values(true).Encode(); v != "" {
			return base + "?" + v
		}
		return base
	}
	if q.Page > 1 && len(p.Rows) > 0 {
		prev := q
		prev.Page, prev.After, prev.Before = q.Page-1, nil, &p.FirstKey
		d.PrevHref = link(prev)
	}
	if q.Page*q.Size < p.Matching && len(p.Rows) == q.Size {
		next := q
		next.Page, next.After, next.Before = q.Page+1, &p.LastKey, nil
		d.NextHref = link(next)
	}
	if v := q.values(false).Encode(); v != "" {
		d.CSVHref, d.ParquetHref = base+".csv?"+v, base+".parquet?"+v
	} else {
		d.CSVHref, d.ParquetHref = base+".csv", base+".parquet"
	}
	d.CountLinks = countLinks(q, info.Counts, link)
	d.Selects = selectBoxes(q, info.Counts)
	for _, c := range info.Columns {
		if sortable(c, info.Columns) {
			d.Sorts = append(d.Sorts, option{Value: c, Label: strings.ReplaceAll(c, "_", " "), Selected: c == q.Sort})
		}
	}
	e.page(w, r, "list", run.Src.Name, d)
}

// countLinks are the counts at the top, each setting its filter (and
// clearing it when it is already set).
func countLinks(q listQuery, c counts, link func(listQuery) string) []countLink {
	mk := func(id, label, name, value string, n int) countLink {
		on := q.Filters[name] == value
		target := q.with(name, value)
		if on {
			target = q.with(name, "")
		}
		return countLink{ID: id, Label: label, Href: link(target), Count: n, On: on}
	}
	all := countLink{ID: "all", Label: "groups", Href: link(listQuery{Filters: map[string]string{}, Sort: q.Sort, Desc: q.Desc, Page: 1, Size: q.Size}), Count: c.Groups}
	mean := mk("mean", "mean moves", "violation", "mean", c.Mean)
	mean.Sub = []countLink{mk("unit-root", "unit root", "mean_cause", "unit_root", c.UnitRoot),
		mk("trend", "trend", "mean_cause", "trend", c.Trend), mk("level-shift", "level shift", "mean_cause", "level_shift", c.Shift)}
	spread := mk("spread", "spread moves", "violation", "spread", c.Spread)
	spread.Sub = []countLink{mk("spread-level", "with the level", "spread_cause", "level", c.SpreadLevel),
		mk("spread-time", "over time", "spread_cause", "time", c.SpreadTime)}
	seasonal := mk("seasonal", "seasonal", "violation", "seasonal", c.Seasonal)
	seasonal.Sub = []countLink{mk("fixed", "fixed", "seasonal_kind", "fixed", c.Fixed), mk("drifting", "drifting", "seasonal_kind", "drifting", c.Drifting)}
	demand := countLink{ID: "demand", Label: "demand classes", Href: link(q.with("demand_class", "")), Count: len(c.DemandClasses)}
	for _, v := range c.DemandClasses {
		demand.Sub = append(demand.Sub, mk("demand-"+v.Value, v.Value, "demand_class", v.Value, v.Count))
	}
	out := []countLink{all,
		mk("stationary", "stationary", "verdict", "stationary", c.Stationary),
		mk("not-stationary", "not stationary", "verdict", "not_stationary", c.NotStationary),
		mean, spread, seasonal, demand,
		mk("outliers", "with outliers", "outliers", "yes", c.Outliers),
		mk("cured", "cured by their recipe", "cured", "yes", c.Cured),
		mk("not-cured", "not cured", "cured", "no", c.NotCured),
		mk("not-judged", "not judged", "verdict", "not_judged", c.NotJudged),
	}
	return out
}

// selectBoxes are the filter form's fields, one per filter.
func selectBoxes(q listQuery, c counts) []selectBox {
	var out []selectBox
	for _, f := range filters {
		b := selectBox{Name: f.Name, Label: strings.ReplaceAll(f.Name, "_", " ")}
		values := f.Values
		if values == nil {
			for _, v := range allowedValues(f.Name, &runInfo{Counts: c}) {
				values = append(values, v.Value)
			}
		}
		for _, v := range values {
			b.Options = append(b.Options, option{Value: v, Label: strings.ReplaceAll(v, "_", " "), Selected: q.Filters[f.Name] == v})
		}
		out = append(out, b)
	}
	return out
}
