package pgserver

import (
	"fmt"
	"sort"
	"strings"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/cmd/internal/sandbox"
	"github.com/plumb-sql/plumb/udf"
)

// What a client may run is an allow-list, decided from the statement as
// DuckDB's parser sees it (the statement type of the prepared statement)
// and from its tokens (tokens.go) for what the type does not tell: which
// table functions, pragmas and CALLs it names, which files (rewrite.go,
// through the sandbox package), and which objects it creates. Anything not
// listed here is refused with SQLSTATE 42501 and a message naming it. The
// token checks run before DuckDB prepares the statement, since binding a
// procedure such as enable_logging already takes effect.
//
// To allow a statement type, add it to statementKinds; a DuckDB table
// function, to tableFunctions (reads says whether its first argument is a
// file); a pragma, to pragmas. plumb's own table functions are allowed as
// registered (udf.SourceArguments). Then add a case to TestAllowList.

// Role is what a user may change: RoleRead runs queries only (SELECT,
// table functions, COPY TO STDOUT); RoleWrite may also create, change and
// drop objects, insert, and write files under --data.
type Role string

const (
	RoleRead  Role = "read"
	RoleWrite Role = "write"
)

// kindRule is an allowed statement type.
type kindRule struct {
	name   string
	writes bool // changes the database or a file: RoleWrite only
}

// statementKinds are the statement types a client may run. Refused by
// omission: PREPARE and EXECUTE in SQL (the protocol's own are allowed),
// DuckDB's SET and RESET (configuration), LOAD and INSTALL, ATTACH, DETACH
// and USE (an attached database would be every session's), VACUUM,
// CHECKPOINT, IMPORT and COPY FROM DATABASE, and anything DuckDB adds.
var statementKinds = map[duckdb.StmtType]kindRule{
	duckdb.STATEMENT_TYPE_SELECT:       {"SELECT", false},
	duckdb.STATEMENT_TYPE_EXPLAIN:      {"EXPLAIN", false}, // and the statement it explains must be allowed
	duckdb.STATEMENT_TYPE_TRANSACTION:  {"BEGIN, COMMIT and ROLLBACK", false},
	duckdb.STATEMENT_TYPE_VARIABLE_SET: {"SET VARIABLE", false},
	duckdb.STATEMENT_TYPE_PRAGMA:       {"PRAGMA", false}, // only those in pragmas
	duckdb.STATEMENT_TYPE_CALL:         {"CALL", false},   // only of allowed table functions
	duckdb.STATEMENT_TYPE_INSERT:       {"INSERT", true},
	duckdb.STATEMENT_TYPE_UPDATE:       {"UPDATE", true},
	duckdb.STATEMENT_TYPE_DELETE:       {"DELETE", true},
	duckdb.STATEMENT_TYPE_CREATE:       {"CREATE", true},
	duckdb.STATEMENT_TYPE_CREATE_FUNC:  {"CREATE MACRO", true},
	duckdb.STATEMENT_TYPE_DROP:         {"DROP", true},
	duckdb.STATEMENT_TYPE_ALTER:        {"ALTER", true},
	duckdb.STATEMENT_TYPE_COPY:         {"COPY to or from a file", true},
	duckdb.STATEMENT_TYPE_EXPORT:       {"EXPORT DATABASE", true},
	duckdb.STATEMENT_TYPE_ANALYZE:      {"ANALYZE", true},
}

// tableFunction is an allowed DuckDB table function.
type tableFunction struct {
	reads bool // its first argument is a file path, a glob or a list of them
}

