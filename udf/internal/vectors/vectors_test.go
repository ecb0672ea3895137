package vectors

import (
	"context"
	"database/sql"
	"fmt"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/duckdb/duckdb-go/v2"
)

// scalar is a test scalar function with its own chunk executor.
type scalar struct {
	params []duckdb.TypeInfo
	result duckdb.TypeInfo
	exec   func(*duckdb.ChunkIteratorState) error
}

func (s scalar) Config() duckdb.ScalarFuncConfig {
	return duckdb.ScalarFuncConfig{InputTypeInfos: s.params, ResultTypeInfo: s.result, SpecialNullHandling: true}
}

func (s scalar) Executor() duckdb.ScalarFuncExecutor {
	return duckdb.ScalarFuncExecutor{ChunkContextExecutor: func(_ context.Context, c *duckdb.ChunkIteratorState) error { return s.exec(c) }}
}

func typeInfo(t *testing.T, kind duckdb.Type) duckdb.TypeInfo {
	t.Helper()
	info, err := duckdb.NewTypeInfo(kind)
	if err != nil {
		t.Fatal(err)
	}
	return info
}

func listOf(t *testing.T, child duckdb.TypeInfo) duckdb.TypeInfo {
	t.Helper()
	info, err := duckdb.NewListInfo(child)
	if err != nil {
		t.Fatal(err)
	}
	return info
}

func open(t *testing.T) (*sql.DB, *sql.Conn) {
	t.Helper()
	db, err := sql.Open("duckdb", "")
	if err != nil {
		t.Fatal(err)
	}
	conn, err := db.Conn(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { conn.Close(); db.Close() })
	return db, conn
}

// canonical renders a list as the direct path reads it: floats with NaN
// for NULL, times as microseconds since 1970, integers widened, pairs as
// (t, v).
func canonical(v any) string {
	switch x := v.(type) {
	case nil:
		return "NULL"
	case []float64:
		return fmt.Sprint(x)
	case []int64:
		return fmt.Sprint(x)
	case Points:
		return fmt.Sprint(x.At, x.Values)
	}
	return fmt.Sprintf("unexpected %T", v)
}

// boxed converts duckdb-go's own value of a list into the same form.
func boxed(v any, double, pairs bool) (string, error) {
	if v == nil {
		return "NULL", nil
	}
	list := v.([]any)
	if double {
		out := make([]float64, len(list))
		for i, e := range list {
			if e == nil {
				out[i] = math.NaN()
			} else {
				out[i] = e.(float64)
			}
		}
		return fmt.Sprint(out), nil
	}
	if pairs {
		{
			at := make([]any, len(list))
			vals := make([]any, len(list))
			for i, e := range list {
				at[i], vals[i] = e.(map[string]any)["t"], e.(map[string]any)["v"]
			}
			ts, err := boxed(at, false, false)
			if err != nil {
				return "", err
			}
			vs, _ := boxed(vals, true, false)
			return ts + " " + vs, nil
		}
	}
	out := make([]int64, len(list))
	for i, e := range list {
		switch y := e.(type) {
		case nil:
			return "", ErrNullTime
		case time.Time:
			out[i] = y.UnixMicro()
		case int8:
			out[i] = int64(y)
		case int16:
			out[i] = int64(y)
		case int32:
			out[i] = int64(y)
		case int64:
			out[i] = y
		case uint8:
			out[i] = int64(y)
		case uint16:
			out[i] = int64(y)
		case uint32:
			out[i] = int64(y)
		default:
			return "", fmt.Errorf("element of type %T", e)
		}
	}
	return fmt.Sprint(out), nil
}

