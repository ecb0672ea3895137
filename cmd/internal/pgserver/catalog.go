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
	{"version", func(id identity, _ catalogOIDs) string {
		return "CREATE OR REPLACE TEMP MACRO version() AS " + sqlQuote(id.version)
	}},
	{"current_database", func(id identity, _ catalogOIDs) string {
		return "CREATE OR REPLACE TEMP MACRO current_database() AS " + sqlQuote(id.database)
	}},
	{"current_catalog", func(id identity, _ catalogOIDs) string {
		return "CREATE OR REPLACE TEMP MACRO current_catalog() AS " + sqlQuote(id.database)
	}},
	{"current_user", func(id identity, _ catalogOIDs) string {
		return "CREATE OR REPLACE TEMP MACRO current_user() AS " + sqlQuote(id.user)
	}},
	{"session_user", func(id identity, _ catalogOIDs) string {
		return "CREATE OR REPLACE TEMP MACRO session_user() AS " + sqlQuote(id.user)
	}},
	{"current_role", func(id identity, _ catalogOIDs) string {
		return "CREATE OR REPLACE TEMP MACRO current_role() AS " + sqlQuote(id.user)
	}},
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
	{"pg_attribute", constant(`CREATE OR REPLACE TEMP VIEW pg_attribute AS SELECT table_oid AS attrelid, column_name AS attname,
	(` + oidOfTypeSQL("data_type") + `)::BIGINT AS atttypid, 0 AS attstattarget, -1::SMALLINT AS attlen, column_index::SMALLINT AS attnum,
	CASE WHEN data_type LIKE '%[]' THEN 1 ELSE 0 END AS attndims, -1 AS attcacheoff,
	CASE WHEN data_type LIKE 'DECIMAL%' THEN ((numeric_precision << 16) | numeric_scale) + 4 ELSE -1 END AS atttypmod,
	false AS attbyval, 'p' AS attalign, 'p' AS attstorage, '' AS attcompression, NOT is_nullable AS attnotnull,
	column_default IS NOT NULL AS atthasdef, false AS atthasmissing, '' AS attidentity, '' AS attgenerated, false AS attisdropped,
	true AS attislocal, 0 AS attinhcount, 0::BIGINT AS attcollation, NULL::VARCHAR[] AS attacl, NULL::VARCHAR[] AS attoptions,
	NULL::VARCHAR[] AS attfdwoptions, NULL::VARCHAR AS attmissingval, comment AS plumb_comment, column_default AS plumb_default
	FROM duckdb_columns()`)},
	{"pg_attrdef", constant(`CREATE OR REPLACE TEMP VIEW pg_attrdef AS SELECT attrelid * 10000 + attnum AS oid, attrelid AS adrelid,
	attnum AS adnum, plumb_default AS adbin FROM pg_attribute WHERE plumb_default IS NOT NULL`)},
	{"pg_get_expr", constant(`CREATE OR REPLACE TEMP MACRO pg_get_expr(e, r, p := false) AS e::VARCHAR`)},
	// Relations: DuckDB's, plus a primary-key index for every table that
	// has a primary key (DuckDB keeps those as constraints).
	{"plumb_primary_keys", constant(`CREATE OR REPLACE TEMP VIEW plumb_primary_keys AS SELECT table_oid * 100 + constraint_index + 1 AS oid,
	table_oid, schema_oid, table_name || '_pkey' AS name, list_transform(constraint_column_indexes, i -> (i + 1)::SMALLINT) AS keys
	FROM duckdb_constraints() WHERE constraint_type = 'PRIMARY KEY'`)},
	// DuckDB's pg_class without its internal objects and without this
	// layer's own TEMP views.
	{"pg_class", func(identity, catalogOIDs) string {
		return `CREATE OR REPLACE TEMP VIEW pg_class AS SELECT * REPLACE (relowner::BIGINT AS relowner,
	CASE WHEN relkind = 'r' THEN (SELECT count(*) > 0 FROM plumb_primary_keys k WHERE k.table_oid = c.oid) OR relhasindex ELSE relhasindex END AS relhasindex)
	FROM system.pg_catalog.pg_class c
	WHERE oid NOT IN (SELECT view_oid FROM duckdb_views() WHERE internal OR temporary AND view_name IN ` + compatNameSQL + `)
	AND oid NOT IN (SELECT table_oid FROM duckdb_tables() WHERE internal)
	UNION ALL BY NAME SELECT oid, name AS relname, schema_oid AS relnamespace, 'i' AS relkind, 16384::BIGINT AS relowner, 0 AS reltablespace,
	'p' AS relpersistence, len(keys) AS relnatts, false AS relhasindex, 0::BIGINT AS relam FROM plumb_primary_keys`
	}},
	{"pg_index", constant(`CREATE OR REPLACE TEMP VIEW pg_index AS SELECT * REPLACE (CASE WHEN indkey IS NULL THEN [] ELSE indkey END::SMALLINT[] AS indkey)
	FROM (SELECT indexrelid, indrelid, indnatts, indnkeyatts, indisunique, indisprimary, indisexclusion, indimmediate, indisclustered,
	indisvalid, indcheckxmin, indisready, indislive, indisreplident, NULL::SMALLINT[] AS indkey, indexprs::VARCHAR AS indexprs, indpred::VARCHAR AS indpred FROM system.pg_catalog.pg_index
	UNION ALL SELECT oid, table_oid, len(keys), len(keys), true, true, false, true, false, true, false, true, true, false, keys, NULL, NULL FROM plumb_primary_keys)`)},
	{"pg_get_indexdef", constant(`CREATE OR REPLACE TEMP MACRO pg_get_indexdef(o, c := 0, p := false) AS coalesce((SELECT sql FROM duckdb_indexes() WHERE index_oid = o),
	(SELECT 'CREATE UNIQUE INDEX ' || name || ' ON ' || table_oid FROM plumb_primary_keys WHERE oid = o))`)},
	// Functions: argument and result lists as psql's \df prints them.
	{"pg_get_function_result", constant(`CREATE OR REPLACE TEMP MACRO pg_get_function_result(o) AS (SELECT coalesce(any_value(return_type), any_value(function_type)) FROM duckdb_functions() WHERE function_oid = o)`)},
	{"pg_get_function_arguments", constant(`CREATE OR REPLACE TEMP MACRO pg_get_function_arguments(o) AS (SELECT array_to_string(any_value(parameters), ', ') FROM duckdb_functions() WHERE function_oid = o)`)},
	{"pg_get_function_identity_arguments", constant(`CREATE OR REPLACE TEMP MACRO pg_get_function_identity_arguments(o) AS pg_get_function_arguments(o)`)},
	{"pg_settings", constant(`CREATE OR REPLACE TEMP VIEW pg_settings AS SELECT name, setting, NULL::VARCHAR AS unit, 'Client Connection Defaults' AS category,
	'' AS short_desc, NULL::VARCHAR AS extra_desc, 'user' AS context, 'string' AS vartype, 'default' AS source FROM plumb_settings`)},
}

// compatNameSQL is the layer's object names as a SQL list, for pg_class
// to leave them out.
var compatNameSQL string

func init() {
	names := []string{sqlQuote("plumb_settings")}
	for _, o := range compatObjects {
		names = append(names, sqlQuote(o.name))
	}
	compatNameSQL = "(" + strings.Join(names, ", ") + ")"
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
	for _, s := range stmts {
		if _, err := conn.ExecContext(ctx, s); err != nil {
			return fmt.Errorf("compatibility layer (%s): %w", truncate(s, 80), err)
		}
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
	return "CREATE OR REPLACE TEMP VIEW plumb_settings AS SELECT * FROM (VALUES " + strings.Join(rows, ", ") + ") s(name, setting)"
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