// tableFunctions are DuckDB's table functions a client may call. Refused by
// omission, among others: query and query_table (they run SQL text no check
// has seen), duckdb_logs and the logging, profiling and checkpoint
// procedures, duckdb_settings, duckdb_temporary_files, duckdb_memory,
// duckdb_secrets, json_execute_serialized_sql, summary and histogram (they
// run a query of a name given as text).
var tableFunctions = map[string]tableFunction{
	"range": {}, "generate_series": {}, "unnest": {}, "repeat": {}, "repeat_row": {},
	"json_each": {}, "json_tree": {}, "pg_timezone_names": {}, "icu_calendar_names": {}, "test_all_types": {},
	"duckdb_columns": {}, "duckdb_constraints": {}, "duckdb_databases": {}, "duckdb_dependencies": {},
	"duckdb_functions": {}, "duckdb_indexes": {}, "duckdb_keywords": {}, "duckdb_schemas": {},
	"duckdb_sequences": {}, "duckdb_tables": {}, "duckdb_types": {}, "duckdb_views": {},
	"duckdb_variables": {}, "duckdb_prepared_statements": {},
	"pragma_table_info": {}, "pragma_show": {}, "pragma_version": {}, "pragma_platform": {},
	"pragma_collations": {}, "pragma_database_size": {}, "pragma_user_agent": {},
	"read_csv": {true}, "read_csv_auto": {true}, "read_parquet": {true}, "parquet_scan": {true},
	"read_json": {true}, "read_json_auto": {true}, "read_ndjson": {true}, "read_ndjson_auto": {true},
	"read_json_objects": {true}, "read_json_objects_auto": {true}, "read_ndjson_objects": {true},
	"read_text": {true}, "read_blob": {true}, "glob": {true}, "sniff_csv": {true}, "read_duckdb": {true},
	"parquet_metadata": {true}, "parquet_schema": {true}, "parquet_file_metadata": {true},
	"parquet_kv_metadata": {true}, "parquet_full_metadata": {true},
}

// pragmas are the PRAGMA statements a client may run: those that only
// describe the catalogue.
var pragmas = map[string]bool{"table_info": true, "show": true, "show_tables": true, "show_tables_expanded": true,
	"show_databases": true, "database_list": true, "database_size": true, "version": true, "platform": true,
	"collations": true, "functions": true, "user_agent": true}

// sourceArguments are plumb's table functions and the positions of their
// source arguments, from their registration.
var sourceArguments = udf.SourceArguments()

// reservedPrefixes are name prefixes no client object may have: plumb's
// functions and the compatibility layer's helpers.
var reservedPrefixes = []string{"plumb_", "pgcompat_"}

// gate is what one session may run.
type gate struct {
	files    *sandbox.Paths
	role     Role
	readOnly bool
	catalog  *catalogNames
	checking bool // a check of a statement about to run: every path must already be resolved
}

// catalogNames are the names of the database's functions, read once at
// start-up: every table function (to know a call of one), and every
// function of any kind (a macro of one of those names would shadow it).
type catalogNames struct {
	table     map[string]bool
	functions map[string]bool
}

// refused is the error for something the allow-list does not hold.
func refused(format string, args ...any) error {
	return pgError{stateInsufficientPriv, fmt.Sprintf(format, args...)}
}

// allowedTable reports whether a client may call the table function name.
func (g *gate) allowedTable(name string) bool {
	if _, ok := tableFunctions[name]; ok {
		return true
	}
	_, ok := sourceArguments[name]
	return ok
}

// checkTokens runs the token checks of the allow-list on a statement,
// and on each statement if a semicolon the splitter did not cut at
// (statements.Split) leaves several: DuckDB would run them all.
func (g *gate) checkTokens(toks []token) error {
	all := significant(toks)
	start := 0
	for k := 0; k <= len(all); k++ {
		if k < len(all) && !toks[all[k]].is(";") {
			continue
		}
		if k > start {
			if err := g.checkStatement(toks, all[start:k]); err != nil {
				return err
			}
		}
		start = k + 1
	}
	return nil
}