// TestReadEqualsIterator registers a function that reads its list
// argument both ways, directly (ReadLists) and through duckdb-go's getter,
// and fails the query when they differ; it runs over every element type
// plumb reads, with NULL lists, NULL elements and empty lists, on chunks of
// several thousand rows.
func TestReadEqualsIterator(t *testing.T) {
	if !Available() {
		t.Fatal("duckdb-go's layout changed: direct reading is off (see read.go)")
	}
	_, conn := open(t)
	anyType := typeInfo(t, duckdb.TYPE_ANY)
	check := scalar{
		params: []duckdb.TypeInfo{anyType},
		result: typeInfo(t, duckdb.TYPE_VARCHAR),
		exec: func(state *duckdb.ChunkIteratorState) error {
			in := state.GetInputChunk()
			n := in.GetSize()
			lists := ReadLists(in, n)
			if lists[0] == nil {
				return fmt.Errorf("the column is not read directly")
			}
			var buf Buffers
			out := make([]string, n)
			for row := range n {
				for _, b := range []*Buffers{nil, &buf} {
					d, derr := lists[0].Value(row, b)
					v, err := in.GetValue(0, row)
					if err != nil {
						return err
					}
					_, double := d.([]float64)
					_, pairs := d.(Points)
					want, werr := boxed(v, double, pairs)
					if (derr != nil) != (werr != nil) {
						return fmt.Errorf("row %d: direct error %v, iterator error %v", row, derr, werr)
					}
					if derr != nil {
						return derr // the same error on both paths
					}
					if canonical(d) != want {
						return fmt.Errorf("row %d: direct %s, iterator %s", row, canonical(d), want)
					}
					out[row] = want
				}
			}
			for row := range n {
				MoveTo(state, row)
				if err := state.SetResult(out[row]); err != nil {
					return err
				}
			}
			return nil
		},
	}
	if err := duckdb.RegisterScalarUDF(conn, "read_check", check); err != nil {
		t.Fatal(err)
	}
	// list(...) of i over groups: row 0 of every 7 is NULL, every 5th group
	// empty, NULL elements inside.
	element := func(e string) string {
		return fmt.Sprintf(`SELECT count(r) FROM (SELECT read_check(CASE WHEN g %% 7 = 0 THEN NULL WHEN g %% 5 = 0 THEN [] ELSE l END) AS r
			FROM (SELECT g, list(%s ORDER BY i) AS l FROM range(3000) gs(g), range(12) r(i) GROUP BY g))`, e)
	}
	for _, q := range []string{
		element(`CASE WHEN (g + i) % 4 = 0 THEN NULL ELSE i * 0.5 + g END::DOUBLE`),
		element(`(i + g)::BIGINT`),
		element(`(i + g)::INTEGER`),
		element(`(i + g % 100)::SMALLINT`),
		element(`(i + g % 100)::TINYINT`),
		element(`(i + g)::UINTEGER`),
		element(`(i + g % 100)::USMALLINT`),
		element(`(i + g % 100)::UTINYINT`),
		element(`DATE '2024-01-01' + (i + g)::INTEGER`),
		element(`TIMESTAMP '2024-01-01' + INTERVAL 1 HOUR * (i + g)`),
		element(`(TIMESTAMP '1969-12-31 23:59:59' + INTERVAL 1 MILLISECOND * (i * 7 - g))::TIMESTAMP_NS`),
		element(`(TIMESTAMP '2024-01-01' + INTERVAL 1 SECOND * (i + g))::TIMESTAMP_S`),
		element(`(TIMESTAMP '2024-01-01' + INTERVAL 1 MILLISECOND * (i + g))::TIMESTAMP_MS`),
		element(`struct_pack(t := (i + g)::BIGINT, v := CASE WHEN i = 3 THEN NULL ELSE i * 1.5 END::DOUBLE)`),
		element(`struct_pack(t := DATE '2024-01-01' + i::INTEGER, v := i::DOUBLE)`),
		// a constant list over thousands of rows, and a NULL time (an error on both paths)
		`SELECT count(read_check([1.5, NULL, 3.0]::DOUBLE[])) FROM range(5000)`,
	} {
		var n int
		if err := conn.QueryRowContext(context.Background(), q).Scan(&n); err != nil {
			t.Errorf("%s: %v", q, err)
		} else if n == 0 {
			t.Errorf("%s: no rows", q)
		}
	}
	var n int
	err := conn.QueryRowContext(context.Background(), `SELECT count(read_check([1, NULL, 3]::BIGINT[]))`).Scan(&n)
	if err == nil || !strings.Contains(err.Error(), "the at column holds a NULL") {
		t.Errorf("a NULL time: got %v, want ErrNullTime on both paths", err)
	}
}

