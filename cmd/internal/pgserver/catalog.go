package pgserver

import (
	"context"
	"database/sql"
	"fmt"
	"sort"
	"strings"
)

// The PostgreSQL compatibility layer, part one: what clients' catalogue
// queries and identity calls need, answered by DuckDB itself. Every session's
// connection gets TEMP views and macros (created below when the session
// starts, dropped with the connection) that shadow DuckDB's own pg_catalog
// views and functions: DuckDB searches the temp catalogue first, so
// `SELECT ... FROM pg_type` reads plumb's pg_type. Names qualified with
// pg_catalog or information_schema reach them through one token rule
// (rewrite.go), since the temp catalogue cannot hold those schemas.
//
// To add an object: append its CREATE statement to compatObjects (a view
// or macro named as PostgreSQL names it), and its name is shadowed in
// qualified references too; add a row to the client matrix that needs it.

// identity is what a session's identity functions answer.
type identity struct {
	user, database, version string
	pid                     uint32
	users                   []string // every configured user, for pg_roles
}

// compatObject is one TEMP object of the compatibility layer.
type compatObject struct {
	name string // as clients spell it, unqualified
	sql  func(id identity, oids catalogOIDs) string
}

// catalogOIDs are OIDs of DuckDB's catalogue the views refer to.
type catalogOIDs struct {
	pgCatalog, informationSchema int64
	database                     string // DuckDB's name of the database clients use
}

func (id identity) roleRows() string {
	var rows []string
	for i, u := range id.users {
		rows = append(rows, fmt.Sprintf("(%d, %s)", 16384+i, sqlQuote(u)))
	}
	return strings.Join(rows, ", ")
}

