package pgserver

import (
	"bufio"
	"strings"
	"testing"
)

// Every token rule of rewrite.go, case by case. The inputs are what the
// clients of the matrix send (PostgreSQL 15's psql, pgjdbc 42.5,
// SQLAlchemy 1.4); the outputs are what DuckDB must receive.
func TestRewriteRules(t *testing.T) {
	for _, test := range []struct{ in, want string }{
		// beginTransaction
		{"BEGIN", "BEGIN TRANSACTION"},
		{"begin isolation level serializable read only", "BEGIN TRANSACTION"},
		{"START TRANSACTION ISOLATION LEVEL READ COMMITTED", "BEGIN TRANSACTION"},
		{"BEGIN WORK;", "BEGIN TRANSACTION"},
		{"SELECT 'BEGIN'", "SELECT 'BEGIN'"},
		// operatorSyntax
		{"SELECT 1 WHERE c.relname OPERATOR(pg_catalog.~) '^(t)$'", "SELECT 1 WHERE c.relname ~ '^(t)$'"},
		{"WHERE x OPERATOR(pg_catalog.!~) 'a'", "WHERE x !~ 'a'"},
		// dropCollate
		{"WHERE n = 'x' COLLATE pg_catalog.default AND m = 'y'", "WHERE n = 'x'  AND m = 'y'"},
		{`ORDER BY 1 COLLATE "C"`, "ORDER BY 1 "},
		{`ORDER BY 1 COLLATE "de_DE"`, `ORDER BY 1 COLLATE "de_DE"`},
		// qualifiedCompat
		{"SELECT pg_catalog.version()", `SELECT version() AS "version"`},
		{"SELECT t.typname FROM pg_catalog.pg_type t", "SELECT t.typname FROM pg_type t"},
		{"SELECT x::pg_catalog.regclass", "SELECT x::regclass"},
		{"SELECT * FROM information_schema._pg_expandarray(k)", "SELECT * FROM _pg_expandarray(k)"},
		{"SELECT * FROM information_schema.tables", "SELECT * FROM information_schema.tables"},
		{"SELECT * FROM system.pg_catalog.pg_class", "SELECT * FROM system.pg_catalog.pg_class"},
		{"SELECT 'pg_catalog.pg_type'", "SELECT 'pg_catalog.pg_type'"},
		// regLiteral
		{"WHERE d.classoid = 'pg_class'::regclass", "WHERE d.classoid = (SELECT oid FROM pg_class WHERE relname = 'pg_class' LIMIT 1)"},
		{"WHERE typinput = 'pg_catalog.array_in'::pg_catalog.regproc", "WHERE typinput = 'array_in'"},
		{"SELECT 'int4'::regtype", "SELECT (SELECT oid FROM pg_type WHERE typname = 'int4' OR format_name = 'int4' LIMIT 1)"},
		{"SELECT a.attrelid::regclass", "SELECT a.attrelid::regclass"},
		// functionColumnName
		{"SELECT version(), current_database()", `SELECT version() AS "version", current_database() AS "current_database"`},
		{"SELECT count(*) FROM t", `SELECT count(*) AS "count" FROM t`},
		{"SELECT f(x) AS y FROM t", "SELECT f(x) AS y FROM t"},
		{"SELECT unit_root(x).p_value FROM t", "SELECT unit_root(x).p_value FROM t"},
		{"SELECT f(x) + 1 FROM t", "SELECT f(x) + 1 FROM t"},
		{"SELECT a FROM t GROUP BY f(a)", "SELECT a FROM t GROUP BY f(a)"},
		{"SELECT (SELECT max(a) FROM t)", `SELECT (SELECT max(a) AS "max" FROM t)`},
		{"SELECT 1 FROM t WHERE g(a) = 1", "SELECT 1 FROM t WHERE g(a) = 1"},
		{"SELECT * FROM diagnose('x', by := 'g')", "SELECT * FROM diagnose('x', by := 'g')"},
		// likeEscape
		{`WHERE p.proname LIKE E'unit\\_root'`, `WHERE p.proname LIKE E'unit\\_root' ESCAPE '\'`},
		{`WHERE c.relname LIKE 'jdbc\_%'`, `WHERE c.relname LIKE 'jdbc\_%' ESCAPE '\'`},
		{`WHERE c.relname LIKE 'a\_b' ESCAPE '!'`, `WHERE c.relname LIKE 'a\_b' ESCAPE '!'`},
		{`WHERE c.relname LIKE 'plain%'`, `WHERE c.relname LIKE 'plain%'`},
		// filePaths (data directory /srv/data)
		{"SELECT * FROM 'shops.parquet'", "SELECT * FROM '/srv/data/shops.parquet'"},
		{"SELECT * FROM read_csv('in/x.csv', header = true)", "SELECT * FROM read_csv('/srv/data/in/x.csv', header = true)"},
		{"SELECT * FROM read_parquet(['a.parquet', 'b.parquet'])", "SELECT * FROM read_parquet(['/srv/data/a.parquet', '/srv/data/b.parquet'])"},
		{"FROM diagnose('shops.parquet', by := 'shop', at := 'day', value := 'units')", "FROM diagnose('/srv/data/shops.parquet', by := 'shop', at := 'day', value := 'units')"},
		{"FROM diagnose('sales', by := 'shop')", "FROM diagnose('sales', by := 'shop')"},
		{"FROM restore('f.parquet', 'recipes.parquet', by := 'g')", "FROM restore('/srv/data/f.parquet', '/srv/data/recipes.parquet', by := 'g')"},
		{"COPY t TO 'out.csv'", "COPY t TO '/srv/data/out.csv'"},
		{"COPY t FROM 'in.csv'", "COPY t FROM '/srv/data/in.csv'"},
		{"COPY t FROM STDIN", "COPY t FROM STDIN"},
		{"SELECT * FROM '/srv/data/abs.parquet'", "SELECT * FROM '/srv/data/abs.parquet'"},
		{"SELECT extract(year FROM '2024-01-01'::DATE)", `SELECT extract(year FROM '2024-01-01'::DATE) AS "extract"`},
		{"SELECT substring('a.csv' FROM 1)", `SELECT substring('a.csv' FROM 1) AS "substring"`},
	} {
		got, _, err := rewriteSQL(test.in, testGate("/srv/data"))
		if err != nil || got != test.want {
			t.Errorf("rewrite %q\n got %q (%v)\nwant %q", test.in, got, err, test.want)
		}
	}
}

