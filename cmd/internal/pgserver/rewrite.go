package pgserver

import (
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
	toks  []token
	gate  *gate        // what the session may run; nil: rewrite only
	paths map[int]bool // parameters ($n) that name a file (false) or a source (true), to check once bound
	err   error        // the first refusal
	// inMacro: the statement creates a macro, whose body's bare names may
	// be its parameters
	inMacro bool
	closing []int // filePaths: closings of the significant tokens
}

// tokenRule is one rewrite on a statement's tokens.
type tokenRule struct {
	name  string
	apply func(r *rewriter)
}

// tokenRules are set in init: a plumb table function's source is itself
// a statement, so filePaths calls rewriteSQL, which reads tokenRules.
var tokenRules []tokenRule

func init() { tokenRules = rules() }

func rules() []tokenRule {
	return []tokenRule{
		{"BEGIN [WORK | TRANSACTION] [modes] and START TRANSACTION [modes] become DuckDB's BEGIN TRANSACTION", beginTransaction},
		{"PostgreSQL's OPERATOR(pg_catalog.op) syntax becomes the bare operator", operatorSyntax},
		{"COLLATE pg_catalog.default and COLLATE \"C\" are dropped", dropCollate},
		{"pg_catalog.x becomes x, information_schema.x too where the layer has an x", qualifiedCompat},
		{"'name'::regclass, ::regtype and ::regproc look the name up", regLiteral},
		{"paths are checked by the sandbox; relative ones resolve against --data", filePaths},
		{"a select item that is one function call is named after the function", functionColumnName},
		{"LIKE patterns escape with a backslash, as PostgreSQL's do by default", likeEscape},
	}
}