// compatObjects lists the layer's views and macros.
var compatObjects = []compatObject{
	// Identity: version() names plumb and its DuckDB; the user and the
	// database are the session's.
	sessionMacro("version", func(id identity) string { return id.version }),
	sessionMacro("current_database", func(id identity) string { return id.database }),
	sessionMacro("current_catalog", func(id identity) string { return id.database }),
	sessionMacro("current_user", func(id identity) string { return id.user }),
	sessionMacro("session_user", func(id identity) string { return id.user }),
	sessionMacro("current_role", func(id identity) string { return id.user }),
	{"pg_backend_pid", func(id identity, _ catalogOIDs) string {
		return fmt.Sprintf("CREATE OR REPLACE TEMP MACRO pg_backend_pid() AS %d", id.pid)
	}},
	{"pg_is_in_recovery", constant("CREATE OR REPLACE TEMP MACRO pg_is_in_recovery() AS false")},
	{"pg_encoding_to_char", constant("CREATE OR REPLACE TEMP MACRO pg_encoding_to_char(e) AS 'UTF8'")},
	{"pg_get_serial_sequence", constant("CREATE OR REPLACE TEMP MACRO pg_get_serial_sequence(t, c) AS NULL::VARCHAR")},
	{"pg_total_relation_size", constant("CREATE OR REPLACE TEMP MACRO pg_total_relation_size(o) AS 0::BIGINT")},
	{"pg_table_size", constant("CREATE OR REPLACE TEMP MACRO pg_table_size(o) AS 0::BIGINT")},
	{"pg_relation_size", constant("CREATE OR REPLACE TEMP MACRO pg_relation_size(o) AS 0::BIGINT")},
	// Arrays: PostgreSQL's arrays are DuckDB's lists, one-dimensional and
	// starting at 1.
	{"array_upper", constant("CREATE OR REPLACE TEMP MACRO array_upper(a, d) AS CASE WHEN d = 1 AND len(a) > 0 THEN len(a) END")},
	{"array_lower", constant("CREATE OR REPLACE TEMP MACRO array_lower(a, d) AS CASE WHEN d = 1 AND len(a) > 0 THEN 1 END")},
	{"array_ndims", constant("CREATE OR REPLACE TEMP MACRO array_ndims(a) AS CASE WHEN len(a) > 0 THEN 1 END")},
	// information_schema._pg_expandarray: one row per element, (x, n), a
	// set-returning call in a select list (pgjdbc's getPrimaryKeys).
	{"_pg_expandarray", constant("CREATE OR REPLACE TEMP MACRO _pg_expandarray(a) AS unnest(list_transform(range(1, len(a) + 1), i -> {'x': a[i], 'n': i}))")},
	// SQLAlchemy's get_columns builds identity options with it, in a
	// subquery over sequences that never yields a row here.
	{"json_build_object", constant("CREATE OR REPLACE TEMP MACRO json_build_object(k1, v1, k2, v2, k3, v3, k4, v4, k5, v5, k6, v6, k7, v7) AS NULL::VARCHAR")},
	// Users: every configured user is a role that can log in.
	{"pg_roles", func(id identity, _ catalogOIDs) string {
		return `CREATE OR REPLACE TEMP VIEW pg_roles AS SELECT oid, rolname, false AS rolsuper, true AS rolinherit,
	false AS rolcreaterole, true AS rolcreatedb, true AS rolcanlogin, false AS rolreplication, false AS rolbypassrls,
	-1 AS rolconnlimit, '********' AS rolpassword, NULL::TIMESTAMPTZ AS rolvaliduntil, NULL::VARCHAR[] AS rolconfig
	FROM (VALUES ` + id.roleRows() + `) r(oid, rolname)`
	}},
	{"pg_user", constant(`CREATE OR REPLACE TEMP VIEW pg_user AS SELECT rolname AS usename, oid AS usesysid, rolcreatedb AS usecreatedb,
	rolsuper AS usesuper, false AS userepl, false AS usebypassrls, rolpassword AS passwd, rolvaliduntil AS valuntil, rolconfig AS useconfig FROM pg_roles`)},
	{"pg_auth_members", constant(`CREATE OR REPLACE TEMP VIEW pg_auth_members AS SELECT 0::BIGINT AS roleid, 0::BIGINT AS member, 0::BIGINT AS grantor, false AS admin_option WHERE false`)},
	{"pg_get_userbyid", constant(`CREATE OR REPLACE TEMP MACRO pg_get_userbyid(o) AS coalesce((SELECT rolname FROM pg_roles WHERE oid = o), current_user())`)},
	// The database: one, named as the client's dbname.
	{"pg_database", func(id identity, _ catalogOIDs) string {
		return `CREATE OR REPLACE TEMP VIEW pg_database AS SELECT 16383::BIGINT AS oid, ` + sqlQuote(id.database) + ` AS datname,
	16384::BIGINT AS datdba, 6 AS encoding, 'c' AS datlocprovider, 'C' AS datcollate, 'C' AS datctype, NULL::VARCHAR AS daticulocale,
	false AS datistemplate, true AS datallowconn, -1 AS datconnlimit, 0::BIGINT AS dattablespace, NULL::VARCHAR[] AS datacl`
	}},
	{"pg_extension", constant(`CREATE OR REPLACE TEMP VIEW pg_extension AS SELECT 0::BIGINT AS oid, ''::VARCHAR AS extname, 0::BIGINT AS extowner,
	0::BIGINT AS extnamespace, false AS extrelocatable, ''::VARCHAR AS extversion WHERE false`)},
	// Schemas: DuckDB's own (of the database clients use), and pg_catalog
	// and information_schema, which pg_type rows point at.
	{"pg_namespace", func(_ identity, o catalogOIDs) string {
		return `CREATE OR REPLACE TEMP VIEW pg_namespace AS
	SELECT oid, schema_name AS nspname, 16384::BIGINT AS nspowner, NULL::VARCHAR[] AS nspacl FROM duckdb_schemas()
	WHERE database_name = ` + sqlQuote(o.database) + ` OR (database_name = 'system' AND schema_name IN ('pg_catalog', 'information_schema'))`
	}},
	// Types: a row for every OID the server sends.
	{"pg_type", func(_ identity, o catalogOIDs) string {
		return `CREATE OR REPLACE TEMP VIEW pg_type AS SELECT oid::BIGINT AS oid, typname, typnamespace::BIGINT AS typnamespace, 16384::BIGINT AS typowner,
	typlen::SMALLINT AS typlen, typbyval, typtype, typcategory, false AS typispreferred, true AS typisdefined, typdelim,
	0::BIGINT AS typrelid, NULL::VARCHAR AS typsubscript, typelem::BIGINT AS typelem, typarray::BIGINT AS typarray, typinput, typoutput,
	typinput AS typreceive, typoutput AS typsend, '-' AS typmodin, '-' AS typmodout, '-' AS typanalyze,
	CASE WHEN typlen = 8 THEN 'd' WHEN typlen = 4 THEN 'i' WHEN typlen = 2 THEN 's' ELSE 'c' END AS typalign, 'p' AS typstorage,
	false AS typnotnull, 0::BIGINT AS typbasetype, -1 AS typtypmod, 0 AS typndims, 0::BIGINT AS typcollation,
	NULL::VARCHAR AS typdefaultbin, NULL::VARCHAR AS typdefault, NULL::VARCHAR[] AS typacl, format_name
	FROM (VALUES ` + pgTypeRows(o.pgCatalog) + `) t(oid, typname, typnamespace, typlen, typbyval, typtype, typcategory, typdelim,
	typelem, typarray, typinput, typoutput, format_name)`
	}},
	{"format_type", constant(`CREATE OR REPLACE TEMP MACRO format_type(o, m) AS (SELECT format_name FROM pg_type WHERE oid = o)`)},
	{"pg_type_is_visible", constant(`CREATE OR REPLACE TEMP MACRO pg_type_is_visible(o) AS true`)},
	// Columns, with atttypid the OID the server sends such a column as.
	{"pgcompat_type_oids", constant(`CREATE OR REPLACE TEMP VIEW pgcompat_type_oids AS SELECT * FROM (VALUES ` + typeOIDRows() + `) t(type_name, oid)`)},
	{"pg_attribute", constant(`CREATE OR REPLACE TEMP VIEW pg_attribute AS SELECT table_oid AS attrelid, column_name AS attname,
	coalesce(m.oid, CASE WHEN data_type LIKE 'DECIMAL%[]' THEN ` + fmt.Sprint(arrayOf[oidNumeric]) + ` WHEN data_type LIKE 'DECIMAL%' AND data_type NOT LIKE '%]' THEN ` + fmt.Sprint(oidNumeric) + `
	ELSE ` + fmt.Sprint(oidJSONText) + ` END)::BIGINT AS atttypid, -1 AS attstattarget, -1::SMALLINT AS attlen, column_index::SMALLINT AS attnum,
	CASE WHEN data_type LIKE '%[]' THEN 1 ELSE 0 END AS attndims, -1 AS attcacheoff,
	CASE WHEN data_type LIKE 'DECIMAL%' THEN ((numeric_precision << 16) | numeric_scale) + 4 ELSE -1 END AS atttypmod,
	false AS attbyval, 'p' AS attalign, 'p' AS attstorage, '' AS attcompression, NOT is_nullable AS attnotnull,
	column_default IS NOT NULL AS atthasdef, false AS atthasmissing, '' AS attidentity, '' AS attgenerated, false AS attisdropped,
	true AS attislocal, 0 AS attinhcount, 0::BIGINT AS attcollation, NULL::VARCHAR[] AS attacl, NULL::VARCHAR[] AS attoptions,
	NULL::VARCHAR[] AS attfdwoptions, NULL::VARCHAR AS attmissingval
	FROM duckdb_columns() c LEFT JOIN pgcompat_type_oids m ON m.type_name = c.data_type`)},
	{"pg_attrdef", constant(`CREATE OR REPLACE TEMP VIEW pg_attrdef AS SELECT table_oid * 10000 + column_index AS oid, table_oid AS adrelid,
	column_index::SMALLINT AS adnum, column_default AS adbin FROM duckdb_columns() WHERE column_default IS NOT NULL`)},
	{"pg_get_expr", constant(`CREATE OR REPLACE TEMP MACRO pg_get_expr(e, r, p := false) AS e::VARCHAR`)},
	// Relations: DuckDB's, plus a primary-key index for every table that
	// has a primary key (DuckDB keeps those as constraints).
	{"pgcompat_primary_keys", constant(`CREATE OR REPLACE TEMP VIEW pgcompat_primary_keys AS SELECT table_oid * 100 + constraint_index + 1 AS oid,
	table_oid, schema_oid, table_name || '_pkey' AS name, list_transform(constraint_column_indexes, i -> (i + 1)::SMALLINT) AS keys,
	constraint_column_names AS key_names FROM duckdb_constraints() WHERE constraint_type = 'PRIMARY KEY'`)},
	// DuckDB's pg_class without its internal objects and without this
	// layer's own TEMP views.
	{"pg_class", func(identity, catalogOIDs) string {
		return `CREATE OR REPLACE TEMP VIEW pg_class AS SELECT * REPLACE (relowner::BIGINT AS relowner,
	CASE WHEN relkind = 'r' THEN (SELECT count(*) > 0 FROM pgcompat_primary_keys k WHERE k.table_oid = c.oid) OR relhasindex ELSE relhasindex END AS relhasindex,
	coalesce(relreplident, 'd') AS relreplident, reloptions::VARCHAR[] AS reloptions), false AS relforcerowsecurity
	FROM system.pg_catalog.pg_class c
	WHERE oid NOT IN (SELECT view_oid FROM duckdb_views() WHERE internal OR temporary AND view_name IN ` + compatNameSQL + `)
	AND oid NOT IN (SELECT table_oid FROM duckdb_tables() WHERE internal OR temporary AND starts_with(table_name, '` + cursorTablePrefix + `'))
	UNION ALL BY NAME SELECT oid, name AS relname, schema_oid AS relnamespace, 'i' AS relkind, 0::BIGINT AS relowner, 0 AS reltablespace,
	'p' AS relpersistence, len(keys) AS relnatts, false AS relhasindex, 0::BIGINT AS relam FROM pgcompat_primary_keys`
	}},
	// Indexes: DuckDB's (their key columns found by name) and the
	// primary keys'; indkey, indoption and indclass are lists, PostgreSQL's
	// int2vector and oidvector.
	{"pgcompat_index_keys", constant(`CREATE OR REPLACE TEMP VIEW pgcompat_index_keys AS
	SELECT e.index_oid, list(c.column_index::SMALLINT ORDER BY e.pos) AS keys, list(c.column_name ORDER BY e.pos) AS key_names
	FROM (SELECT index_oid, table_oid, unnest(string_split(trim(expressions, '[]'), ', ')) AS name,
	      generate_subscripts(string_split(trim(expressions, '[]'), ', '), 1) AS pos FROM duckdb_indexes()) e
	JOIN duckdb_columns() c ON c.table_oid = e.table_oid AND c.column_name = trim(e.name, '"''') GROUP BY e.index_oid`)},
	{"pg_index", constant(`CREATE OR REPLACE TEMP VIEW pg_index AS
	SELECT i.index_oid AS indexrelid, i.table_oid AS indrelid, coalesce(len(k.keys), 0)::SMALLINT AS indnatts, coalesce(len(k.keys), 0)::SMALLINT AS indnkeyatts,
	i.is_unique AS indisunique, i.is_primary AS indisprimary, false AS indisexclusion, true AS indimmediate, false AS indisclustered,
	true AS indisvalid, false AS indcheckxmin, true AS indisready, true AS indislive, false AS indisreplident,
	coalesce(k.keys, []::SMALLINT[]) AS indkey, list_transform(coalesce(k.keys, []::SMALLINT[]), x -> 0::BIGINT) AS indcollation,
	list_transform(coalesce(k.keys, []::SMALLINT[]), x -> 0::BIGINT) AS indclass, list_transform(coalesce(k.keys, []::SMALLINT[]), x -> 0::SMALLINT) AS indoption,
	CASE WHEN k.keys IS NULL THEN i.expressions END AS indexprs, NULL::VARCHAR AS indpred
	FROM duckdb_indexes() i LEFT JOIN pgcompat_index_keys k ON k.index_oid = i.index_oid
	UNION ALL SELECT oid, table_oid, len(keys), len(keys), true, true, false, true, false, true, false, true, true, false, keys,
	list_transform(keys, x -> 0::BIGINT), list_transform(keys, x -> 0::BIGINT), list_transform(keys, x -> 0::SMALLINT), NULL, NULL FROM pgcompat_primary_keys`)},
	// Index definitions as PostgreSQL prints them (psql shows what follows
	// USING): CREATE [UNIQUE] INDEX name ON schema.table USING art (columns).
	{"pgcompat_indexdef", constant(`CREATE OR REPLACE TEMP MACRO pgcompat_indexdef(o) AS coalesce(
	(SELECT 'CREATE ' || CASE WHEN is_unique THEN 'UNIQUE ' ELSE '' END || 'INDEX ' || index_name || ' ON ' || schema_name || '.' || table_name
		|| ' USING art (' || trim(expressions, '[]') || ')' FROM duckdb_indexes() WHERE index_oid = o),
	(SELECT 'CREATE UNIQUE INDEX ' || k.name || ' ON ' || t.schema_name || '.' || t.table_name || ' USING art ('
		|| array_to_string(k.key_names, ', ') || ')'
		FROM pgcompat_primary_keys k JOIN duckdb_tables() t ON t.table_oid = k.table_oid WHERE k.oid = o))`)},
	// With a column number, pg_get_indexdef names that key column.
	{"pg_get_indexdef", constant(`CREATE OR REPLACE TEMP MACRO pg_get_indexdef(o) AS pgcompat_indexdef(o),
	(o, c, p) AS CASE WHEN c = 0 THEN pgcompat_indexdef(o) ELSE coalesce((SELECT key_names[c] FROM pgcompat_index_keys WHERE index_oid = o),
	(SELECT key_names[c] FROM pgcompat_primary_keys WHERE oid = o)) END`)},
	// Comments: DuckDB keeps them on its catalogue entries.
	{"col_description", constant(`CREATE OR REPLACE TEMP MACRO col_description(o, n) AS (SELECT comment FROM duckdb_columns() WHERE table_oid = o AND column_index = n)`)},
	{"pgcompat_comment", constant(`CREATE OR REPLACE TEMP MACRO pgcompat_comment(o) AS
	coalesce((SELECT comment FROM duckdb_tables() WHERE table_oid = o), (SELECT comment FROM duckdb_views() WHERE view_oid = o))`)},
	{"obj_description", constant(`CREATE OR REPLACE TEMP MACRO obj_description(o) AS pgcompat_comment(o), (o, c) AS pgcompat_comment(o)`)},
	// Functions: DuckDB's and plumb's, in the main schema clients see, and
	// this layer's in pg_catalog.
	{"pg_proc", func(_ identity, o catalogOIDs) string {
		return `CREATE OR REPLACE TEMP VIEW pg_proc AS SELECT f.function_oid AS oid, function_name AS proname,
	CASE WHEN f.schema_name = 'pg_catalog' OR f.database_name = 'temp' AND f.function_name IN ` + compatNameSQL + ` THEN ` + fmt.Sprint(o.pgCatalog) + `
	ELSE (SELECT oid FROM duckdb_schemas() WHERE database_name = ` + sqlQuote(o.database) + ` AND schema_name = 'main') END::BIGINT AS pronamespace,
	16384::BIGINT AS proowner, 0::BIGINT AS prolang, 0 AS procost, 0 AS prorows, 0::BIGINT AS provariadic, 0::BIGINT AS prosupport,
	CASE WHEN function_type = 'aggregate' THEN 'a' ELSE 'f' END AS prokind, false AS prosecdef, false AS proleakproof, false AS proisstrict,
	function_type IN ('table', 'table_macro') AS proretset, 'v' AS provolatile, 'u' AS proparallel, len(parameters)::SMALLINT AS pronargs,
	0::SMALLINT AS pronargdefaults, 0::BIGINT AS prorettype, []::BIGINT[] AS proargtypes, NULL::BIGINT[] AS proallargtypes,
	NULL::VARCHAR[] AS proargmodes, parameters AS proargnames, NULL::VARCHAR AS proargdefaults, NULL::VARCHAR AS prosrc, NULL::VARCHAR AS probin,
	macro_definition AS prosqlbody, NULL::VARCHAR[] AS proconfig, NULL::VARCHAR[] AS proacl FROM duckdb_functions() f
	WHERE NOT (f.database_name = 'temp' AND starts_with(f.function_name, 'pgcompat_'))`
	}},
	// Argument and result lists as psql's \df prints them.
	{"pg_get_function_result", constant(`CREATE OR REPLACE TEMP MACRO pg_get_function_result(o) AS (SELECT coalesce(any_value(return_type), any_value(function_type)) FROM duckdb_functions() WHERE function_oid = o)`)},
	{"pg_get_function_arguments", constant(`CREATE OR REPLACE TEMP MACRO pg_get_function_arguments(o) AS (SELECT array_to_string(any_value(parameters), ', ') FROM duckdb_functions() WHERE function_oid = o)`)},
	{"pg_get_function_identity_arguments", constant(`CREATE OR REPLACE TEMP MACRO pg_get_function_identity_arguments(o) AS pg_get_function_arguments(o)`)},
	// Catalogues psql's \d reads that are empty here: no policies,
	// extended statistics, publications, inheritance, triggers or rules.
	{"pg_policy", constant(`CREATE OR REPLACE TEMP VIEW pg_policy AS SELECT 0::BIGINT AS oid, '' AS polname, 0::BIGINT AS polrelid, '' AS polcmd,
	true AS polpermissive, []::BIGINT[] AS polroles, NULL::VARCHAR AS polqual, NULL::VARCHAR AS polwithcheck WHERE false`)},
	{"pg_statistic_ext", constant(`CREATE OR REPLACE TEMP VIEW pg_statistic_ext AS SELECT 0::BIGINT AS oid, 0::BIGINT AS stxrelid, '' AS stxname,
	0::BIGINT AS stxnamespace, 0::BIGINT AS stxowner, -1 AS stxstattarget, []::SMALLINT[] AS stxkeys, []::VARCHAR[] AS stxkind, NULL::VARCHAR AS stxexprs WHERE false`)},
	{"pg_publication", constant(`CREATE OR REPLACE TEMP VIEW pg_publication AS SELECT 0::BIGINT AS oid, '' AS pubname, 0::BIGINT AS pubowner,
	false AS puballtables, false AS pubinsert, false AS pubupdate, false AS pubdelete, false AS pubtruncate, false AS pubviaroot WHERE false`)},
	{"pg_publication_rel", constant(`CREATE OR REPLACE TEMP VIEW pg_publication_rel AS SELECT 0::BIGINT AS oid, 0::BIGINT AS prpubid, 0::BIGINT AS prrelid,
	NULL::VARCHAR AS prqual, NULL::SMALLINT[] AS prattrs WHERE false`)},
	{"pg_publication_namespace", constant(`CREATE OR REPLACE TEMP VIEW pg_publication_namespace AS SELECT 0::BIGINT AS oid, 0::BIGINT AS pnpubid, 0::BIGINT AS pnnspid WHERE false`)},
	{"pg_inherits", constant(`CREATE OR REPLACE TEMP VIEW pg_inherits AS SELECT 0::BIGINT AS inhrelid, 0::BIGINT AS inhparent, 0 AS inhseqno, false AS inhdetachpending WHERE false`)},
	{"pg_trigger", constant(`CREATE OR REPLACE TEMP VIEW pg_trigger AS SELECT 0::BIGINT AS oid, 0::BIGINT AS tgrelid, 0::BIGINT AS tgparentid, '' AS tgname,
	0::BIGINT AS tgfoid, 0 AS tgtype, 'O' AS tgenabled, false AS tgisinternal, 0::BIGINT AS tgconstrrelid, 0::BIGINT AS tgconstrindid,
	0::BIGINT AS tgconstraint, false AS tgdeferrable, false AS tginitdeferred, 0 AS tgnargs WHERE false`)},
	{"pg_rewrite", constant(`CREATE OR REPLACE TEMP VIEW pg_rewrite AS SELECT 0::BIGINT AS oid, '' AS rulename, 0::BIGINT AS ev_class, '1' AS ev_type,
	'O' AS ev_enabled, false AS is_instead WHERE false`)},
	{"pg_get_statisticsobjdef_columns", constant(`CREATE OR REPLACE TEMP MACRO pg_get_statisticsobjdef_columns(o) AS NULL::VARCHAR`)},
	{"pg_get_triggerdef", constant(`CREATE OR REPLACE TEMP MACRO pg_get_triggerdef(o, p := false) AS NULL::VARCHAR`)},
	{"pg_get_ruledef", constant(`CREATE OR REPLACE TEMP MACRO pg_get_ruledef(o, p := false) AS NULL::VARCHAR`)},
	{"pg_relation_is_publishable", constant(`CREATE OR REPLACE TEMP MACRO pg_relation_is_publishable(o) AS false`)},
	{"pg_get_viewdef", constant(`CREATE OR REPLACE TEMP MACRO pg_get_viewdef(o) AS (SELECT sql FROM duckdb_views() WHERE view_oid = o),
	(o, pretty) AS (SELECT sql FROM duckdb_views() WHERE view_oid = o)`)},
	{"pg_get_partkeydef", constant(`CREATE OR REPLACE TEMP MACRO pg_get_partkeydef(o) AS NULL::VARCHAR`)},
	{"pg_get_partition_constraintdef", constant(`CREATE OR REPLACE TEMP MACRO pg_get_partition_constraintdef(o) AS NULL::VARCHAR`)},
	{"current_setting", constant(`CREATE OR REPLACE TEMP MACRO current_setting(n) AS (SELECT plumb_s.setting FROM pgcompat_settings plumb_s WHERE plumb_s.name = lower(n)),
	(n, missing_ok) AS (SELECT plumb_s.setting FROM pgcompat_settings plumb_s WHERE plumb_s.name = lower(n))`)},
	{"pg_settings", constant(`CREATE OR REPLACE TEMP VIEW pg_settings AS SELECT name, setting, NULL::VARCHAR AS unit, 'Client Connection Defaults' AS category,
	'' AS short_desc, NULL::VARCHAR AS extra_desc, 'user' AS context, 'string' AS vartype, 'default' AS source,
	NULL::VARCHAR AS min_val, NULL::VARCHAR AS max_val, NULL::VARCHAR[] AS enumvals, setting AS boot_val, setting AS reset_val,
	NULL::VARCHAR AS sourcefile, NULL::INTEGER AS sourceline, false AS pending_restart FROM pgcompat_settings`)},
}