// checkStatement runs the token checks on one statement, whose
// significant tokens are idx.
func (g *gate) checkStatement(toks []token, idx []int) error {
	if len(idx) == 0 {
		return nil
	}
	at := func(k int) token {
		if k < len(idx) {
			return toks[idx[k]]
		}
		return token{}
	}
	first := at(0)
	if first.is("explain") { // EXPLAIN [ANALYZE] [(options)] statement: check the statement
		k := 1
		if at(k).is("analyze") {
			k++
		}
		if at(k).is("(") {
			for depth := 0; k < len(idx); k++ {
				if at(k).is("(") {
					depth++
				} else if at(k).is(")") {
					if depth--; depth == 0 {
						k++
						break
					}
				}
			}
		}
		if k < len(idx) {
			return g.checkStatement(toks, idx[k:])
		}
		return nil
	}
	if g.role == RoleRead && first.kind == tokWord && changes[strings.ToLower(first.text)] {
		// refused before DuckDB binds it (binding a COPY or EXPORT reads
		// files); the statement type decides the rest after preparing
		return refused("%s is not allowed for a read-only user (role read)", strings.ToUpper(first.text))
	}
	switch {
	case first.is("pragma"):
		name := at(1).name()
		if !pragmas[name] || at(2).is("=") {
			return refused("PRAGMA %s is not allowed in plumb serve (allowed: the catalogue pragmas %s)", name, listKeys(pragmas))
		}
	case first.is("call"):
		name, _ := qualifiedName(toks, idx, 1)
		if !g.allowedTable(name) {
			return refused("CALL %s is not allowed in plumb serve: only the table functions a query may use can be called", name)
		}
	case first.is("set") && at(1).is("global"):
		return refused("SET GLOBAL is not allowed in plumb serve: the configuration is the server's")
	case first.is("checkpoint") || first.is("force") || first.is("vacuum") || first.is("attach") ||
		first.is("detach") || first.is("use") || first.is("load") || first.is("install") || first.is("import") ||
		first.is("update") && at(1).is("extensions"):
		return refused("%s is not allowed in plumb serve%s", strings.ToUpper(first.text), attachHint(first))
	case first.is("create"), first.is("alter"), first.is("drop"):
		if err := g.checkNames(toks, idx); err != nil {
			return err
		}
	case first.is("copy"):
		if to, ok := copyTarget(toks, idx); !ok && g.role == RoleRead {
			return refused("COPY into a table is not allowed for a read-only user (role read)")
		} else if ok && to != "stdout" {
			if g.readOnly {
				return refused("COPY to a file is not allowed: the server is read-only (--read-only)")
			}
			if g.role == RoleRead {
				return refused("COPY to a file is not allowed for a read-only user (role read); COPY ... TO STDOUT is")
			}
		}
		if at(1).is("from") && at(2).is("database") {
			return refused("COPY FROM DATABASE is not allowed in plumb serve")
		}
	case first.is("export"):
		if g.readOnly {
			return refused("EXPORT DATABASE is not allowed: the server is read-only (--read-only)")
		}
	}
	return g.checkTableCalls(toks, idx)
}

func attachHint(t token) string {
	if t.is("attach") || t.is("use") || t.is("detach") {
		return ": an attached database would be every session's; read a DuckDB file under --data with read_duckdb('file.duckdb', table_name := 't')"
	}
	return ""
}