// rewriteSQL applies every rule to one statement, then the token checks of
// the allow-list (allow.go); a nil gate only rewrites.
func rewriteSQL(sql string, g *gate) (string, map[int]bool, error) {
	r := &rewriter{toks: lex(sql), gate: g, paths: map[int]bool{}}
	for _, rule := range tokenRules {
		rule.apply(r)
	}
	if g != nil && r.err == nil { // on the statement as DuckDB will read it
		r.err = g.checkTokens(lex(join(r.toks)))
	}
	return join(r.toks), r.paths, r.err
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

// fileLike is what plumb's table functions read as a file (udf/source.go).
var fileLike = regexp.MustCompile(`[/\\*?]|\.(parquet|csv|tsv|json|jsonl|ndjson|txt)(\.(gz|zst))?$`)

// inlineFrom are functions whose arguments may contain FROM 'text' that
// names no file: trim(BOTH 'x' FROM 'y'), substring('abc' FROM 2), ...
var inlineFrom = map[string]bool{"trim": true, "substring": true, "extract": true, "overlay": true, "position": true}

// filePaths: every path a statement names (a literal in FROM or JOIN, a
// file-reading table function's first argument, a plumb table function's
// file source, COPY's file) is checked by the sandbox and, if allowed,
// replaced by the absolute path under --data it means; a relative path
// means one under --data. A parameter in such a place is marked, to be
// checked once bound. A parenthesised SELECT given as a plumb table
// function's source is checked and rewritten as a statement of its own.
func filePaths(r *rewriter) {
	if r.gate == nil {
		return
	}
	idx := significant(r.toks)
	r.closing = closings(r.toks, idx)
	for k, c := range r.closing {
		if c < 0 && (r.toks[idx[k]].is("(") || r.toks[idx[k]].is("[")) {
			// DuckDB would not parse it either; refusing it here keeps
			// every check below linear
			r.fail(pgError{stateSyntax, "syntax error: a parenthesis or bracket is not closed"})
			return
		}
	}
	copyStmt := len(idx) > 0 && r.toks[idx[0]].is("copy")
	if copyStmt && len(idx) > 1 && (r.toks[idx[1]].kind == tokString || r.toks[idx[1]].kind == tokParam) {
		r.file(idx[1]) // COPY 'file' TO ...
	}
	// In a macro's body a bare name may be the macro's parameter, so a
	// source or path there must be a literal.
	r.inMacro = false
	for _, i := range idx {
		if t := r.toks[i]; t.is("macro") || t.is("function") {
			r.inMacro = r.toks[idx[0]].is("create")
			break
		} else if t.is("as") || t.is("(") {
			break
		}
	}
	if len(idx) > 0 && r.toks[idx[0]].is("export") { // EXPORT DATABASE [name] 'directory'
		for _, i := range idx {
			if r.toks[i].kind == tokString || r.toks[i].kind == tokParam {
				r.file(i)
				break
			}
		}
	}
	var openers []string // the word before each open parenthesis
	for k, i := range idx {
		t := r.toks[i]
		prev := token{}
		if k > 0 {
			prev = r.toks[idx[k-1]]
		}
		switch {
		case t.is("("):
			openers = append(openers, prev.name())
		case t.is(")"):
			if len(openers) > 0 {
				openers = openers[:len(openers)-1]
			}
		case t.is("from") || t.is("join") || copyStmt && t.is("to"):
			if len(openers) > 0 && inlineFrom[openers[len(openers)-1]] || prev.is("distinct") || k+1 >= len(idx) {
				continue
			}
			j := idx[k+1]
			switch next := r.toks[j]; {
			case next.kind == tokString || next.kind == tokParam:
				r.file(j)
			case next.kind == tokQuoted && fileLike.MatchString(next.name()) && (k+2 >= len(idx) || !r.toks[idx[k+2]].is(".")):
				// DuckDB reads FROM "x.csv" as the file x.csv
				r.toks[j] = token{tokString, sqlQuote(next.name())}
				r.file(j)
			}
		case (t.kind == tokWord || t.kind == tokQuoted) && k+1 < len(idx) && r.toks[idx[k+1]].is("(") && !prev.is("."):
			name := t.name()
			if tableFunctions[name].reads {
				r.arguments(name, idx, k+1, []int{1}, r.file)
			} else if positions, ok := sourceArguments[name]; ok {
				r.arguments(name, idx, k+1, positions, r.source)
			}
		}
	}
}

// arguments applies check to the arguments at the given 1-based positions
// of the call whose parenthesis is idx[open]. Each must be a plain '...'
// literal or a parameter (a cast after it is allowed), or a [list] of
// those: a path computed by an expression would escape the check.
func (r *rewriter) arguments(name string, idx []int, open int, positions []int, check func(int)) {
	want := map[int]bool{}
	for _, p := range positions {
		want[p] = true
	}
	pos, start := 1, open+1
	for k := open + 1; k < len(idx); k++ {
		t := r.toks[idx[k]]
		if (t.is("(") || t.is("[")) && r.closing[k] > k {
			k = r.closing[k] // skip what is nested: each token is looked at once per call
			continue
		}
		if !t.is(")") && !t.is(",") {
			continue
		}
		if want[pos] && k > start {
			r.argument(name, idx[start:k], check)
		}
		if t.is(")") {
			return
		}
		pos, start = pos+1, k+1
	}
}

// closings pairs each opening parenthesis or bracket (by its position in
// idx) with its closing one, -1 where none closes it.
func closings(toks []token, idx []int) []int {
	out := make([]int, len(idx))
	var open []int
	for k, i := range idx {
		out[k] = -1
		switch t := toks[i]; {
		case t.is("(") || t.is("["):
			open = append(open, k)
		case (t.is(")") || t.is("]")) && len(open) > 0:
			out[open[len(open)-1]] = k
			open = open[:len(open)-1]
		}
	}
	return out
}

// argument checks one argument's tokens (indexes into r.toks).
func (r *rewriter) argument(name string, arg []int, check func(int)) {
	first := r.toks[arg[0]]
	if len(arg) > 1 && r.toks[arg[1]].is(":=") { // a named argument: not a path
		return
	}
	literal := func(t token) bool {
		_, ok := t.stringValue()
		return ok || t.kind == tokParam
	}
	rest := arg[1:]
	if first.is("[") {
		for k, i := range arg[1:] {
			t := r.toks[i]
			if t.is("]") {
				rest = arg[k+2:]
				break
			}
			if t.is(",") {
				continue
			}
			if !literal(t) {
				r.fail(refused("the paths given to %s must be '...' literals or parameters in plumb serve", name))
				return
			}
			check(i)
		}
	} else {
		if !literal(first) {
			if _, isSource := sourceArguments[name]; isSource && r.isName(arg) && !r.inMacro {
				return // a table name written as an identifier
			}
			r.fail(refused("the source or path given to %s must be a '...' literal or a parameter in plumb serve", name))
			return
		}
		check(arg[0])
	}
	for k := 0; k < len(rest); k++ { // only casts may follow: 'x'::VARCHAR
		t := r.toks[rest[k]]
		if t.is("::") || t.kind == tokWord || t.is("[") || t.is("]") {
			continue
		}
		r.fail(refused("the source or path given to %s must be a '...' literal or a parameter in plumb serve", name))
		return
	}
}

// isName reports whether the tokens are one [catalog.][schema.]name.
func (r *rewriter) isName(arg []int) bool {
	for k, i := range arg {
		t := r.toks[i]
		if k%2 == 0 && t.kind != tokWord && t.kind != tokQuoted || k%2 == 1 && !t.is(".") {
			return false
		}
	}
	return len(arg)%2 == 1
}

// fail keeps the first error the rules meet.
func (r *rewriter) fail(err error) {
	if r.err == nil {
		r.err = err
	}
}

// file checks the path literal at i and writes the absolute path it means,
// or marks the parameter at i as a file.
func (r *rewriter) file(i int) {
	t := r.toks[i]
	if t.kind == tokParam {
		r.paths[paramNumber(t.text)] = false
		return
	}
	v, ok := t.stringValue()
	if !ok {
		r.fail(refused("a path must be a plain '...' literal in plumb serve"))
		return
	}
	p, err := r.gate.fileValue(v)
	if err != nil {
		r.fail(err)
		return
	}
	if r.gate.checking && p != v {
		r.fail(refused("path %q was not resolved against the data directory before it ran", v))
		return
	}
	r.toks[i] = token{tokString, sqlQuote(p)}
}

// source checks the plumb table function source at i (a literal or a
// parameter) as sourceValue does.
func (r *rewriter) source(i int) {
	t := r.toks[i]
	if t.kind == tokParam {
		r.paths[paramNumber(t.text)] = true
		return
	}
	v, _ := t.stringValue()
	p, err := r.gate.sourceValue(v)
	if err != nil {
		r.fail(err)
		return
	}
	r.toks[i] = token{tokString, sqlQuote(p)}
}

// fileValue is the absolute path a path the client wrote means, if the
// sandbox allows it.
func (g *gate) fileValue(v string) (string, error) {
	p, err := g.files.Resolve(v)
	if err != nil {
		return "", pgError{stateInsufficientPriv, err.Error()}
	}
	return p, nil
}

// sourceValue checks a plumb table function's source: a parenthesised
// SELECT is checked and rewritten as a statement; a file path or glob is
// resolved as fileValue does; a table or view name is kept.
func (g *gate) sourceValue(v string) (string, error) {
	s := strings.TrimSpace(v)
	switch {
	case strings.HasPrefix(s, "("):
		sql, _, err := rewriteSQL(s, g)
		return sql, err
	case fileLike.MatchString(s):
		p, err := g.fileValue(s)
		if err == nil && g.checking && p != s {
			return "", refused("path %q was not resolved against the data directory before it ran", s)
		}
		return p, err
	case strings.HasPrefix(s, `"`):
		// a quoted name is used as written (udf/source.go): it must be
		// one name, or one could write "t", duckdb_logs
		r := &rewriter{toks: lex(s)}
		if !r.isName(significant(r.toks)) {
			return "", refused("the source %s is not one table or view name", s)
		}
	}
	return v, nil
}

// paramValue checks a bound parameter marked by the rules: a source
// (isSource) or a file.
func (g *gate) paramValue(v string, isSource bool) (string, error) {
	if isSource {
		return g.sourceValue(v)
	}
	return g.fileValue(v)
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
