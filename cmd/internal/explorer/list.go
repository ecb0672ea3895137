package explorer

import (
	"fmt"
	"net/url"
	"slices"
	"strconv"
	"strings"

	"github.com/plumb-sql/plumb/cmd/internal/diagnosis"
	"github.com/plumb-sql/plumb/udf"
)

// listQuery is a filtered, sorted page of a run's groups, read from the
// page's query string by parseList. Every name in it is checked against an
// allow-list (the filters below, the run's own columns for the sort key);
// every value reaches SQL as a bind parameter.
type listQuery struct {
	Filters map[string]string // filter name → value
	Text    string            // matched, case-blind, in any group column
	Sort    string            // a column of the run's table
	Desc    bool
	Page    int // from 1
	Size    int
}

// filter is one filter of the list: its query parameter, the values it
// accepts (nil: the run's own values, from counts) and its SQL condition.
type filter struct {
	Name   string
	Values []string
	where  func(value string) (cond string, args []any)
}

func equals(col string) func(string) (string, []any) {
	return func(v string) (string, []any) { return udf.QuoteIdent(col) + " = ?", []any{v} }
}

func yesNo(yes, no string) func(string) (string, []any) {
	return func(v string) (string, []any) {
		if v == "yes" {
			return yes, nil
		}
		return no, nil
	}
}

// filters are the list's filters, in the order the page shows them. To add
// one, add a row here (and a count in counts.go if it should have one at
// the top); parseList, the SQL, the links and the downloads follow.
var filters = []filter{
	{"verdict", []string{"stationary", "not_stationary", "not_judged"}, func(v string) (string, []any) {
		switch v {
		case "stationary":
			return "stationary", nil
		case "not_stationary":
			return "NOT stationary", nil
		}
		return "stationary IS NULL", nil
	}},
	{"status", nil, equals("status")},
	{"violation", []string{"mean", "spread", "seasonal"}, func(v string) (string, []any) {
		return "list_contains(violations, ?)", []any{v}
	}},
	{"mean_cause", []string{"unit_root", "trend", "level_shift"}, equals("mean_cause")},
	{"spread_cause", []string{"level", "time"}, equals("spread_cause")},
	{"seasonal_kind", []string{"fixed", "drifting"}, equals("seasonal_kind")},
	{"demand_class", nil, equals("demand_class")},
	{"cured", []string{"yes", "no"}, yesNo("cured", "NOT cured")},
	{"outliers", []string{"yes", "no"}, yesNo("outliers > 0", "outliers = 0")},
}

const (
	defaultPageSize = 50
	maxPageSize     = 500
	maxTextMatch    = 200
)

// listParams are every query parameter the list accepts.
func listParams() []string {
	names := []string{"q", "sort", "dir", "page", "size"}
	for _, f := range filters {
		names = append(names, f.Name)
	}
	return names
}

// sortable reports whether col may be a sort key: rank, score, or a p- or
// q-value column of the run's table.
func sortable(col string, columns []string) bool {
	if !slices.Contains(columns, col) {
		return false
	}
	return col == "rank" || col == "score" || strings.HasSuffix(col, "_p_value") || strings.HasSuffix(col, "_q_value")
}

