package pgserver

import (
	"path/filepath"
	"regexp"
	"strings"
)

// The PostgreSQL compatibility layer, part two: where a client's SQL must
// change before DuckDB reads it, the change is made here, on tokens
// (tokens.go), by the rules of tokenRules, each tested in rewrite_test.go.
// Catalogue objects and functions are not rewritten but answered by DuckDB
// through the TEMP objects of catalog.go; the rules only make the text
// reach them.
//
// To add a rule: write a func(*rewriter) that edits r.toks, add it to
// tokenRules, and add cases to TestRewriteRules.

// rewriter holds one statement's tokens and what the rules need to know.
type rewriter struct {
	toks    []token
	dataDir string       // relative file paths resolve against it
	paths   map[int]bool // parameters ($n) that name a file, to resolve once bound
}

// tokenRule is one rewrite on a statement's tokens.
type tokenRule struct {
	name  string
	apply func(r *rewriter)
}

var tokenRules = []tokenRule{
	{"BEGIN [WORK | TRANSACTION] [modes] and START TRANSACTION [modes] become DuckDB's BEGIN TRANSACTION", beginTransaction},
	{"PostgreSQL's OPERATOR(pg_catalog.op) syntax becomes the bare operator", operatorSyntax},
	{"COLLATE pg_catalog.default and COLLATE \"C\" are dropped", dropCollate},
	{"pg_catalog.x becomes x, information_schema.x too where the layer has an x", qualifiedCompat},
	{"'name'::regclass, ::regtype and ::regproc look the name up", regLiteral},
	{"a select item that is one function call is named after the function", functionColumnName},
	{"LIKE patterns escape with a backslash, as PostgreSQL's do by default", likeEscape},
	{"relative file paths resolve against --data", relativePaths},
}

// rewriteSQL applies every rule to one statement.
func rewriteSQL(sql, dataDir string) (string, map[int]bool) {
	r := &rewriter{toks: lex(sql), dataDir: dataDir, paths: map[int]bool{}}
	for _, rule := range tokenRules {
		rule.apply(r)
	}
	return join(r.toks), r.paths
}

// next returns the index of the first significant token after i, or -1.
func (r *rewriter) next(i int) int {
	for j := i + 1; j < len(r.toks); j++ {
		if r.toks[j].kind != tokSpace {
			return j
		}
	}
	return -1
}

// prev returns the index of the last significant token before i, or -1.
func (r *rewriter) prev(i int) int {
	for j := i - 1; j >= 0; j-- {
		if r.toks[j].kind != tokSpace {
			return j
		}
	}
	return -1
}

// blank replaces tokens i..j (inclusive) with nothing.
func (r *rewriter) blank(i, j int) {
	for k := i; k <= j; k++ {
		r.toks[k] = token{tokSpace, ""}
	}
}

// matching returns the index of the parenthesis closing the one at i.
func (r *rewriter) matching(i int) int {
	depth := 0
	for j := i; j < len(r.toks); j++ {
		switch {
		case r.toks[j].is("("):
			depth++
		case r.toks[j].is(")"):
			depth--
			if depth == 0 {
				return j
			}
		}
	}
	return -1
}

// beginTransaction: DuckDB's transactions have one mode (snapshot
// isolation, read-write), so PostgreSQL's isolation levels and READ
// ONLY/WRITE, which clients send with BEGIN, are dropped.
func beginTransaction(r *rewriter) {
	first := r.next(-1)
	if first < 0 {
		return
	}
	second := r.next(first)
	if r.toks[first].is("begin") || r.toks[first].is("start") && second >= 0 && r.toks[second].is("transaction") {
		r.toks = []token{{tokWord, "BEGIN TRANSACTION"}}
	}
}

// operatorSyntax: OPERATOR(pg_catalog.~) → ~ (psql's pattern matching).
func operatorSyntax(r *rewriter) {
	for i, t := range r.toks {
		if !t.is("operator") {
			continue
		}
		open := r.next(i)
		if open < 0 || !r.toks[open].is("(") {
			continue
		}
		end := r.matching(open)
		if end < 0 {
			continue
		}
		op := r.prev(end)
		if op <= open || r.toks[op].kind != tokOp {
			continue
		}
		text := r.toks[op].text
		r.blank(i, end)
		r.toks[i] = token{tokOp, text}
	}
}

// dropCollate removes COLLATE clauses naming PostgreSQL's collations.
func dropCollate(r *rewriter) {
	for i, t := range r.toks {
		if !t.is("collate") {
			continue
		}
		j := r.next(i)
		if j < 0 {
			continue
		}
		end := j
		if r.toks[j].name() == "pg_catalog" {
			if dot := r.next(j); dot >= 0 && r.toks[dot].is(".") {
				end = r.next(dot)
			}
		}
		if end < 0 {
			continue
		}
		switch strings.ToLower(r.toks[end].name()) {
		case "default", "c", "posix", "ucs_basic":
			r.blank(i, end)
		}
	}
}