// A parameter where a file path goes is marked, so that its bound value
// is resolved against --data too.
func TestRewriteMarksPathParameters(t *testing.T) {
	g := testGate("/d")
	_, paths, err := rewriteSQL("SELECT * FROM diagnose($1, by := $2) JOIN read_csv($3) ON true", g)
	if err != nil || len(paths) != 2 || !paths[1] || paths[3] {
		t.Errorf("paths %v (%v), want $1 (a source) and $3 (a file)", paths, err)
	}
	if p, err := g.paramValue("sales", true); err != nil || p != "sales" {
		t.Errorf("a table name became %q (%v)", p, err)
	}
	if p, err := g.paramValue("x/../../etc/passwd.csv", true); err == nil {
		t.Errorf("a path outside --data was allowed as %q", p)
	}
}

// The lexer gives the statement back exactly and never splits a literal,
// a quoted identifier or a comment.
func TestLexRoundTrip(t *testing.T) {
	for _, sql := range []string{
		"SELECT 'it''s' AS \"a \"\" b\", E'x\\'y', $$a;b$$, $t$c$t$ -- c\n/* a /* nested */ b */ FROM t WHERE x::INT[] >= $12",
		"SELECT 1.5e-3, .5, 3::numeric(10,2), a->>'k', b @> c",
	} {
		toks := lex(sql)
		if join(toks) != sql {
			t.Errorf("round trip of %q gave %q", sql, join(toks))
		}
	}
	toks := lex("SELECT 'pg_catalog.x' -- pg_catalog.y\n")
	for _, tk := range toks {
		if tk.kind == tokWord && tk.name() == "pg_catalog" {
			t.Errorf("pg_catalog inside a literal or comment became a word")
		}
	}
}

// PostgreSQL's array input syntax (documentation, "Arrays: Array Value
// Input"), common practice.
func TestArrayParameters(t *testing.T) {
	for _, test := range []struct {
		in   string
		oid  uint32
		duck string
		want string
	}{
		{`{1,2,3}`, oidInt8Array, "", "['1'::BIGINT, '2'::BIGINT, '3'::BIGINT]::BIGINT[]"},
		{`{"1.5",NULL,"-2"}`, oidFloat8Array, "", "['1.5'::DOUBLE, NULL, '-2'::DOUBLE]::DOUBLE[]"},
		{`{a,"b c","d\"e",NULL,"NULL"}`, oidTextArray, "", `['a'::VARCHAR, 'b c'::VARCHAR, 'd"e'::VARCHAR, NULL, 'NULL'::VARCHAR]::VARCHAR[]`},
		{`{}`, oidInt4Array, "", "[]::INTEGER[]"},
		{`{"1","4"}`, 0, "LIST", "['1', '4']"},
		{`{1,2}`, 0, "", "'{1,2}'"},
	} {
		got, err := paramLiteral([]byte(test.in), 0, test.oid, test.duck)
		if err != nil || got != test.want {
			t.Errorf("%s (oid %d): got %q %v, want %q", test.in, test.oid, got, err, test.want)
		}
	}
	for _, bad := range []string{`{1,{2}}`, `{"a`, `1,2`} {
		if _, err := paramLiteral([]byte(bad), 0, oidTextArray, ""); err == nil {
			t.Errorf("%q was accepted", bad)
		}
	}
}

