package main

import (
	"strings"
	"testing"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/cmd/internal/output"
)

// TestQueryStructFieldsInDeclaredOrder: plumb query prints STRUCT fields
// in their declared order (struct_pack(b := 1, a := 2) is {b: 1, a: 2}),
// nested ones too, as a table, CSV and JSON.
func TestQueryStructFieldsInDeclaredOrder(t *testing.T) {
	const q = `SELECT struct_pack(b := 1, a := 2) AS s, [struct_pack(z := 'x', y := 1)] AS l,
		struct_pack(o := struct_pack(n := 1, m := 2), k := 3) AS n, MAP {'k': struct_pack(q := 1, p := 2)} AS m`
	for _, test := range []struct{ format, want string }{
		{"table", "{b: 1, a: 2}  [{z: x, y: 1}]  {o: {n: 1, m: 2}, k: 3}  {k: {q: 1, p: 2}}"},
		{"csv", `"{b: 1, a: 2}","[{z: x, y: 1}]","{o: {n: 1, m: 2}, k: 3}","{k: {q: 1, p: 2}}"`},
		{"json", `{"s":{"b":1,"a":2},"l":[{"z":"x","y":1}],"n":{"o":{"n":1,"m":2},"k":3},"m":{"k":{"q":1,"p":2}}}`},
	} {
		out, err := run(t, "", "query", "--format", test.format, q)
		if err != nil || !strings.Contains(out, test.want+"\n") {
			t.Errorf("%s: %v\n%s\nwant a row %s", test.format, err, out, test.want)
		}
	}
}

// TestStructOrderTypeNames: StructOrder reads the field order from type
// names as duckdb-go's DatabaseTypeName gives them (DuckDB 1.5.6: every
// field name double-quoted, a quote in a name doubled), past types whose
// own parentheses, commas, quotes or spaces must not end a field.
func TestStructOrderTypeNames(t *testing.T) {
	var m duckdb.OrderedMap
	m.Set("k", map[string]any{"q": 1, "p": 2})
	for _, test := range []struct {
		typeName string
		value    any
		want     string
	}{
		{`STRUCT("b" INTEGER, "a" INTEGER)`, map[string]any{"a": 2, "b": 1}, "{b: 1, a: 2}"},
		{`STRUCT("we""ird name" INTEGER, "a" DECIMAL(4,2))`, map[string]any{"a": 1.5, `we"ird name`: 1}, `{we"ird name: 1, a: 1.5}`},
		{`STRUCT("z" ENUM('x, y', 'z)'), "y" TIMESTAMP WITH TIME ZONE, "x" INTEGER[2])`,
			map[string]any{"x": []any{1, 2}, "y": 0, "z": "x, y"}, "{z: x, y, y: 0, x: [1, 2]}"},
		{`STRUCT("e" STRUCT("d" INTEGER, "c" INTEGER)[][], "a" INTEGER)`,
			map[string]any{"a": 0, "e": []any{[]any{map[string]any{"c": 2, "d": 1}}}}, "{e: [[{d: 1, c: 2}]], a: 0}"},
		{`MAP(VARCHAR, STRUCT("q" INTEGER, "p" INTEGER))`, m, "{k: {q: 1, p: 2}}"},
		{`STRUCT("u" UNION("t" INTEGER, "s" VARCHAR), "a" INTEGER)`, map[string]any{"a": 1, "u": 7}, "{u: 7, a: 1}"},
		// a value of another shape than the type says is left alone
		{`STRUCT("b" INTEGER, "a" INTEGER)`, map[string]any{"a": 2}, "{a: 2}"},
	} {
		row := []any{test.value}
		output.StructOrder([]string{test.typeName})(row)
		if got := output.Text(row[0]); got != test.want {
			t.Errorf("%s: %s, want %s", test.typeName, got, test.want)
		}
	}
	if output.StructOrder([]string{"INTEGER", "VARCHAR[]", "MAP(VARCHAR, INTEGER)"}) != nil {
		t.Error("a row without STRUCTs got an order function")
	}
}
