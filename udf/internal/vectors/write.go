package vectors

import (
	"math"
	"unsafe"

	"github.com/duckdb/duckdb-go/v2"
	"github.com/duckdb/duckdb-go/v2/mapping"
)

// Floats is a LIST(DOUBLE) result with NaN standing for NULL, alone or as
// a member of a STRUCT result.
type Floats []float64

// Record is one STRUCT value: Values[i] is the field Names[i]. Write stores
// it by position; Map gives it as duckdb-go's setter takes it.
type Record struct {
	Names  []string
	Values []any
}

// Map is the record as a map from field name to value.
func (r Record) Map() map[string]any {
	m := make(map[string]any, len(r.Names))
	for i, n := range r.Names {
		m[n] = r.Values[i]
	}
	return m
}

// Write writes a chunk's results into its result vector and reports
// whether it did; rows to skip (a NULL argument of a function without
// special NULL handling) are written NULL. When a result has a Go type or
// the vector a DuckDB type this package does not write, nothing is written
// and it returns false: the caller writes the chunk through duckdb-go's
// setter (MoveTo, SetResult).
func Write(state *duckdb.ChunkIteratorState, results []any, skip []bool) bool {
	out, ok := resultVector(state)
	return ok && writeResults(out, results, skip)
}

// Writing a chunk's results straight into DuckDB's result vector.
//
// duckdb-go's setter boxes every element of a list result, so a function
// returning a thousand values per group paid for a thousand boxes. When the
// result type is made of the kinds below, executeDirect writes the whole
// chunk here instead: DOUBLE, BIGINT, BOOLEAN and VARCHAR values, a
// LIST(DOUBLE) given as Floats (NaN for NULL; every NaN or ±Inf DOUBLE is
// written as NULL), a LIST(VARCHAR) given as a []any of strings, and a
// STRUCT of those given as a Record or a map[string]any. Every result is
// checked first; if one has another Go type, nothing is written and the
// chunk goes through
// duckdb-go's setter as before.

// columnWriter writes one column (or a struct member) of a chunk.
type columnWriter interface {
	// accepts reports whether write can store v (nil is NULL).
	accepts(v any) bool
	// count sees every value before begin (lists count their elements).
	count(v any)
	// begin reserves space and fetches the vector's memory.
	begin(rows int)
	write(row int, v any)
	// null marks row NULL.
	null(row int)
}

// newColumnWriter returns a writer for vec of logical type lt, or false
// for a type it does not write.
func newColumnWriter(vec mapping.Vector, lt mapping.LogicalType) (columnWriter, bool) {
	switch mapping.GetTypeId(lt) {
	case mapping.TypeDouble:
		return &primitiveWriter[float64]{vec: vec}, true
	case mapping.TypeBigInt:
		return &primitiveWriter[int64]{vec: vec}, true
	case mapping.TypeBoolean:
		return &primitiveWriter[bool]{vec: vec}, true
	case mapping.TypeVarchar:
		return &textWriter{vec: vec}, true
	case mapping.TypeList:
		ct := mapping.ListTypeChildType(lt)
		defer mapping.DestroyLogicalType(&ct)
		switch mapping.GetTypeId(ct) {
		case mapping.TypeDouble:
			return &floatsWriter{listRows: listRows{vec: vec}}, true
		case mapping.TypeVarchar:
			return &textListWriter{listRows: listRows{vec: vec}}, true
		}
		return nil, false
	case mapping.TypeStruct:
		w := &structWriter{vec: vec}
		for i := 0; i < int(mapping.StructTypeChildCount(lt)); i++ {
			ct := mapping.StructTypeChildType(lt, mapping.IdxT(i))
			child, ok := newColumnWriter(mapping.StructVectorGetChild(vec, mapping.IdxT(i)), ct)
			mapping.DestroyLogicalType(&ct)
			if !ok {
				return nil, false
			}
			w.names = append(w.names, mapping.StructTypeChildName(lt, mapping.IdxT(i)))
			w.fields = append(w.fields, child)
		}
		return w, true
	}
	return nil, false
}

