// Package diagnosis runs plumb's diagnose table function for the commands
// that do not ask for SQL (plumb diagnose, plumb report): it checks the
// source and its columns first, so a mistake gets one clear line.
package diagnosis

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"strings"

	"github.com/plumb-sql/plumb/stats/defaults"
	"github.com/plumb-sql/plumb/udf"
)

// Spec names the series to diagnose.
type Spec struct {
	Source string   // table or view, file or glob, or (SELECT ...)
	By     []string // group columns
	At     string   // time column
	Value  string   // value column
	Period int      // 0: detect
	Alpha  float64  // 0: defaults.Alpha
	Fill   string   // "": defaults.Fill
	// Shards, when above zero, diagnoses only the groups of shard Shard
	// (0 <= Shard < Shards) and returns them unranked, for combine_diagnoses.
	Shard, Shards int
	// Function is the table function a command runs on the series, named
	// in its messages ("": diagnose).
	Function string
}

// Call returns the SQL table expression diagnose(...) for s.
func (s Spec) Call() string {
	shards := ""
	if s.Shards > 0 {
		shards = fmt.Sprintf(", shard := %d, shards := %d", s.Shard, s.Shards)
	}
	return "diagnose(" + s.Args() + shards + ")"
}

// Args renders the arguments every plumb table function over a series
// takes, as SQL: source, by, at, value, period, alpha and fill.
func (s Spec) Args() string {
	by := make([]string, len(s.By))
	for i, b := range s.By {
		by[i] = udf.QuoteLiteral(b)
	}
	period := "NULL"
	if s.Period > 0 {
		period = fmt.Sprint(s.Period)
	}
	alpha := s.Alpha
	if alpha == 0 {
		alpha = defaults.Alpha
	}
	fill := s.Fill
	if fill == "" {
		fill = defaults.Fill
	}
	return fmt.Sprintf("%s, by := [%s], at := %s, value := %s, period := %s, alpha := %v, fill := %s",
		udf.QuoteLiteral(s.Source), strings.Join(by, ", "), udf.QuoteLiteral(s.At), udf.QuoteLiteral(s.Value),
		period, alpha, udf.QuoteLiteral(fill))
}

// Check verifies that the source can be read and has the named columns,
// with a numeric value column; its errors are single lines meant for people.
func (s Spec) Check(ctx context.Context, conn *sql.Conn) error {
	if len(s.By) == 0 || s.At == "" || s.Value == "" {
		return fmt.Errorf("name the group columns (--by), the time column (--at) and the value column (--value)")
	}
	from, err := udf.SourceSQL(s.Source)
	if err != nil {
		return err
	}
	rows, err := conn.QueryContext(ctx, "SELECT column_name, column_type FROM (DESCRIBE SELECT * FROM "+from+")")
	if err != nil {
		return fmt.Errorf("cannot read %s: %s", s.Source, firstLine(err.Error()))
	}
	defer rows.Close()
	types := map[string]string{}
	var names []string
	for rows.Next() {
		var name, typ string
		if err := rows.Scan(&name, &typ); err != nil {
			return err
		}
		types[name] = typ
		names = append(names, name)
	}
	if err := rows.Err(); err != nil {
		return fmt.Errorf("cannot read %s: %s", s.Source, firstLine(err.Error()))
	}
	var kinds []string
	for _, n := range names {
		kinds = append(kinds, types[n])
	}
	function := s.Function
	if function == "" {
		function = "diagnose"
	}
	problem := udf.SourceColumnsProblem(function, s.Source, s.By, s.At, s.Value, names, kinds, nil)
	if problem != "" && strings.HasPrefix(from, "'") {
		// Only now ask whether the file holds rows, as the SQL check does.
		var some bool
		if err := conn.QueryRowContext(ctx, "SELECT count(*) > 0 FROM (SELECT 1 FROM "+from+" LIMIT 1)").Scan(&some); err == nil {
			problem = udf.SourceColumnsProblem(function, s.Source, s.By, s.At, s.Value, names, kinds, &some)
		}
	}
	if problem != "" {
		return errors.New(problem)
	}
	return nil
}

// firstLine keeps DuckDB's message without its caret diagram.
func firstLine(s string) string {
	line, _, _ := strings.Cut(s, "\n")
	return strings.TrimSpace(line)
}

// Materialize runs diagnose into the TEMP table name on conn (replacing it)
// and returns the number of groups.
func (s Spec) Materialize(ctx context.Context, conn *sql.Conn, name string) (int, error) {
	q := fmt.Sprintf("CREATE OR REPLACE TEMP TABLE %s AS FROM %s", udf.QuoteIdent(name), s.Call())
	if _, err := conn.ExecContext(ctx, q); err != nil {
		return 0, fmt.Errorf("diagnose %s: %s", s.Source, firstLine(err.Error()))
	}
	var n int
	err := conn.QueryRowContext(ctx, "SELECT count(*) FROM "+udf.QuoteIdent(name)).Scan(&n)
	return n, err
}

// CountGroups returns the number of groups diagnose judges for s: the
// distinct keys of its group columns, of its shard when s names one.
func (s Spec) CountGroups(ctx context.Context, db *sql.DB) (int64, error) {
	from, err := udf.SourceSQL(s.Source)
	if err != nil {
		return 0, err
	}
	cols := make([]string, len(s.By))
	texts := make([]string, len(s.By))
	for i, b := range s.By {
		cols[i] = udf.QuoteIdent(b)
		texts[i] = "CAST(" + cols[i] + " AS VARCHAR)"
	}
	q := fmt.Sprintf("SELECT count(*) FROM (SELECT 1 FROM %s GROUP BY %s", from, strings.Join(cols, ", "))
	if s.Shards > 0 {
		// the shard of a key as diagnose computes it (udf/shard.go)
		q += fmt.Sprintf(" HAVING plumb_shard([%s], %d) = %d", strings.Join(texts, ", "), s.Shards, s.Shard)
	}
	var n int64
	err = db.QueryRowContext(ctx, q+")").Scan(&n)
	return n, err
}

// CausesSQL is an SQL expression over a diagnose row that names its causes
// in one short text: "mean: trend; spread: level; seasonal: fixed; 3
// outliers". Commands show it beside the violations.
const CausesSQL = `concat_ws('; ', 'mean: ' || replace(mean_cause, '_', ' '), 'spread: ' || spread_cause, 'seasonal: ' || seasonal_kind,
	CASE WHEN demand_class IN ('intermittent', 'lumpy') THEN demand_class || ' demand' END,
	CASE WHEN outliers > 0 THEN outliers || ' outlier' || CASE WHEN outliers > 1 THEN 's' ELSE '' END END)`