// qualifiedCompat: pg_catalog.pg_type → pg_type, which DuckDB finds in
// the compatibility layer or else in its own pg_catalog (both are on its
// search path); information_schema.x only when the layer has an x, since
// DuckDB's information_schema views must stay qualified.
func qualifiedCompat(r *rewriter) {
	for i, t := range r.toks {
		schema := t.name()
		if schema != "pg_catalog" && schema != "information_schema" {
			continue
		}
		if p := r.prev(i); p >= 0 && r.toks[p].is(".") { // system.pg_catalog.x
			continue
		}
		dot := r.next(i)
		if dot < 0 || !r.toks[dot].is(".") {
			continue
		}
		name := r.next(dot)
		if name < 0 {
			continue
		}
		n := r.toks[name].name()
		if schema == "pg_catalog" || compatNames[n] || isCastType(n) {
			r.blank(i, dot)
		}
	}
}

func isCastType(name string) bool {
	for _, t := range castTypes {
		if t.name == name {
			return true
		}
	}
	return false
}

// regLiteral: 'pg_class'::regclass → the relation's oid, 'int4'::regtype
// → the type's oid, 'pg_catalog.array_in'::regproc → 'array_in'.
func regLiteral(r *rewriter) {
	for i, t := range r.toks {
		if !t.is("::") {
			continue
		}
		lit, typ := r.prev(i), r.next(i)
		if lit < 0 || typ < 0 {
			continue
		}
		value, ok := r.toks[lit].stringValue()
		if !ok {
			continue
		}
		name := value
		if k := strings.LastIndexByte(value, '.'); k >= 0 {
			name = value[k+1:]
		}
		name = strings.Trim(name, `"`)
		var repl string
		switch r.toks[typ].name() {
		case "regclass":
			repl = "(SELECT oid FROM pg_class WHERE relname = " + sqlQuote(name) + " LIMIT 1)"
		case "regtype":
			repl = "(SELECT oid FROM pg_type WHERE typname = " + sqlQuote(name) + " OR format_name = " + sqlQuote(name) + " LIMIT 1)"
		case "regproc", "regprocedure":
			repl = sqlQuote(name)
		default:
			continue
		}
		r.blank(lit, typ)
		r.toks[lit] = token{tokOp, repl}
	}
}

// selectItemEnd are the words that end a select list.
var selectItemEnd = map[string]bool{"from": true, "where": true, "group": true, "having": true, "order": true, "limit": true,
	"union": true, "except": true, "intersect": true, "into": true, "window": true, "qualify": true, "offset": true}

// functionColumnName: SELECT version() → SELECT version() AS version, as
// PostgreSQL names such a column after its function (DuckDB after the whole
// call).
func functionColumnName(r *rewriter) {
	type list struct{ depth int }
	var lists []list // open select lists, by parenthesis depth
	depth := 0
	itemStart := func(i int) bool { // i is the first token of a select item
		p := r.prev(i)
		if p < 0 {
			return false
		}
		return r.toks[p].is(",") || r.toks[p].is("select") || r.toks[p].is("distinct") || r.toks[p].is("all")
	}
	for i := 0; i < len(r.toks); i++ {
		t := r.toks[i]
		switch {
		case t.is("("):
			depth++
			continue
		case t.is(")"):
			for len(lists) > 0 && lists[len(lists)-1].depth >= depth {
				lists = lists[:len(lists)-1]
			}
			depth--
			continue
		case t.is("select"):
			lists = append(lists, list{depth})
			continue
		case t.kind == tokWord && selectItemEnd[t.name()] && len(lists) > 0 && lists[len(lists)-1].depth == depth:
			lists = lists[:len(lists)-1]
			continue
		}
		if len(lists) == 0 || lists[len(lists)-1].depth != depth || t.kind != tokWord || !itemStart(i) {
			continue
		}
		// [schema .] name ( ... ) followed by the item's end.
		nameIdx := i
		if dot := r.next(i); dot >= 0 && r.toks[dot].is(".") {
			if n := r.next(dot); n >= 0 && r.toks[n].kind == tokWord {
				nameIdx = n
			}
		}
		open := r.next(nameIdx)
		if open < 0 || !r.toks[open].is("(") {
			continue
		}
		end := r.matching(open)
		if end < 0 {
			continue
		}
		after := r.next(end)
		if after >= 0 && !(r.toks[after].is(",") || r.toks[after].is(";") || r.toks[after].is(")") ||
			r.toks[after].kind == tokWord && selectItemEnd[r.toks[after].name()]) {
			continue
		}
		name := r.toks[nameIdx].name()
		if name == "" || selectItemEnd[name] {
			continue
		}
		r.toks[end] = token{tokOp, ") AS " + quoteIdentifier(name)}
		i = end
	}
}