// parseList reads a list query from the page's parameters, refusing any
// parameter, filter value or sort key not in its allow-list. extra names
// parameters the caller reads itself.
func parseList(v url.Values, info *runInfo, extra ...string) (listQuery, error) {
	allowed := append(listParams(), extra...)
	for name := range v {
		if !slices.Contains(allowed, name) {
			return listQuery{}, fmt.Errorf("unknown parameter %q", name)
		}
		if len(v[name]) > 1 {
			return listQuery{}, fmt.Errorf("parameter %q given %d times", name, len(v[name]))
		}
	}
	q := listQuery{Filters: map[string]string{}, Sort: "rank", Page: 1, Size: defaultPageSize}
	for _, f := range filters {
		val := v.Get(f.Name)
		if val == "" {
			continue
		}
		ok := slices.Contains(f.Values, val)
		if f.Values == nil {
			ok = slices.ContainsFunc(allowedValues(f.Name, info), func(c valueCount) bool { return c.Value == val })
		}
		if !ok {
			return listQuery{}, fmt.Errorf("%s cannot be %q", f.Name, val)
		}
		q.Filters[f.Name] = val
	}
	if q.Text = v.Get("q"); len(q.Text) > maxTextMatch {
		return listQuery{}, fmt.Errorf("the text to match is longer than %d bytes", maxTextMatch)
	}
	if s := v.Get("sort"); s != "" {
		if !sortable(s, info.Columns) {
			return listQuery{}, fmt.Errorf("cannot sort by %q: sort by rank, score or a p- or q-value column", s)
		}
		q.Sort = s
	}
	q.Desc = q.Sort == "score"
	switch v.Get("dir") {
	case "":
	case "asc":
		q.Desc = false
	case "desc":
		q.Desc = true
	default:
		return listQuery{}, fmt.Errorf("dir must be asc or desc, not %q", v.Get("dir"))
	}
	for _, p := range []struct {
		name     string
		to       *int
		min, max int
	}{{"page", &q.Page, 1, 1 << 30}, {"size", &q.Size, 1, maxPageSize}} {
		s := v.Get(p.name)
		if s == "" {
			continue
		}
		n, err := strconv.Atoi(s)
		if err != nil || n < p.min || n > p.max {
			return listQuery{}, fmt.Errorf("%s must be a whole number from %d to %d, not %q", p.name, p.min, p.max, s)
		}
		*p.to = n
	}
	return q, nil
}

func allowedValues(name string, info *runInfo) []valueCount {
	switch name {
	case "status":
		return info.Counts.Statuses
	case "demand_class":
		return info.Counts.DemandClasses
	}
	return nil
}

// values renders the query back as parameters, for links; the page
// number is left out unless withPage.
func (q listQuery) values(withPage bool) url.Values {
	v := url.Values{}
	for name, val := range q.Filters {
		v.Set(name, val)
	}
	if q.Text != "" {
		v.Set("q", q.Text)
	}
	if q.Sort != "rank" {
		v.Set("sort", q.Sort)
	}
	if q.Desc != (q.Sort == "score") {
		v.Set("dir", map[bool]string{true: "desc", false: "asc"}[q.Desc])
	}
	if q.Size != defaultPageSize {
		v.Set("size", strconv.Itoa(q.Size))
	}
	if withPage && q.Page > 1 {
		v.Set("page", strconv.Itoa(q.Page))
	}
	return v
}

// with returns a copy with filter name set to value ("" removes it), on
// page 1.
func (q listQuery) with(name, value string) listQuery {
	c := q
	c.Filters = map[string]string{}
	for k, v := range q.Filters {
		c.Filters[k] = v
	}
	if value == "" {
		delete(c.Filters, name)
	} else {
		c.Filters[name] = value
	}
	c.Page = 1
	return c
}

// where is the filters' condition and its arguments; by are the run's
// group columns (the text match looks in each).
func (q listQuery) where(by []string) (string, []any) {
	conds := []string{"true"}
	var args []any
	for _, f := range filters {
		if val, ok := q.Filters[f.Name]; ok {
			c, a := f.where(val)
			conds = append(conds, c)
			args = append(args, a...)
		}
	}
	if q.Text != "" {
		var any []string
		for _, b := range by {
			any = append(any, "contains(lower(coalesce("+udf.QuoteIdent(b)+"::VARCHAR, '')), ?)")
			args = append(args, strings.ToLower(q.Text))
		}
		conds = append(conds, "("+strings.Join(any, " OR ")+")")
	}
	return strings.Join(conds, " AND "), args
}

// sortKey is the sort column as a DOUBLE that is never NULL (NULLs last
// either way), so that the list and the next/previous links share one
// order: the key, then plumb_id.
func (q listQuery) sortKey() string {
	end := "'Infinity'"
	if q.Desc {
		end = "'-Infinity'"
	}
	return fmt.Sprintf("coalesce(%s::DOUBLE, %s::DOUBLE)", udf.QuoteIdent(q.Sort), end)
}

func (q listQuery) orderBy() string {
	if q.Desc {
		return q.sortKey() + " DESC, plumb_id"
	}
	return q.sortKey() + ", plumb_id"
}