// Scalar parameters in text and binary formats become typed literals; the
// binary encodings are PostgreSQL's send functions (int4send, float8send,
// date_send, uuid_send, numeric_send), common practice.
func TestParameterLiterals(t *testing.T) {
	for _, test := range []struct {
		data   []byte
		format int16
		oid    uint32
		want   string
	}{
		{[]byte("41"), 0, oidInt4, "'41'::INTEGER"},
		{[]byte("x'); DROP TABLE t; --"), 0, oidText, "'x''); DROP TABLE t; --'::VARCHAR"},
		{[]byte("plumb"), 0, 0, "'plumb'"},
		{[]byte("2024-02-28"), 0, oidDate, "'2024-02-28'::DATE"},
		{[]byte("t"), 0, oidBool, "true"},
		{nil, 0, oidInt8, "NULL::BIGINT"},
		{[]byte{0, 0, 0, 41}, 1, oidInt4, "41::INTEGER"},
		{[]byte{0x40, 0x04, 0, 0, 0, 0, 0, 0}, 1, oidFloat8, "2.5::DOUBLE"},
		{[]byte{0, 0, 0x22, 0x79}, 1, oidDate, "DATE '2024-02-29'"}, // 8825 days after 2000-01-01
		{[]byte{0x6b, 0xa7, 0xb8, 0x10, 0x9d, 0xad, 0x11, 0xd1, 0x80, 0xb4, 0, 0xc0, 0x4f, 0xd4, 0x30, 0xc8}, 1, oidUUID, "'6ba7b810-9dad-11d1-80b4-00c04fd430c8'::UUID"},
		{[]byte{0, 2, 0, 0, 0, 0, 0, 2, 0, 12, 13, 72}, 1, oidNumeric, "'0.00123400e4'::DOUBLE"}, // 12.3400: digits 12, 3400, weight 0, scale 2; written 0.DDDD…e(4(weight+1))
	} {
		got, err := paramLiteral(test.data, test.format, test.oid, "")
		if err != nil || got != test.want {
			t.Errorf("%v (format %d, oid %d): got %q %v, want %q", test.data, test.format, test.oid, got, err, test.want)
		}
	}
	if _, err := paramLiteral([]byte("4x"), 0, oidInt4, ""); err == nil {
		t.Error("a malformed integer was accepted")
	}
	sql, err := inlineParams(lex("SELECT $1, '$1', $2"), []string{"1", "'a'"})
	if err != nil || sql != "SELECT 1, '$1', 'a'" {
		t.Errorf("inline: %q %v", sql, err)
	}
	if _, err := inlineParams(lex("SELECT $3"), []string{"1"}); err == nil {
		t.Error("a missing parameter was accepted")
	}
}

// FETCH and MOVE forms (PostgreSQL documentation, FETCH), common practice.
func TestParseFetch(t *testing.T) {
	for _, test := range []struct {
		sql    string
		cursor string
		count  int64
	}{
		{`FETCH FORWARD 50 FROM "stream"`, "stream", 50},
		{"FETCH 2000 FROM c_1", "c_1", 2000},
		{"FETCH NEXT FROM c", "c", 1},
		{"FETCH ALL IN c", "c", 0},
		{"FETCH FORWARD ALL FROM c", "c", 0},
		{"MOVE 10 IN c", "c", 10},
		{"FETCH c", "c", 1},
	} {
		f, err := parseFetch(test.sql)
		if err != nil || f.cursor != test.cursor || f.count != test.count {
			t.Errorf("%s: %+v %v", test.sql, f, err)
		}
	}
	for _, bad := range []string{"FETCH BACKWARD 1 FROM c", "FETCH PRIOR FROM c", "FETCH -1 FROM c", "FETCH 5"} {
		if _, err := parseFetch(bad); err == nil {
			t.Errorf("%s was accepted", bad)
		}
	}
}

