package pgserver

import (
	"fmt"
	"regexp"
	"strings"
)

// psql's \d NAME (PostgreSQL 15 client) asks the catalogue in steps: find
// the relation's oid by a name pattern, read the relation's flags, read its
// columns, then ask for policies, extended statistics, publications and
// inheritance. DuckDB has a pg_catalog of its own, but not psql's operator
// and collation syntax nor every column psql reads, so plumb answers each
// step from DuckDB's duckdb_tables(), duckdb_views() and duckdb_columns().
// Only the steps psql takes for a plain table or view are answered (and
// \d+'s storage columns and view definition); psql skips indexes,
// constraints, rules and triggers because the flags say there are none.
var (
	psqlDescribeLookup = regexp.MustCompile(`(?is)^SELECT c\.oid,\s*n\.nspname,\s*c\.relname\s+FROM pg_catalog\.pg_class c\s+LEFT JOIN pg_catalog\.pg_namespace n ON n\.oid = c\.relnamespace\s+WHERE c\.relname OPERATOR\(pg_catalog\.~\) '((?:[^']|'')*)'(?:\s+COLLATE pg_catalog\.default)?(?:\s+AND n\.nspname OPERATOR\(pg_catalog\.~\) '((?:[^']|'')*)'(?:\s+COLLATE pg_catalog\.default)?)?`)
	psqlDescribeFlags  = regexp.MustCompile(`(?is)^SELECT c\.relchecks,\s*c\.relkind,.*WHERE c\.oid = '(\d+)'`)
	psqlDescribeCols   = regexp.MustCompile(`(?is)^SELECT a\.attname,.*FROM pg_catalog\.pg_attribute a\s+WHERE a\.attrelid = '(\d+)' AND a\.attnum > 0`)
	psqlDescribeView   = regexp.MustCompile(`(?is)^SELECT pg_catalog\.pg_get_viewdef\('(\d+)'::pg_catalog\.oid, true\)\s*;?$`)
	psqlDescribeFooter = regexp.MustCompile(`(?is)\bpg_catalog\.pg_(policy|statistic_ext|publication|inherits)\b`)
)

// describeRelations unions DuckDB's tables and views as psql's \d sees
// relations: oid, schema, name and kind.
const describeRelations = `(SELECT table_oid AS oid, schema_name, table_name AS name, 'r' AS kind FROM duckdb_tables() WHERE NOT internal
 UNION ALL SELECT view_oid, schema_name, view_name, 'v' FROM duckdb_views() WHERE NOT internal)`

// rewritePsqlDescribe returns DuckDB's answer to one step of psql's \d, or
// "" when sql is not one.
func rewritePsqlDescribe(sql string) string {
	if m := psqlDescribeLookup.FindStringSubmatch(sql); m != nil {
		where := fmt.Sprintf("regexp_full_match(name, '%s')", m[1])
		if m[2] != "" {
			where += fmt.Sprintf(" AND regexp_full_match(schema_name, '%s')", m[2])
		}
		return fmt.Sprintf(`SELECT oid::BIGINT AS oid, schema_name AS nspname, name AS relname FROM %s r WHERE %s ORDER BY 2, 3`,
			describeRelations, where)
	}
	if m := psqlDescribeFlags.FindStringSubmatch(sql); m != nil {
		// The columns psql 15 reads, in its order: no checks, indexes, rules,
		// triggers or row security; not a partition; no options or
		// tablespace; a permanent relation with default replica identity.
		return fmt.Sprintf(`SELECT 0 AS relchecks, kind AS relkind, false AS relhasindex, false AS relhasrules,
       false AS relhastriggers, false AS relrowsecurity, false AS relforcerowsecurity, false AS relhasoids,
       false AS relispartition, '' AS reloptions, 0 AS reltablespace, '' AS reloftype, 'p' AS relpersistence,
       'd' AS relreplident, CASE kind WHEN 'r' THEN 'duckdb' END AS amname
FROM %s r WHERE oid = %s`, describeRelations, m[1])
	}
	if m := psqlDescribeCols.FindStringSubmatch(sql); m != nil {
		// \d+ asks for more columns after these, in this order.
		extra := ""
		for _, c := range []struct{ asked, answer string }{
			{"a.attstorage", `, 'p' AS attstorage`},
			{"attcompression", `, '' AS attcompression`},
			{"attstattarget", `, NULL::INTEGER AS attstattarget`},
			{"col_description", `, comment AS description`},
		} {
			if strings.Contains(sql, c.asked) {
				extra += c.answer
			}
		}
		return fmt.Sprintf(`SELECT column_name AS attname, lower(data_type) AS format_type, column_default AS attdefault,
       NOT is_nullable AS attnotnull, NULL::VARCHAR AS attcollation, '' AS attidentity, '' AS attgenerated%s
FROM duckdb_columns() WHERE table_oid = %s ORDER BY column_index`, extra, m[1])
	}
	if m := psqlDescribeView.FindStringSubmatch(sql); m != nil { // \d+ of a view
		return fmt.Sprintf(`SELECT sql AS pg_get_viewdef FROM duckdb_views() WHERE view_oid = %s`, m[1])
	}
	if psqlDescribeFooter.MatchString(sql) {
		return `SELECT NULL AS none WHERE false`
	}
	return ""
}
