package pgserver

import "regexp"

// psql's \d NAME (PostgreSQL 15 client) asks the catalogue in steps; the
// compatibility layer (catalog.go) answers them all through DuckDB but one:
// the list of publications a table belongs to, which selects from
// generate_series(...) s and uses s as a number, a PostgreSQL reading of a
// one-column set-returning function that DuckDB does not share. plumb has
// no publications, so that step is answered with no rows. This is the one
// whole-statement rule of the layer (the others work on tokens, rewrite.go).
var psqlDescribeFooter = regexp.MustCompile(`(?is)\bFROM\s+pg_catalog\.pg_publication\b`)

// rewritePsqlDescribe returns an empty answer to psql's footer queries, or
// "" when sql is not one.
func rewritePsqlDescribe(sql string) string {
	if psqlDescribeFooter.MatchString(sql) {
		return `SELECT NULL AS none WHERE false`
	}
	return ""
}
