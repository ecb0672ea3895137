package output

import (
	"bytes"
	"encoding/json"
	"fmt"
	"strings"

	"github.com/duckdb/duckdb-go/v2"
)

// Struct is a STRUCT value with its fields in their declared order.
// duckdb-go scans a STRUCT as a map[string]any, which has no order, so
// StructOrder rebuilds the order from the column's type.
type Struct struct {
	Names  []string
	Values []any
}

// String renders the struct as Text does.
func (s Struct) String() string { return Text(s) }

// StructOrder returns a function that rewrites a scanned row in place so
// that every STRUCT value in it, nested ones included (in lists, MAP values
// and other STRUCTs), is a Struct in declared order. typeNames are the
// columns' DuckDB types as duckdb-go's ColumnType.DatabaseTypeName gives
// them, such as STRUCT("b" INTEGER, "a" INTEGER)[]. It returns nil when no
// column holds a STRUCT, so callers can skip the work.
func StructOrder(typeNames []string) func(row []any) {
	types := make([]*typeNode, len(typeNames))
	found := false
	for i, name := range typeNames {
		if !strings.Contains(strings.ToUpper(name), "STRUCT(") {
			continue
		}
		p := typeParser{s: name}
		if t := p.parse(); t.hasStruct() {
			types[i], found = t, true
		}
	}
	if !found {
		return nil
	}
	return func(row []any) {
		for i, t := range types {
			if t != nil && i < len(row) {
				row[i] = t.order(row[i])
			}
		}
	}
}

// typeNode is the part of a DuckDB type that decides where STRUCTs sit.
type typeNode struct {
	kind   byte // 's' STRUCT, 'l' list or array, 'm' MAP, 'o' anything else
	names  []string
	fields []*typeNode // STRUCT fields; a list's element; a MAP's key and value
}

func (t *typeNode) hasStruct() bool {
	if t.kind == 's' {
		return true
	}
	for _, f := range t.fields {
		if f.hasStruct() {
			return true
		}
	}
	return false
}

// order rebuilds v, scanned from a value of type t, with its STRUCTs in
// declared order. A value of another shape than t says is left as it is.
func (t *typeNode) order(v any) any {
	switch t.kind {
	case 's':
		m, ok := v.(map[string]any)
		if !ok || len(m) != len(t.names) {
			return v
		}
		s := Struct{Names: t.names, Values: make([]any, len(t.names))}
		for i, name := range t.names {
			e, ok := m[name]
			if !ok {
				return v
			}
			s.Values[i] = t.fields[i].order(e)
		}
		return s
	case 'l':
		list, ok := v.([]any)
		if !ok || !t.fields[0].hasStruct() {
			return v
		}
		out := make([]any, len(list))
		for i, e := range list {
			out[i] = t.fields[0].order(e)
		}
		return out
	case 'm':
		m, ok := v.(duckdb.OrderedMap)
		if !ok || !t.fields[1].hasStruct() {
			return v
		}
		var out duckdb.OrderedMap
		keys, values := m.Keys(), m.Values()
		for i, k := range keys {
			out.Set(k, t.fields[1].order(values[i]))
		}
		return out
	}
	return v
}

// typeParser reads a DuckDB type name: STRUCT("name" TYPE, ...), MAP(K, V),
// UNION("name" TYPE, ...), other types with or without arguments
// (DECIMAL(4,2), ENUM('a', 'b'), TIMESTAMP WITH TIME ZONE), each followed
// by any number of [] or [n].
type typeParser struct {
	s   string
	pos int
}

func (p *typeParser) parse() *typeNode {
	p.space()
	var t *typeNode
	upper := strings.ToUpper(p.s[p.pos:])
	switch {
	case strings.HasPrefix(upper, "STRUCT("), strings.HasPrefix(upper, "UNION("):
		kind := byte('s')
		if upper[0] == 'U' {
			kind = 'o' // a UNION scans as duckdb.Union, not as a map
		}
		p.pos = strings.IndexByte(p.s[p.pos:], '(') + p.pos + 1
		t = &typeNode{kind: kind}
		for p.pos < len(p.s) {
			p.space()
			t.names = append(t.names, p.ident())
			t.fields = append(t.fields, p.parse())
			p.space()
			if !p.take(',') {
				break
			}
		}
		p.take(')')
	case strings.HasPrefix(upper, "MAP("):
		p.pos += len("MAP(")
		key := p.parse()
		p.space()
		p.take(',')
		value := p.parse()
		p.space()
		p.take(')')
		t = &typeNode{kind: 'm', fields: []*typeNode{key, value}}
	default:
		p.other()
		t = &typeNode{kind: 'o'}
	}
	for p.space(); p.pos < len(p.s) && p.s[p.pos] == '['; p.space() {
		if end := strings.IndexByte(p.s[p.pos:], ']'); end >= 0 {
			p.pos += end + 1
		} else {
			p.pos = len(p.s)
		}
		t = &typeNode{kind: 'l', fields: []*typeNode{t}}
	}
	return t
}

// ident reads a field name: "quoted" (with "" for a quote) or bare.
func (p *typeParser) ident() string {
	if p.take('"') {
		var b strings.Builder
		for p.pos < len(p.s) {
			c := p.s[p.pos]
			p.pos++
			if c == '"' {
				if !p.take('"') {
					break
				}
			}
			b.WriteByte(c)
		}
		return b.String()
	}
	start := p.pos
	for p.pos < len(p.s) && p.s[p.pos] != ' ' {
		p.pos++
	}
	return p.s[start:p.pos]
}

// other skips a type that holds no STRUCT: up to a ',', ')' or '[' outside
// its own parentheses and quotes.
func (p *typeParser) other() {
	depth, quoted := 0, false
	for ; p.pos < len(p.s); p.pos++ {
		c := p.s[p.pos]
		switch {
		case quoted:
			quoted = c != '\''
		case c == '\'':
			quoted = true
		case c == '(':
			depth++
		case c == ')' && depth > 0:
			depth--
		case depth == 0 && (c == ',' || c == ')' || c == '['):
			return
		}
	}
}

func (p *typeParser) space() {
	for p.pos < len(p.s) && p.s[p.pos] == ' ' {
		p.pos++
	}
}

func (p *typeParser) take(c byte) bool {
	if p.pos < len(p.s) && p.s[p.pos] == c {
		p.pos++
		return true
	}
	return false
}

// jsonObject is a JSON object whose keys keep their order.
type jsonObject struct {
	keys   []string
	values []any
}

func (o jsonObject) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, k := range o.keys {
		if i > 0 {
			b.WriteByte(',')
		}
		key, err := json.Marshal(k)
		if err != nil {
			return nil, err
		}
		val, err := json.Marshal(o.values[i])
		if err != nil {
			return nil, fmt.Errorf("field %s: %w", k, err)
		}
		b.Write(key)
		b.WriteByte(':')
		b.Write(val)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}