// writeResults writes results into out unless a type does not fit; rows
// to skip (a NULL argument of a function without special NULL handling)
// are written NULL.
func writeResults(out mapping.Vector, results []any, skip []bool) bool {
	lt := mapping.VectorGetColumnType(out)
	w, ok := newColumnWriter(out, lt)
	mapping.DestroyLogicalType(&lt)
	if !ok {
		return false
	}
	for i, r := range results {
		if !skip[i] && !w.accepts(r) {
			return false
		}
	}
	for i, r := range results {
		if !skip[i] {
			w.count(r)
		}
	}
	w.begin(len(results))
	for i, r := range results {
		if skip[i] {
			w.null(i) // duckdb-go marks it NULL too; this leaves no stale list entry
			continue
		}
		w.write(i, r)
	}
	return true
}

// validity is a writable DuckDB validity mask.
type validity struct{ mask unsafe.Pointer }

func writableValidity(vec mapping.Vector) validity {
	mapping.VectorEnsureValidityWritable(vec)
	return validity{mapping.VectorGetValidity(vec)}
}

// set marks bit i valid or NULL.
func (m validity) set(i uint64, ok bool) {
	word := (*uint64)(unsafe.Add(m.mask, (i/64)*8))
	if ok {
		*word |= 1 << (i % 64)
	} else {
		*word &^= 1 << (i % 64)
	}
}

type primitiveWriter[T float64 | int64 | bool] struct {
	vec   mapping.Vector
	data  []T
	valid validity
}

func (w *primitiveWriter[T]) accepts(v any) bool {
	_, ok := v.(T)
	return ok || v == nil
}
func (w *primitiveWriter[T]) count(any) {}
func (w *primitiveWriter[T]) begin(rows int) {
	w.data = unsafe.Slice((*T)(mapping.VectorGetData(w.vec)), rows)
	w.valid = writableValidity(w.vec)
}
func (w *primitiveWriter[T]) write(row int, v any) {
	x, ok := v.(T)
	if f, isDouble := any(x).(float64); !ok || isDouble && (math.IsNaN(f) || math.IsInf(f, 0)) {
		w.null(row) // no plumb function returns NaN or ±Inf as a number
		return
	}
	w.data[row] = x
	w.valid.set(uint64(row), true)
}
func (w *primitiveWriter[T]) null(row int) { w.valid.set(uint64(row), false) }

type textWriter struct {
	vec   mapping.Vector
	valid validity
}

func (w *textWriter) accepts(v any) bool {
	_, ok := v.(string)
	return ok || v == nil
}
func (w *textWriter) count(any)      {}
func (w *textWriter) begin(rows int) { w.valid = writableValidity(w.vec) }
func (w *textWriter) write(row int, v any) {
	s, ok := v.(string)
	if !ok {
		w.null(row)
		return
	}
	mapping.VectorAssignStringElement(w.vec, mapping.IdxT(row), s)
	w.valid.set(uint64(row), true)
}
func (w *textWriter) null(row int) { w.valid.set(uint64(row), false) }

// listRows is what the list writers share: the rows' entries and validity,
// and the child vector, reserved once for the whole chunk.
type listRows struct {
	vec       mapping.Vector
	total, at uint64
	entries   []listEntry
	valid     validity
}

// reserve makes room for total elements after those already in the child
// vector and returns the child vector.
func (w *listRows) reserve(rows int) mapping.Vector {
	w.at = uint64(mapping.ListVectorGetSize(w.vec))
	size := w.at + w.total
	mapping.ListVectorReserve(w.vec, mapping.IdxT(size))
	mapping.ListVectorSetSize(w.vec, mapping.IdxT(size))
	w.valid = writableValidity(w.vec)
	w.entries = unsafe.Slice((*listEntry)(mapping.VectorGetData(w.vec)), rows)
	return mapping.ListVectorGetChild(w.vec)
}

// take gives row the next n elements and returns the first one's index.
func (w *listRows) take(row, n int) uint64 {
	first := w.at
	w.entries[row] = listEntry{offset: first, length: uint64(n)}
	w.valid.set(uint64(row), true)
	w.at += uint64(n)
	return first
}

func (w *listRows) null(row int) {
	w.entries[row] = listEntry{offset: w.at}
	w.valid.set(uint64(row), false)
}

// floatsWriter writes a LIST(DOUBLE) given as Floats.
type floatsWriter struct {
	listRows
	data    []float64
	element validity
}