// likeEscape: x LIKE 'a\_b' → x LIKE 'a\_b' ESCAPE '\'. PostgreSQL's
// LIKE treats a backslash as the escape character unless told otherwise;
// DuckDB's has no escape character by default (pgjdbc escapes _ in names).
func likeEscape(r *rewriter) {
	for i, t := range r.toks {
		if !t.is("like") && !t.is("ilike") {
			continue
		}
		lit := r.next(i)
		if lit < 0 || r.toks[lit].kind != tokString || !strings.Contains(r.toks[lit].text, `\`) {
			continue
		}
		if after := r.next(lit); after >= 0 && r.toks[after].is("escape") {
			continue
		}
		r.toks[lit].text += ` ESCAPE '\'`
	}
}

// fileFunctions take a file path, a glob or a list of them first.
var fileFunctions = map[string]bool{"read_csv": true, "read_csv_auto": true, "read_parquet": true, "parquet_scan": true,
	"read_json": true, "read_json_auto": true, "read_ndjson": true, "read_ndjson_auto": true, "read_text": true,
	"read_blob": true, "glob": true, "parquet_metadata": true, "parquet_schema": true, "parquet_file_metadata": true,
	"sniff_csv": true}

// sourceFunctions are plumb's table functions: their first argument (and
// restore's second) is a table name, a query or a file.
var sourceFunctions = map[string]int{"diagnose": 1, "differenced": 1, "rolling_dispersion": 1, "stationarize": 1,
	"stationarize_recipes": 1, "restore": 2}

// fileLike is what plumb's table functions read as a file (udf/source.go).
var fileLike = regexp.MustCompile(`[/\\*?]|\.(parquet|csv|tsv|json|jsonl|ndjson|txt)(\.(gz|zst))?$`)

// relativePaths: 'shops.parquet' in FROM, in a file-reading function, in
// a plumb table function's source or in COPY becomes the path under --data.
func relativePaths(r *rewriter) {
	if r.dataDir == "" {
		return
	}
	copyStmt := false
	if first := r.next(-1); first >= 0 && r.toks[first].is("copy") {
		copyStmt = true
	}
	for i, t := range r.toks {
		switch {
		case t.is("from") || t.is("join") || copyStmt && t.is("to"):
			// FROM 'x' is also part of EXTRACT, SUBSTRING and TRIM, so
			// outside COPY only a file-like literal with no cast counts.
			if j := r.next(i); j >= 0 {
				if after := r.next(j); after < 0 || !r.toks[after].is("::") {
					r.resolve(j, !copyStmt)
				}
			}
		case t.kind == tokWord:
			open := r.next(i)
			if open < 0 || !r.toks[open].is("(") {
				continue
			}
			name := t.name()
			if fileFunctions[name] {
				r.resolveArgs(open, 1, false)
			} else if n := sourceFunctions[name]; n > 0 {
				r.resolveArgs(open, n, true)
			}
		}
	}
}

// resolveArgs resolves the first n arguments after the parenthesis at open.
func (r *rewriter) resolveArgs(open, n int, onlyFileLike bool) {
	arg := r.next(open)
	for k := 0; k < n && arg >= 0; k++ {
		if r.toks[arg].is("[") { // a list of paths
			for j := r.next(arg); j >= 0 && !r.toks[j].is("]"); j = r.next(j) {
				r.resolve(j, onlyFileLike)
			}
		} else {
			r.resolve(arg, onlyFileLike)
		}
		// skip to the token after the next comma at this depth
		depth := 0
		for ; arg >= 0 && arg < len(r.toks); arg = r.next(arg) {
			t := r.toks[arg]
			if t.is("(") || t.is("[") {
				depth++
			} else if t.is(")") || t.is("]") {
				if depth == 0 {
					return
				}
				depth--
			} else if t.is(",") && depth == 0 {
				arg = r.next(arg)
				break
			}
		}
	}
}

// resolve turns the string literal at i into an absolute path under the
// data directory, or marks the parameter at i as a path.
func (r *rewriter) resolve(i int, onlyFileLike bool) {
	t := r.toks[i]
	if t.kind == tokParam {
		r.paths[paramNumber(t.text)] = onlyFileLike
		return
	}
	v, ok := t.stringValue()
	if !ok {
		return
	}
	if p, changed := resolvePath(v, r.dataDir, onlyFileLike); changed {
		r.toks[i] = token{tokString, sqlQuote(p)}
	}
}

// resolvePath joins a relative path to dir; absolute paths, URLs, table
// names and queries are left alone.
func resolvePath(p, dir string, onlyFileLike bool) (string, bool) {
	s := strings.TrimSpace(p)
	if dir == "" || s == "" || filepath.IsAbs(s) || strings.Contains(s, "://") || strings.HasPrefix(s, "(") ||
		strings.HasPrefix(s, "~") || onlyFileLike && !fileLike.MatchString(s) {
		return p, false
	}
	return filepath.Join(dir, s), true
}

func paramNumber(text string) int {
	n := 0
	for _, c := range text[1:] {
		n = n*10 + int(c-'0')
		if n > maxParams {
			return maxParams + 1 // saturates: no overflow from a long $n
		}
	}
	return n
}
