package udf

import (
	"fmt"
	"strings"
)

// seriesQuery describes the per-group series behind every table function:
// which source, which columns form the group key, which orders time and
// which holds the value.
type seriesQuery struct {
	function string   // the table function's SQL name, for error messages
	source   string   // a FROM item from sourceSQL
	label    string   // the source as the caller wrote it, for error messages
	by       []string // group columns, unquoted
	at       string   // time column, unquoted
	value    string   // value column, unquoted
	// points aggregates each group as one unordered list of (t, v) pairs,
	// plumb_points, with plumb_first_at and plumb_last_at, instead of the
	// ordered lists plumb_at and plumb_raw; the Go function sorts the pairs
	// (points.sortByTime) and reports repeated times as duplicateAt.
	points bool
	// shards, when above zero, keeps only the groups whose key falls in
	// shard (0 <= shard < shards; see combine_diagnoses.go).
	shard, shards int
}

// duplicateAt is the status a per-group Go function returns when its sorted
// at list repeats a value; duplicateAtCheck turns it into the error.
const duplicateAt = "duplicate_at"

// duplicateAtCheck is an SQL expression that fails with the group's name
// when status is duplicate_at, and otherwise gives status.
func (q seriesQuery) duplicateAtCheck(status string) string {
	return fmt.Sprintf(`CASE WHEN %[1]s = '%[2]s' THEN error(%[3]s || 'column ' || %[4]s || ' repeats a value in group ' || %[5]s || '; each group needs one row per time point') ELSE %[1]s END`,
		status, duplicateAt, quoteLiteral(q.function+": "), quoteLiteral(quoteIdent(q.at)), q.groupLabel())
}

// byList returns the quoted group columns joined with commas, with a prefix
// on each ("g." gives g."store", g."product").
func (q seriesQuery) byList(prefix string) string {
	parts := make([]string, len(q.by))
	for i, b := range q.by {
		parts[i] = prefix + quoteIdent(b)
	}
	return strings.Join(parts, ", ")
}

// groupLabel is an SQL expression naming the current group in messages,
// such as store=3, product=milk.
func (q seriesQuery) groupLabel() string {
	return q.groupLabelOf("")
}

// groupLabelOf is groupLabel with the group columns taken from a table
// alias (prefix "t." reads t."store").
func (q seriesQuery) groupLabelOf(prefix string) string {
	parts := make([]string, len(q.by))
	for i, b := range q.by {
		parts[i] = fmt.Sprintf("%s || coalesce(%s%s::VARCHAR, 'NULL')", quoteLiteral(b+"="), prefix, quoteIdent(b))
	}
	return "concat_ws(', ', " + strings.Join(parts, ", ") + ")"
}

// inputCTE selects the needed columns from the source as plumb_input,
// after plumb_source_ok, which checks them against the source's own columns
// (columns.go): a missing name fails with a message naming it and listing
// the source's columns, not with a binder error.
//
// plumb_input is NOT MATERIALIZED: the batches (batches.go) read it once
// each, and DuckDB would otherwise be free to keep a copy of the whole
// source in memory for them.
func (q seriesQuery) inputCTE() string {
	wanted := seriesColumns(q.by, q.at, q.value)
	names := make([]string, len(wanted))
	for i, w := range wanted {
		names[i] = w.name
	}
	return fmt.Sprintf("%s, plumb_input AS NOT MATERIALIZED (\n    %s\n)",
		columnsCheckCTE(q.function, q.source, q.label, wanted, q.value), guardedSelect(q.source, names))
}

// seriesCTEs returns the common table expressions that turn input (a
// relation with the source's needed columns and plumb_counted, the rows the
// first pass counted in the row's group; planCTEs) into one row per group,
// the last of them called name. A group gathered with another number of
// rows than counted fails (unsteadyError). The rows:
//
//	without points: the group columns, plumb_rows, plumb_at (the at values
//	in order), plumb_raw (the value column in at order, in its own type) and
//	plumb_value (the values as DOUBLE[]), after checking that at is never
//	NULL and never repeats within a group (either is an error that names the
//	group; repeats are counted on the ordered list by plumb_repeats);
//
//	with points: the group columns, plumb_rows, plumb_first_at,
//	plumb_last_at and plumb_points, a list of (t, v) pairs in no particular
//	order with v cast to DOUBLE, after checking that at is never NULL.
//
// The value column is cast to DOUBLE, so any numeric type works; a column
// DuckDB cannot cast fails with DuckDB's own conversion message. The
// counted rows come with each row rather than by a join after the GROUP BY:
// DuckDB built that join's hash table from the gathered lists, which cost
// time and memory. The text is udf/sql/stages/gather.sql, one template for
// both kinds of rows.
func (q seriesQuery) seriesCTEs(input, name string) string {
	// One unordered list of (at, value) pairs, sorted afterwards, rather
	// than two lists ordered by at: the same on a file sorted by group and
	// time, and faster on one ordered by time (DEVELOPERS.md).
	return renderStage("gather.sql", struct {
		Points                                                              bool
		By, At, Value, Input, Name, Unsteady, NullAt, Prefix, AtText, Label string
	}{
		Points: q.points, By: q.byList(""), At: quoteIdent(q.at), Value: quoteIdent(q.value),
		Input: input, Name: name, Unsteady: q.unsteadyError(), NullAt: q.nullAtError(),
		Prefix: quoteLiteral(q.function + ": "), AtText: quoteLiteral(quoteIdent(q.at)), Label: q.groupLabel(),
	})
}

// unsteadyError is the SQL expression that fails when a group has another
// number of rows (plumb_rows) than the first pass counted (plumb_counted):
// the source does not give the same rows on every read.
func (q seriesQuery) unsteadyError() string {
	return fmt.Sprintf(`error(%s || 'the source gave group ' || %s || ' ' || plumb_counted || ' rows on one read and ' || plumb_rows || ' on another; '
               || %s || ' reads its source more than once (to count each group''s rows, then once per batch of groups), so the source must give the same rows '
               || 'on every read (no sampling, no LIMIT without ORDER BY); store it in a table first')`,
		quoteLiteral(q.function+": "), q.groupLabel(), quoteLiteral(q.function))
}

// nullAtError is the SQL expression that fails with the group's name and
// its count of rows whose at is NULL.
func (q seriesQuery) nullAtError() string {
	return fmt.Sprintf(`error(%s || 'column ' || %s || ' is NULL in ' || (plumb_rows - plumb_at_present) || ' rows of group ' || %s)`,
		quoteLiteral(q.function+": "), quoteLiteral(quoteIdent(q.at)), q.groupLabel())
}