// checkTableCalls refuses every table function that is not allowed, called
// with parentheses anywhere, or named bare as a FROM item.
func (g *gate) checkTableCalls(toks []token, idx []int) error {
	type level struct{ inFrom bool }
	levels := []level{{}}
	first := toks[idx[0]]
	ddl := first.is("create") || first.is("drop") || first.is("alter") || first.is("comment")
	for k := 0; k < len(idx); k++ {
		t := toks[idx[k]]
		top := &levels[len(levels)-1]
		switch {
		case t.is("("):
			levels = append(levels, level{})
			continue
		case t.is(")"):
			if len(levels) > 1 {
				levels = levels[:len(levels)-1]
			}
			continue
		case t.is("from") || t.is("join"):
			top.inFrom = true
		case t.kind == tokWord && fromEnds[strings.ToLower(t.text)]:
			top.inFrom = false
		}
		if t.kind != tokWord && t.kind != tokQuoted {
			continue
		}
		name, last := qualifiedName(toks, idx, k)
		if name == "" {
			continue
		}
		called := last+1 < len(idx) && toks[idx[last+1]].is("(")
		fromItem := false
		if k > 0 && !called {
			p := toks[idx[k-1]]
			fromItem = p.is("from") || p.is("join") || p.is(",") && top.inFrom || p.kind == tokWord && tableWords[strings.ToLower(p.text)] ||
				p.is("table") && !ddl
		}
		if (called || fromItem) && g.catalog.table[name] && !g.allowedTable(name) {
			return refused("the table function %s is not allowed in plumb serve", name)
		}
		if called && g.role == RoleRead && (name == "nextval" || name == "setval") {
			return refused("%s changes a sequence of the shared database: not allowed for a read-only user (role read)", name)
		}
		k = last
	}
	return nil
}

// changes are first words of statements that change the database or
// files, refused to RoleRead before preparing (COPY is decided by its
// target, in checkTokens).
var changes = map[string]bool{"insert": true, "update": true, "delete": true, "create": true, "drop": true,
	"alter": true, "export": true, "analyze": true, "truncate": true, "merge": true, "upsert": true}

// tableWords are words after which a bare name is a table reference:
// COPY x TO, DESCRIBE x, SUMMARIZE x, SHOW x, PIVOT x, UPDATE x.
var tableWords = map[string]bool{"copy": true, "describe": true, "summarize": true, "show": true, "pivot": true,
	"unpivot": true, "pivot_wider": true, "pivot_longer": true, "update": true}

// fromEnds are the words that end a FROM clause at its level.
var fromEnds = map[string]bool{"where": true, "group": true, "having": true, "order": true, "limit": true, "qualify": true,
	"window": true, "union": true, "except": true, "intersect": true, "offset": true, "select": true, "on": true,
	"using": true, "returning": true, "set": true, "values": true}

// qualifiedName reads [catalog .] [schema .] name starting at idx[k] and
// returns the last part lower-cased (or unquoted) and the index (into idx)
// of its last token.
func qualifiedName(toks []token, idx []int, k int) (string, int) {
	if k >= len(idx) {
		return "", k
	}
	last := k
	for last+2 < len(idx) && toks[idx[last+1]].is(".") && (toks[idx[last+2]].kind == tokWord || toks[idx[last+2]].kind == tokQuoted) {
		last += 2
	}
	t := toks[idx[last]]
	if t.kind != tokWord && t.kind != tokQuoted {
		return "", k
	}
	return t.name(), last
}

// objectWords may stand between CREATE/DROP/ALTER and the object's name.
var objectWords = map[string]bool{"or": true, "replace": true, "temp": true, "temporary": true, "unique": true,
	"if": true, "not": true, "exists": true, "table": true, "view": true, "macro": true, "function": true,
	"sequence": true, "type": true, "schema": true, "index": true, "materialized": true, "persistent": true,
	"cascade": true, "restrict": true}

// checkNames refuses a CREATE, ALTER ... RENAME TO or DROP of an object
// named as one of plumb's functions, with a reserved prefix, or (for a
// macro or function) as any function the database has: DuckDB looks a
// function up in the database's own schema before the system catalogue,
// so such a macro would change what everyone's queries compute.
func (g *gate) checkNames(toks []token, idx []int) error {
	verb := strings.ToUpper(toks[idx[0]].text)
	function := false
	k := 1
	for ; k < len(idx); k++ {
		t := toks[idx[k]]
		if t.is("secret") {
			return refused("CREATE SECRET is not allowed in plumb serve")
		}
		if t.is("macro") || t.is("function") {
			function = true
		}
		if t.kind != tokWord || !objectWords[strings.ToLower(t.text)] {
			break
		}
	}
	var names []string
	if verb == "ALTER" {
		for j := k; j+2 < len(idx); j++ {
			if toks[idx[j]].is("rename") && toks[idx[j+1]].is("to") {
				n, _ := qualifiedName(toks, idx, j+2)
				names = append(names, n)
			}
		}
	} else {
		for k < len(idx) {
			n, last := qualifiedName(toks, idx, k)
			if n == "" {
				break
			}
			names = append(names, n)
			if verb != "DROP" || last+1 >= len(idx) || !toks[idx[last+1]].is(",") {
				break
			}
			k = last + 2
		}
	}
	for _, n := range names {
		if reason := g.reserved(n, function); reason != "" {
			return refused("%s of %q is not allowed: %s", verb, n, reason)
		}
	}
	return nil
}