// listColumns are the list's columns after the group, as SQL over the
// run's table; the sort column is added when it is not among them.
var listColumns = []struct{ Label, SQL string }{
	{"n", "n"},
	{"status", "status"},
	{"violations", "array_to_string(violations, ', ')"},
	{"causes", "plumb_causes"},
	{"cured", "cured"},
	{"score", "score"},
	{"ADF p", "adf_p_value"},
	{"KPSS p", "kpss_p_value"},
	{"mean p", "mean_p_value"},
	{"spread p", "spread_p_value"},
}

// pageSQL selects one page: plumb_id, rank, each group column as text, and
// the list's columns.
func (q listQuery) pageSQL(table string, by []string) (string, []any, []string) {
	where, args := q.where(by)
	labels := []string{}
	cols := []string{"plumb_id", "rank"}
	for _, b := range by {
		cols = append(cols, udf.QuoteIdent(b)+"::VARCHAR")
	}
	shown := false
	for _, c := range listColumns {
		labels = append(labels, c.Label)
		sqlExpr := c.SQL
		if c.SQL == "plumb_causes" {
			sqlExpr = diagnosis.CausesSQL
		}
		cols = append(cols, sqlExpr)
		shown = shown || c.SQL == q.Sort
	}
	if !shown && q.Sort != "rank" {
		labels = append(labels, q.Sort)
		cols = append(cols, udf.QuoteIdent(q.Sort))
	}
	sql := fmt.Sprintf("SELECT %s FROM %s WHERE %s ORDER BY %s LIMIT %d OFFSET %d",
		strings.Join(cols, ", "), udf.QuoteIdent(table), where, q.orderBy(), q.Size, (q.Page-1)*q.Size)
	return sql, args, labels
}

// countSQL counts the groups the filters keep.
func (q listQuery) countSQL(table string, by []string) (string, []any) {
	where, args := q.where(by)
	return fmt.Sprintf("SELECT count(*) FROM %s WHERE %s", udf.QuoteIdent(table), where), args
}

// neighbourSQL finds the group before (dir < 0) or after the one with
// plumb_id id in the filtered order, or none.
func (q listQuery) neighbourSQL(table string, by []string, id int64, after bool) (string, []any) {
	where, args := q.where(by)
	key := q.sortKey()
	cur := fmt.Sprintf("(SELECT %s FROM %s WHERE plumb_id = ?)", key, udf.QuoteIdent(table))
	ahead := (after != q.Desc)
	cmp, idCmp, order := ">", ">", q.sortKey()+", plumb_id"
	if !ahead {
		cmp = "<"
	}
	if !after {
		idCmp = "<"
	}
	switch {
	case after && q.Desc:
		order = key + " DESC, plumb_id"
	case !after && !q.Desc:
		order = key + " DESC, plumb_id DESC"
	case !after && q.Desc:
		order = key + ", plumb_id DESC"
	}
	sql := fmt.Sprintf("SELECT plumb_id FROM %s WHERE %s AND (%s %s %s OR (%s = %s AND plumb_id %s ?)) ORDER BY %s LIMIT 1",
		udf.QuoteIdent(table), where, key, cmp, cur, key, cur, idCmp, order)
	return sql, append(args, id, id, id)
}

// positionSQL counts the filtered groups before plumb_id id, and whether id passes the filters.
func (q listQuery) positionSQL(table string, by []string, id int64) (string, []any) {
	where, args := q.where(by)
	key := q.sortKey()
	cur := fmt.Sprintf("(SELECT %s FROM %s WHERE plumb_id = ?)", key, udf.QuoteIdent(table))
	cmp := "<"
	if q.Desc {
		cmp = ">"
	}
	sql := fmt.Sprintf("SELECT count(*) FILTER (WHERE %s %s %s OR (%s = %s AND plumb_id < ?)), count(*) FILTER (WHERE plumb_id = ?), count(*) FROM %s WHERE %s",
		key, cmp, cur, key, cur, udf.QuoteIdent(table), where)
	// The arguments of the FILTER clauses come before the WHERE's.
	return sql, append([]any{id, id, id, id}, args...)
}