// TestWriteEqualsSetter writes the same results through Write and through
// duckdb-go's setter and requires the same rows, for every result type
// plumb writes: numbers, booleans, text, LIST(DOUBLE) with NULL elements,
// LIST(VARCHAR), empty lists, NULL rows and STRUCTs of them given as a
// Record or a map.
func TestWriteEqualsSetter(t *testing.T) {
	if !ResultsAvailable() {
		t.Fatal("duckdb-go's layout changed: direct writing is off (see read.go)")
	}
	_, conn := open(t)
	d, b := typeInfo(t, duckdb.TYPE_DOUBLE), typeInfo(t, duckdb.TYPE_BIGINT)
	flag, text := typeInfo(t, duckdb.TYPE_BOOLEAN), typeInfo(t, duckdb.TYPE_VARCHAR)
	names := []string{"x", "n", "ok", "s", "xs", "ss"}
	infos := []duckdb.TypeInfo{d, b, flag, text, listOf(t, d), listOf(t, text)}
	entries := make([]duckdb.StructEntry, len(names))
	for i := range names {
		e, err := duckdb.NewStructEntry(infos[i], names[i])
		if err != nil {
			t.Fatal(err)
		}
		entries[i] = e
	}
	st, err := duckdb.NewStructInfo(entries[0], entries[1:]...)
	if err != nil {
		t.Fatal(err)
	}
	// value is row i's result of kind k (0-5 the members, 6 the STRUCT as a
	// Record, 7 as a map); every 9th row is NULL.
	value := func(k, i int) any {
		if i%9 == 4 {
			return nil
		}
		member := []any{
			float64(i) / 3, int64(i * 7), i%2 == 0, fmt.Sprint("row ", i),
			Floats{float64(i), math.NaN(), 2.5}[:i%4],
			[]any{"a", fmt.Sprint(i)}[:i%3],
		}
		if i%11 == 0 {
			member[0], member[3] = nil, nil
		}
		switch {
		case k < 6:
			return member[k]
		case k == 6:
			return Record{Names: names, Values: member}
		}
		return Record{Names: names, Values: member}.Map()
	}
	setterValue := func(v any) any {
		switch x := v.(type) {
		case Floats:
			out := make([]any, len(x))
			for i, f := range x {
				if !math.IsNaN(f) {
					out[i] = f
				}
			}
			return out
		case Record:
			v = x.Map()
		}
		if m, ok := v.(map[string]any); ok {
			c := make(map[string]any, len(m))
			for k, e := range m {
				if f, ok := e.(Floats); ok {
					c[k] = func() any {
						out := make([]any, len(f))
						for i, x := range f {
							if !math.IsNaN(x) {
								out[i] = x
							}
						}
						return out
					}()
				} else {
					c[k] = e
				}
			}
			return c
		}
		return v
	}
	for k, result := range append(infos, st, st) {
		for _, direct := range []bool{true, false} {
			name := fmt.Sprintf("write_%d_%v", k, direct)
			f := scalar{
				params: []duckdb.TypeInfo{b},
				result: result,
				exec: func(state *duckdb.ChunkIteratorState) error {
					in := state.GetInputChunk()
					n := in.GetSize()
					results := make([]any, n)
					for row := range n {
						v, err := in.GetValue(0, row)
						if err != nil {
							return err
						}
						results[row] = value(k, int(v.(int64)))
					}
					if direct {
						if !Write(state, results, make([]bool, n)) {
							return fmt.Errorf("Write refused a result of kind %d", k)
						}
						return nil
					}
					for row := range n {
						MoveTo(state, row)
						if err := state.SetResult(setterValue(results[row])); err != nil {
							return err
						}
					}
					return nil
				},
			}
			if err := duckdb.RegisterScalarUDF(conn, name, f); err != nil {
				t.Fatal(err)
			}
		}
		q := func(direct bool) []string {
			rows, err := conn.QueryContext(context.Background(), fmt.Sprintf("SELECT write_%d_%v(i)::VARCHAR FROM range(5000) r(i) ORDER BY i", k, direct))
			if err != nil {
				t.Fatal(err)
			}
			defer rows.Close()
			var out []string
			for rows.Next() {
				var s sql.NullString
				if err := rows.Scan(&s); err != nil {
					t.Fatal(err)
				}
				out = append(out, fmt.Sprint(s.Valid, s.String))
			}
			if err := rows.Err(); err != nil {
				t.Fatal(err)
			}
			return out
		}
		got, want := q(true), q(false)
		if len(got) != 5000 || len(want) != 5000 {
			t.Fatalf("kind %d: %d and %d rows", k, len(got), len(want))
		}
		for i := range got {
			if got[i] != want[i] {
				t.Fatalf("kind %d, row %d: Write gives %s, the setter %s", k, i, got[i], want[i])
			}
		}
	}
}