// COPY's options in both syntaxes, and the text and CSV record readers
// (PostgreSQL documentation, COPY: "File Formats"), common practice.
func TestCopyFormats(t *testing.T) {
	o := parseCopyOptions("WITH (FORMAT csv, HEADER true, DELIMITER ';', NULL 'NA')")
	if !o.csv || !o.header || o.delimiter != ";" || o.null != "NA" {
		t.Errorf("new syntax: %+v", o)
	}
	o = parseCopyOptions("WITH CSV HEADER")
	if !o.csv || !o.header || o.delimiter != "," || o.null != "" {
		t.Errorf("old syntax: %+v", o)
	}
	o = parseCopyOptions("(FORMAT BINARY)")
	if !o.binary || o.csv {
		t.Errorf("binary: %+v", o)
	}
	o = parseCopyOptions("")
	if o.csv || o.delimiter != "\t" || o.null != `\N` {
		t.Errorf("text: %+v", o)
	}

	r := bufio.NewReader(strings.NewReader("1\ta\\tb\\\\c\t\\N\n2\t\t\\n\n"))
	text := parseCopyOptions("")
	fields, nulls, err := readTextRecord(r, text)
	if err != nil || strings.Join(fields, "|") != "1|a\tb\\c|" || !nulls[2] || nulls[1] {
		t.Errorf("text line 1: %q %v %v", fields, nulls, err)
	}
	fields, nulls, _ = readTextRecord(r, text)
	if strings.Join(fields, "|") != "2||\n" || nulls[1] {
		t.Errorf("text line 2: %q %v", fields, nulls)
	}

	csv := parseCopyOptions("CSV")
	r = bufio.NewReader(strings.NewReader("1,\"a,\"\"b\"\"\nc\",,\"\"\r\n2,x,y,z"))
	fields, nulls, err = readCSVRecord(r, csv)
	if err != nil || len(fields) != 4 || fields[1] != "a,\"b\"\nc" || !nulls[2] || nulls[3] {
		t.Errorf("csv record 1: %q %v %v", fields, nulls, err)
	}
	fields, _, _ = readCSVRecord(r, csv)
	if strings.Join(fields, "|") != "2|x|y|z" {
		t.Errorf("csv record 2: %q", fields)
	}

	var line []byte
	line = appendTextField(line, "a\tb\\c\nd", '\t')
	if string(line) != `a\tb\\c\nd` {
		t.Errorf("text field: %q", line)
	}
	if got := string(appendCSVField(nil, "", ',', "")); got != `""` {
		t.Errorf("an empty string in CSV: %q, want \"\" (NULL is the bare empty field)", got)
	}
	if got := string(appendCSVField(nil, `say "hi", then`, ',', "")); got != `"say ""hi"", then"` {
		t.Errorf("csv field: %q", got)
	}
}

// COPY to and from the client is recognised on tokens: keywords inside a
// query or a literal do not count.
func TestCopyClient(t *testing.T) {
	for _, test := range []struct{ sql, dir, source, options string }{
		{"COPY t FROM STDIN", "in", "", ""},
		{"copy t (a, b) from stdin with (format csv)", "in", "", ""},
		{"COPY (SELECT 'x TO STDOUT' FROM t) TO STDOUT WITH CSV HEADER;", "out", "(SELECT 'x TO STDOUT' FROM t)", "WITH CSV HEADER"},
		{`COPY "my table" TO STDOUT`, "out", `"my table"`, ""},
		{"COPY (SELECT 1 FROM stdin_table) TO '/tmp/x.csv'", "", "", ""},
		{"COPY t TO 'out.csv'", "", "", ""},
	} {
		dir, source, options := copyClient(test.sql)
		if dir != test.dir || source != test.source || options != test.options {
			t.Errorf("%s: %q %q %q", test.sql, dir, source, options)
		}
	}
}

// Every OID the server can describe a column or parameter with has a
// pg_type row (drivers look unknown OIDs up there), and arrays point at
// their elements and back.
func TestPgTypeCoversEverySentOID(t *testing.T) {
	sent := map[uint32]string{}
	for _, name := range []string{"BOOLEAN", "TINYINT", "SMALLINT", "UTINYINT", "INTEGER", "USMALLINT", "BIGINT", "UINTEGER",
		"UBIGINT", "HUGEINT", "UHUGEINT", "DECIMAL(10,2)", "FLOAT", "DOUBLE", "VARCHAR", "DATE", "TIME", "TIMESTAMP",
		"TIMESTAMP WITH TIME ZONE", "INTERVAL", "BLOB", "UUID", "STRUCT(a INTEGER)", "MAP(VARCHAR, INTEGER)", "JSON"} {
		oid := typeOID(name)
		sent[oid] = name
		if a, ok := arrayOf[oid]; ok {
			sent[a] = name + "[]"
		}
	}
	for oid, name := range sent {
		row, ok := pgTypeOf(oid)
		if !ok {
			t.Errorf("%s is sent as OID %d, which pg_type lacks", name, oid)
			continue
		}
		if row.elem != 0 && arrayOf[row.elem] != oid && oid != 1015 {
			t.Errorf("array type %s (%d) and its element %d disagree", row.name, oid, row.elem)
		}
	}
}
