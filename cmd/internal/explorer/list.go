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
	// After (Before) make a keyset page: the groups just after (before)
	// that sort key (sortKey); Page is then only shown.
	After, Before *int64
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
	names := []string{"q", "sort", "dir", "page", "size", "after", "before"}
	for _, f := range filters {
		names = append(names, f.Name)
	}
	return names
}

// sortable reports whether col may be a sort key: rank, or score or a p-
// or q-value column for which the run's table holds an order column.
func sortable(col string, columns []string) bool {
	if col == "rank" {
		return slices.Contains(columns, col)
	}
	return isSortColumn(col) && slices.Contains(columns, orderColumn(col))
}

// isSortColumn says which diagnosis columns get an order column.
func isSortColumn(col string) bool {
	return col == "score" || strings.HasSuffix(col, "_p_value") || strings.HasSuffix(col, "_q_value")
}

// orderColumn names the column that holds col's order: each group's
// place (1, 2, ...) when sorted by col ascending, NULL where col is NULL;
// made once with the run's table (orderColumnsSQL), so that sorting a page
// compares integers.
func orderColumn(col string) string { return "plumb_order_" + col }

// orderColumnsSQL writes the order columns of the sortable names, and the
// lower-cased group key the text match looks in, as SELECT items over a
// relation that has plumb_id.
func orderColumnsSQL(names, by []string) string {
	keys := make([]string, len(by))
	for i, b := range by {
		keys[i] = "coalesce(" + udf.QuoteIdent(b) + "::VARCHAR, 'NULL')"
	}
	items := []string{"lower(concat_ws(chr(31), " + strings.Join(keys, ", ") + ")) AS plumb_text"}
	for _, n := range names {
		if isSortColumn(n) {
			c := udf.QuoteIdent(n)
			items = append(items, fmt.Sprintf("(CASE WHEN %[1]s IS NOT NULL THEN row_number() OVER (ORDER BY %[1]s, plumb_id) END)::INTEGER AS %[2]s",
				c, udf.QuoteIdent(orderColumn(n))))
		}
	}
	return strings.Join(items, ", ")
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
	for _, p := range []struct {
		name string
		to   **int64
	}{{"after", &q.After}, {"before", &q.Before}} {
		if s := v.Get(p.name); s != "" {
			n, err := strconv.ParseInt(s, 10, 64)
			if err != nil {
				return listQuery{}, fmt.Errorf("%s must be a whole number, not %q", p.name, s)
			}
			*p.to = &n
		}
	}
	if q.After != nil && q.Before != nil {
		return listQuery{}, fmt.Errorf("give after or before, not both")
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
		if q.After != nil {
			v.Set("after", strconv.FormatInt(*q.After, 10))
		}
		if q.Before != nil {
			v.Set("before", strconv.FormatInt(*q.Before, 10))
		}
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
	c.Page, c.After, c.Before = 1, nil, nil
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
		conds = append(conds, "contains(plumb_text, ?)")
		args = append(args, strings.ToLower(q.Text))
	}
	return strings.Join(conds, " AND "), args
}

// sortKey is the sort column's order as a BIGINT that is never NULL and
// never the same for two groups, so that the list, the downloads, the
// keyset pages and the next/previous links share one order. plumb_id is
// itself the order by rank; a NULL sorts last either way, among NULLs by
// plumb_id.
func (q listQuery) sortKey() string {
	if q.Sort == "rank" {
		return "plumb_id"
	}
	null := "1000000000000 + plumb_id"
	if q.Desc {
		null = "-plumb_id"
	}
	return fmt.Sprintf("coalesce(%s::BIGINT, %s)", udf.QuoteIdent(orderColumn(q.Sort)), null)
}

func (q listQuery) orderBy() string {
	if q.Desc {
		return q.sortKey() + " DESC"
	}
	return q.sortKey()
}

// beyond is the condition "after key k in the list's order" (or before).
func (q listQuery) beyond(after bool) string {
	if after != q.Desc {
		return q.sortKey() + " > ?"
	}
	return q.sortKey() + " < ?"
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

// pageSQL selects one page: plumb_id, the sort key, rank, each group
// column as text, and the list's columns. The inner SELECT * ... ORDER BY
// ... LIMIT lets DuckDB sort row ids by the key alone and read only the
// page's rows whole (its late materialisation of a top-N); the list's
// expressions are computed for those rows only. With q.After (or
// q.Before) it is a keyset page: the groups just after (before) that key,
// so that stepping through a long list costs the same at its end as at
// its start; else the page's place is an OFFSET.
func (q listQuery) pageSQL(table string, by []string) (string, []any, []string) {
	where, args := q.where(by)
	labels := []string{}
	cols := []string{"plumb_id", q.sortKey(), "rank"}
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
	t := udf.QuoteIdent(table)
	inner := fmt.Sprintf("SELECT * FROM %s WHERE %s ORDER BY %s LIMIT %d OFFSET %d", t, where, q.orderBy(), q.Size, (q.Page-1)*q.Size)
	switch {
	case q.After != nil:
		inner = fmt.Sprintf("SELECT * FROM %s WHERE %s AND %s ORDER BY %s LIMIT %d", t, where, q.beyond(true), q.orderBy(), q.Size)
		args = append(args, *q.After)
	case q.Before != nil:
		rev := q
		rev.Desc = !q.Desc
		inner = fmt.Sprintf("SELECT * FROM %s WHERE %s AND %s ORDER BY %s LIMIT %d", t, where, q.beyond(false), rev.orderBy(), q.Size)
		args = append(args, *q.Before)
	}
	return fmt.Sprintf("SELECT %s FROM (%s) ORDER BY %s", strings.Join(cols, ", "), inner, q.orderBy()), args, labels
}

// countSQL counts the groups the filters keep.
func (q listQuery) countSQL(table string, by []string) (string, []any) {
	where, args := q.where(by)
	return fmt.Sprintf("SELECT count(*) FROM %s WHERE %s", udf.QuoteIdent(table), where), args
}

// neighbourSQL finds the group after (or before) the one with plumb_id id
// in the filtered order, or none.
func (q listQuery) neighbourSQL(table string, by []string, id int64, after bool) (string, []any) {
	where, args := q.where(by)
	t := udf.QuoteIdent(table)
	order := q
	if !after {
		order.Desc = !q.Desc
	}
	cur := fmt.Sprintf("(SELECT %s FROM %s WHERE plumb_id = ?)", q.sortKey(), t)
	return fmt.Sprintf("SELECT plumb_id FROM %s WHERE %s AND %s ORDER BY %s LIMIT 1",
		t, where, strings.Replace(q.beyond(after), "?", cur, 1), order.orderBy()), append(args, id)
}

// positionSQL counts the filtered groups before the group with plumb_id
// id, whether that group passes the filters, and all filtered groups.
func (q listQuery) positionSQL(table string, by []string, id int64) (string, []any) {
	where, args := q.where(by)
	t := udf.QuoteIdent(table)
	cur := fmt.Sprintf("(SELECT %s FROM %s WHERE plumb_id = ?)", q.sortKey(), t)
	return fmt.Sprintf("SELECT count(*) FILTER (WHERE %s), count(*) FILTER (WHERE plumb_id = ?), count(*) FROM %s WHERE %s",
		strings.Replace(q.beyond(false), "?", cur, 1), t, where), append([]any{id, id}, args...)
}