func (w *floatsWriter) accepts(v any) bool {
	_, ok := v.(Floats)
	return ok || v == nil
}
func (w *floatsWriter) count(v any) {
	if l, ok := v.(Floats); ok {
		w.total += uint64(len(l))
	}
}
func (w *floatsWriter) begin(rows int) {
	child := w.reserve(rows)
	if size := w.at + w.total; size > 0 {
		w.data = unsafe.Slice((*float64)(mapping.VectorGetData(child)), size)
	}
	w.element = writableValidity(child)
}
func (w *floatsWriter) write(row int, v any) {
	l, ok := v.(Floats)
	if !ok {
		w.null(row)
		return
	}
	first := w.take(row, len(l))
	copy(w.data[first:], l)
	for j, x := range l {
		w.element.set(first+uint64(j), !math.IsNaN(x) && !math.IsInf(x, 0))
	}
}

// textListWriter writes a LIST(VARCHAR) given as a []any of strings (the
// violations of a verdict).
type textListWriter struct {
	listRows
	child   mapping.Vector
	element validity
}

func (w *textListWriter) accepts(v any) bool {
	if v == nil {
		return true
	}
	l, ok := v.([]any)
	if !ok {
		return false
	}
	for _, e := range l {
		if _, ok := e.(string); !ok {
			return false
		}
	}
	return true
}
func (w *textListWriter) count(v any) {
	if l, ok := v.([]any); ok {
		w.total += uint64(len(l))
	}
}
func (w *textListWriter) begin(rows int) {
	w.child = w.reserve(rows)
	w.element = writableValidity(w.child)
}
func (w *textListWriter) write(row int, v any) {
	l, ok := v.([]any)
	if !ok {
		w.null(row)
		return
	}
	first := w.take(row, len(l))
	for j, e := range l {
		mapping.VectorAssignStringElement(w.child, mapping.IdxT(first+uint64(j)), e.(string))
		w.element.set(first+uint64(j), true)
	}
}

// structWriter writes a STRUCT given as a record (by position) or as a
// map[string]any (by name), member by member; a NULL struct has NULL
// members too, as duckdb-go writes it.
type structWriter struct {
	vec    mapping.Vector
	names  []string
	fields []columnWriter
	valid  validity
	// layout is the last record's names found equal to names, so that a
	// chunk of records of one layout compares the names once.
	layout *string
}

// fits reports whether a record's fields are the vector's, in order.
func (w *structWriter) fits(r Record) bool {
	if len(r.Names) != len(w.names) || len(r.Values) != len(w.names) {
		return false
	}
	if len(r.Names) == 0 || &r.Names[0] == w.layout {
		return true
	}
	for i, n := range r.Names {
		if n != w.names[i] {
			return false
		}
	}
	w.layout = &r.Names[0]
	return true
}

func (w *structWriter) accepts(v any) bool {
	switch x := v.(type) {
	case nil:
		return true
	case Record:
		if !w.fits(x) {
			return false
		}
		for i, f := range w.fields {
			if !f.accepts(x.Values[i]) {
				return false
			}
		}
		return true
	case map[string]any:
		for i, name := range w.names {
			m, ok := x[name]
			if !ok || !w.fields[i].accepts(m) {
				return false
			}
		}
		return true
	}
	return false
}

// member returns field i of v, a record or a map accepted before.
func (w *structWriter) member(v any, i int) any {
	if r, ok := v.(Record); ok {
		return r.Values[i]
	}
	return v.(map[string]any)[w.names[i]]
}

func (w *structWriter) count(v any) {
	if v == nil {
		return
	}
	for i, f := range w.fields {
		f.count(w.member(v, i))
	}
}
func (w *structWriter) begin(rows int) {
	w.valid = writableValidity(w.vec)
	for _, f := range w.fields {
		f.begin(rows)
	}
}
func (w *structWriter) write(row int, v any) {
	if v == nil {
		w.null(row)
		return
	}
	for i, f := range w.fields {
		f.write(row, w.member(v, i))
	}
	w.valid.set(uint64(row), true)
}
func (w *structWriter) null(row int) {
	for _, f := range w.fields {
		f.null(row)
	}
	w.valid.set(uint64(row), false)
}