// compatNameSQL is the layer's object names as a SQL list, for pg_class
// to leave them out.
var compatNameSQL string

func init() {
	names := []string{sqlQuote("pgcompat_settings")}
	for _, o := range compatObjects {
		names = append(names, sqlQuote(o.name))
	}
	compatNameSQL = "(" + strings.Join(names, ", ") + ")"
}

// sessionMacro is a macro without arguments that answers a value of the
// session, as a string literal.
func sessionMacro(name string, value func(identity) string) compatObject {
	return compatObject{name, func(id identity, _ catalogOIDs) string {
		return "CREATE OR REPLACE TEMP MACRO " + name + "() AS " + sqlQuote(value(id))
	}}
}

func constant(sql string) func(identity, catalogOIDs) string {
	return func(identity, catalogOIDs) string { return sql }
}

// compatNames are the objects qualified references are redirected to.
var compatNames = func() map[string]bool {
	m := map[string]bool{}
	for _, o := range compatObjects {
		m[o.name] = true
	}
	return m
}()

// setupCompat creates the compatibility objects on a session's connection.
func setupCompat(ctx context.Context, conn *sql.Conn, id identity, params map[string]string) error {
	var o catalogOIDs
	if err := conn.QueryRowContext(ctx, `SELECT max(oid) FILTER (schema_name = 'pg_catalog'), max(oid) FILTER (schema_name = 'information_schema')
		FROM duckdb_schemas() WHERE database_name = 'system'`).Scan(&o.pgCatalog, &o.informationSchema); err != nil {
		return fmt.Errorf("compatibility layer: %w", err)
	}
	if err := conn.QueryRowContext(ctx, "SELECT current_database()").Scan(&o.database); err != nil {
		return fmt.Errorf("compatibility layer: %w", err)
	}
	var stmts []string
	stmts = append(stmts, settingsView(params))
	for _, t := range castTypes {
		stmts = append(stmts, fmt.Sprintf("CREATE TEMP TYPE %s AS %s", quoteIdentifier(t.name), t.as))
	}
	for _, obj := range compatObjects {
		stmts = append(stmts, obj.sql(id, o))
	}
	// One Exec for all: a round of parsing per statement is what remains.
	if _, err := conn.ExecContext(ctx, strings.Join(stmts, ";\n")); err != nil {
		return fmt.Errorf("compatibility layer: %w", err)
	}
	return nil
}