// reserved says why a client may not create, rename to or drop name, "" if
// it may.
func (g *gate) reserved(name string, function bool) string {
	lower := strings.ToLower(name)
	for _, p := range reservedPrefixes {
		if strings.HasPrefix(lower, p) {
			return "names starting with " + p + " are plumb's own"
		}
	}
	if plumbNames[lower] {
		return "it is one of plumb's functions"
	}
	if function && g.catalog.functions[lower] {
		return "a function of that name exists, and a macro would shadow it for every user"
	}
	return ""
}

var plumbNames = func() map[string]bool {
	m := map[string]bool{}
	for _, n := range udf.FunctionNames() {
		m[n] = true
	}
	return m
}()

// copyTarget finds where a COPY statement writes: the word or literal
// after a TO outside parentheses ("stdout" for the client), if any.
func copyTarget(toks []token, idx []int) (string, bool) {
	depth := 0
	for k := 1; k+1 < len(idx); k++ {
		t := toks[idx[k]]
		switch {
		case t.is("("):
			depth++
		case t.is(")"):
			depth--
		case depth == 0 && t.is("to"):
			next := toks[idx[k+1]]
			if v, ok := next.stringValue(); ok {
				return v, true
			}
			return strings.ToLower(next.name()), true
		}
	}
	return "", false
}

// checkKind refuses a statement type the allow-list does not hold for the
// session's role.
func (g *gate) checkKind(kind duckdb.StmtType) error {
	rule, ok := statementKinds[kind]
	if !ok {
		return refused("this kind of statement (%s) is not allowed in plumb serve", kindName(kind))
	}
	if rule.writes && g.role == RoleRead {
		return refused("%s is not allowed for a read-only user (role read)", rule.name)
	}
	return nil
}

func kindName(kind duckdb.StmtType) string {
	names := map[duckdb.StmtType]string{
		duckdb.STATEMENT_TYPE_PREPARE: "PREPARE", duckdb.STATEMENT_TYPE_EXECUTE: "EXECUTE",
		duckdb.STATEMENT_TYPE_SET: "SET or RESET of a DuckDB setting", duckdb.STATEMENT_TYPE_LOAD: "LOAD or INSTALL",
		duckdb.STATEMENT_TYPE_ATTACH: "ATTACH", duckdb.STATEMENT_TYPE_DETACH: "DETACH",
		duckdb.STATEMENT_TYPE_VACUUM: "VACUUM", duckdb.STATEMENT_TYPE_EXTENSION: "an extension statement",
		duckdb.STATEMENT_TYPE_MULTI: "a multi-statement", duckdb.STATEMENT_TYPE_RELATION: "a relation",
		duckdb.STATEMENT_TYPE_LOGICAL_PLAN: "a logical plan",
	}
	if n, ok := names[kind]; ok {
		return n
	}
	return fmt.Sprintf("statement type %d", kind)
}

func listKeys(m map[string]bool) string {
	var keys []string
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return strings.Join(keys, ", ")
}

// check runs the token checks on a statement about to reach DuckDB (paths
// must already be as the rules write them).
func (g *gate) check(sql string) error {
	if g == nil {
		return nil
	}
	strict := *g
	strict.checking = true
	_, _, err := rewriteSQL(sql, &strict)
	return err
}