func settingsView(params map[string]string) string {
	names := make([]string, 0, len(clientParameters))
	for n := range clientParameters {
		names = append(names, n)
	}
	sort.Strings(names)
	var rows []string
	for _, n := range names {
		v := clientParameters[n]
		if p, ok := params[n]; ok {
			v = p
		}
		rows = append(rows, fmt.Sprintf("(%s, %s)", sqlQuote(n), sqlQuote(v)))
	}
	return "CREATE OR REPLACE TEMP VIEW pgcompat_settings AS SELECT * FROM (VALUES " + strings.Join(rows, ", ") + ") s(name, setting)"
}

// castType is a PostgreSQL type DuckDB lacks that catalogue queries cast
// to; it becomes a TEMP type alias. Casts of a string literal to regclass,
// regtype or regproc are looked up by name instead (rewrite.go).
type castType struct{ name, as string }

var castTypes = []castType{
	{"regclass", "BIGINT"}, {"regtype", "BIGINT"}, {"regproc", "VARCHAR"}, {"regprocedure", "VARCHAR"},
	{"regnamespace", "BIGINT"}, {"regrole", "BIGINT"}, {"xid", "BIGINT"}, {"name", "VARCHAR"},
	{"int2vector", "SMALLINT[]"}, {"oidvector", "BIGINT[]"},
}

// quoteIdentifier double-quotes a name.
func quoteIdentifier(s string) string { return `"` + strings.ReplaceAll(s, `"`, `""`) + `"` }
