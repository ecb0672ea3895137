// Package vectors is plumb's one reach past duckdb-go's public API: it
// reads the list arguments of a chunk straight from DuckDB's vectors and
// writes a chunk's results straight into the result vector, without
// duckdb-go's per-element boxing.
//
// Two calls make the API: ReadLists (one reader per list column of a
// chunk) and Write (a chunk's results). Where duckdb-go's internals are not
// as this package expects, Available is false, and Write reports false;
// udf then reads and writes through duckdb-go's own iterator and setter,
// its single fallback path. TestReadEqualsIterator and TestWriteEqualsSetter
// check the behaviour: every type plumb reads and writes, NULLs and empty
// lists included, gives the same rows on both paths. reflect and the unexported fields are used
// here only.
package vectors

import (
	"database/sql/driver"
	"errors"
	"math"
	"reflect"
	"unsafe"

	"github.com/duckdb/duckdb-go/v2"
	"github.com/duckdb/duckdb-go/v2/mapping"
)

// Reading list arguments straight from DuckDB's vectors.
//
// duckdb-go's chunk API returns a LIST value as []any, one interface box per
// element, and sets a result only at the row its iterator stands on, which
// re-reads (and re-boxes) every argument of that row. At 10,000 groups of
// 1,000 values, the boxes and their garbage collection took more CPU than
// the statistics (CPU profile in DEVELOPERS.md). So plumb reads LIST columns
// of numbers and times from the vectors themselves, through duckdb-go's
// public mapping package (DuckDB's C API), and places the iterator on a row
// itself to write that row's result with duckdb-go's own setter.
//
// Both need one unexported field of duckdb-go: the C handle inside a
// DataChunk and the row index inside a ChunkIteratorState. Their offsets are
// found once by reflection and checked by name and type. If a later
// duckdb-go renames or retypes either, chunkAccess.ok is false and every
// function runs on the boxed iterator instead, which gives the same values
// (udf tests run both paths). Results are written the same way through a
// third field, the result vector's C handle (write.go).
var chunkAccess = findChunkAccess()

// Available reports whether list arguments can be read directly
// (ReadLists) and the iterator placed on a row (MoveTo).
func Available() bool { return chunkAccess.ok }

// ResultsAvailable reports whether results can be written directly
// (Write).
func ResultsAvailable() bool { return chunkAccess.ok && chunkAccess.resultOK }

// ErrNullTime is the error for a NULL in a list of times: a time point
// without a time cannot be placed.
var ErrNullTime = errors.New("the at column holds a NULL; filter those rows out or fill them in")

// Points is a list of (time, value) pairs read directly: At in
// microseconds since 1970 for dates and timestamps, the integer itself
// otherwise; Values with NULL as NaN.
type Points struct {
	At     []int64
	Values []float64
}

// Buffers are one worker's reusable slices for a list column, for a
// function whose result never holds on to its arguments.
type Buffers struct {
	floats []float64
	times  []int64
}

// ReadLists returns a reader for every column of a chunk of n rows: nil
// for a column that is not a list of a type read directly (the caller reads
// that column through duckdb-go's getter). It returns nil when direct
// reading is not available.
func ReadLists(c *duckdb.DataChunk, n int) []*List {
	if !chunkAccess.ok {
		return nil
	}
	lists := make([]*List, c.ColumnCount())
	for col := range lists {
		lists[col] = newList(c, col, n)
	}
	return lists
}

type chunkLayout struct {
	ok bool
	// chunkHandle is the offset of DataChunk.chunk (a mapping.DataChunk).
	chunkHandle uintptr
	// rowIndex is the offset of ChunkIteratorState.r.rowIdx (a mapping.IdxT).
	rowIndex uintptr
	// resultOK says the result vector's handle can be read: Vector.v (a
	// pointer) at resultPointer, and in what it points to, vector.vec (a
	// mapping.Vector) at resultHandle.
	resultOK                    bool
	resultPointer, resultHandle uintptr
}

func findChunkAccess() chunkLayout {
	chunk, ok := reflect.TypeOf(duckdb.DataChunk{}).FieldByName("chunk")
	if !ok || chunk.Type != reflect.TypeOf(mapping.DataChunk{}) {
		return chunkLayout{}
	}
	row, ok := reflect.TypeOf(duckdb.ChunkIteratorState{}).FieldByName("r")
	if !ok || row.Type != reflect.TypeOf(duckdb.Row{}) {
		return chunkLayout{}
	}
	index, ok := row.Type.FieldByName("rowIdx")
	if !ok || index.Type != reflect.TypeOf(mapping.IdxT(0)) {
		return chunkLayout{}
	}
	layout := chunkLayout{ok: true, chunkHandle: chunk.Offset, rowIndex: row.Offset + index.Offset}
	if v, ok := reflect.TypeOf(duckdb.Vector{}).FieldByName("v"); ok && v.Type.Kind() == reflect.Pointer {
		if h, ok := v.Type.Elem().FieldByName("vec"); ok && h.Type == reflect.TypeOf(mapping.Vector{}) {
			layout.resultOK, layout.resultPointer, layout.resultHandle = true, v.Offset, h.Offset
		}
	}
	return layout
}

// resultVector returns the C handle of the chunk's result vector.
func resultVector(state *duckdb.ChunkIteratorState) (mapping.Vector, bool) {
	if !chunkAccess.resultOK {
		return mapping.Vector{}, false
	}
	rv := state.GetResultVector()
	p := *(*unsafe.Pointer)(unsafe.Add(unsafe.Pointer(&rv), chunkAccess.resultPointer))
	if p == nil {
		return mapping.Vector{}, false
	}
	return *(*mapping.Vector)(unsafe.Add(p, chunkAccess.resultHandle)), true
}

// rawChunk returns the C handle of a DataChunk.
func rawChunk(c *duckdb.DataChunk) mapping.DataChunk {
	return *(*mapping.DataChunk)(unsafe.Add(unsafe.Pointer(c), chunkAccess.chunkHandle))
}

// MoveTo places the iterator on row, so that duckdb-go's SetResult writes
// that row (the way back for a chunk whose results Write did not take).
func MoveTo(state *duckdb.ChunkIteratorState, row int) {
	*(*mapping.IdxT)(unsafe.Add(unsafe.Pointer(state), chunkAccess.rowIndex)) = mapping.IdxT(row)
}

// listEntry is DuckDB's duckdb_list_entry: where a row's elements sit in
// the list's child vector.
type listEntry struct{ offset, length uint64 }

// List reads one LIST column of a chunk without boxing: DOUBLE elements
// become a []float64 (NULL elements NaN); DATE, TIMESTAMP and integer
// elements a []int64 (microseconds since 1970 for dates and timestamps);
// STRUCT elements of a time and a DOUBLE (the points diagnose aggregates)
// become Points.
type List struct {
	entries []listEntry
	rows    unsafe.Pointer // validity of the lists themselves; nil: all valid
	// elements reads a plain list's child vector, or a list of pairs' time
	// member; values reads the pairs' value member.
	elements, values *childVector
}

// childVector is the child vector of a list, or a member of it.
type childVector struct {
	data      unsafe.Pointer
	valid     unsafe.Pointer // nil: all valid
	kind      mapping.Type
	microsPer int64 // for dates and timestamps: microseconds per stored unit
}

// newList returns a reader for column col of a chunk of n rows, or nil
// when the column is not a list of a type List reads.
//
// DuckDB flattens the arguments of a C API scalar function before calling
// it, so row i's list entry is entries[i] even for a constant argument
// (a test passes a literal list over several thousand rows).
func newList(c *duckdb.DataChunk, col, n int) *List {
	vec := mapping.DataChunkGetVector(rawChunk(c), mapping.IdxT(col))
	lt := mapping.VectorGetColumnType(vec)
	defer mapping.DestroyLogicalType(&lt)
	if mapping.GetTypeId(lt) != mapping.TypeList {
		return nil
	}
	ct := mapping.ListTypeChildType(lt)
	defer mapping.DestroyLogicalType(&ct)
	child := mapping.ListVectorGetChild(vec)
	r := &List{rows: mapping.VectorGetValidity(vec)}
	switch mapping.GetTypeId(ct) {
	case mapping.TypeStruct:
		if mapping.StructTypeChildCount(ct) != 2 {
			return nil
		}
		t0, t1 := mapping.StructTypeChildType(ct, 0), mapping.StructTypeChildType(ct, 1)
		defer mapping.DestroyLogicalType(&t0)
		defer mapping.DestroyLogicalType(&t1)
		r.elements = newChildVector(mapping.StructVectorGetChild(child, 0), mapping.GetTypeId(t0))
		r.values = newChildVector(mapping.StructVectorGetChild(child, 1), mapping.GetTypeId(t1))
		if r.elements == nil || r.elements.kind == mapping.TypeDouble || r.values == nil || r.values.kind != mapping.TypeDouble {
			return nil
		}
	default:
		if r.elements = newChildVector(child, mapping.GetTypeId(ct)); r.elements == nil {
			return nil
		}
	}
	if n > 0 {
		r.entries = unsafe.Slice((*listEntry)(mapping.VectorGetData(vec)), n)
	}
	return r
}

func newChildVector(vec mapping.Vector, kind mapping.Type) *childVector {
	c := &childVector{kind: kind}
	switch kind {
	case mapping.TypeDouble, mapping.TypeBigInt, mapping.TypeInteger, mapping.TypeSmallInt, mapping.TypeTinyInt,
		mapping.TypeUInteger, mapping.TypeUSmallInt, mapping.TypeUTinyInt, mapping.TypeTimestampNS:
	case mapping.TypeDate:
		c.microsPer = 86_400_000_000
	case mapping.TypeTimestamp, mapping.TypeTimestampTZ:
		c.microsPer = 1
	case mapping.TypeTimestampS:
		c.microsPer = 1_000_000
	case mapping.TypeTimestampMS:
		c.microsPer = 1_000
	default:
		return nil
	}
	c.data = mapping.VectorGetData(vec)
	c.valid = mapping.VectorGetValidity(vec)
	return c
}

// valid reports bit i of a DuckDB validity mask (nil: every bit set).
func valid(mask unsafe.Pointer, i uint64) bool {
	if mask == nil {
		return true
	}
	word := *(*uint64)(unsafe.Add(mask, (i/64)*8))
	return word&(1<<(i%64)) != 0
}

// Length is the number of elements of row's list (0 for NULL), read
// without building the list, so a caller can refuse a list before it is
// copied.
func (r *List) Length(row int) uint64 {
	if !valid(r.rows, uint64(row)) {
		return 0
	}
	return r.entries[row].length
}

// Value returns row's list, or nil for a NULL list. It only reads DuckDB's
// memory, so workers may call it concurrently while the chunk is alive.
// With b, the list is written into b's slices (grown as needed) instead of
// new ones.
func (r *List) Value(row int, b *Buffers) (driver.Value, error) {
	if !valid(r.rows, uint64(row)) {
		return nil, nil
	}
	e := r.entries[row]
	var fdst []float64
	var tdst []int64
	if b != nil {
		if uint64(cap(b.floats)) < e.length {
			b.floats = make([]float64, e.length)
		}
		if uint64(cap(b.times)) < e.length {
			b.times = make([]int64, e.length)
		}
		fdst, tdst = b.floats[:e.length], b.times[:e.length]
	}
	if r.values != nil {
		at, err := r.elements.times(e, tdst)
		if err != nil {
			return nil, err
		}
		return Points{At: at, Values: r.values.floats(e, fdst)}, nil
	}
	if r.elements.kind == mapping.TypeDouble {
		return r.elements.floats(e, fdst), nil
	}
	return r.elements.times(e, tdst)
}

// floats reads e's elements of a DOUBLE vector, NULL as NaN, into out (a
// new slice when out is nil).
func (c *childVector) floats(e listEntry, out []float64) []float64 {
	if out == nil {
		out = make([]float64, e.length)
	}
	copy(out, elements[float64](c.data, e))
	if c.valid != nil {
		for i := range out {
			if !valid(c.valid, e.offset+uint64(i)) {
				out[i] = math.NaN()
			}
		}
	}
	return out
}

// times reads e's elements of a time or integer vector as int64 into out
// (a new slice when out is nil).
func (c *childVector) times(e listEntry, out []int64) ([]int64, error) {
	if c.valid != nil {
		for i := uint64(0); i < e.length; i++ {
			if !valid(c.valid, e.offset+i) {
				return nil, ErrNullTime
			}
		}
	}
	if out == nil {
		out = make([]int64, e.length)
	}
	switch c.kind {
	case mapping.TypeDate, mapping.TypeInteger:
		widen(out, elements[int32](c.data, e))
	case mapping.TypeSmallInt:
		widen(out, elements[int16](c.data, e))
	case mapping.TypeTinyInt:
		widen(out, elements[int8](c.data, e))
	case mapping.TypeUInteger:
		widen(out, elements[uint32](c.data, e))
	case mapping.TypeUSmallInt:
		widen(out, elements[uint16](c.data, e))
	case mapping.TypeUTinyInt:
		widen(out, elements[uint8](c.data, e))
	case mapping.TypeTimestampNS:
		for i, v := range elements[int64](c.data, e) {
			// Floor division, as time.Time.UnixMicro rounds.
			out[i] = v / 1000
			if v%1000 < 0 {
				out[i]--
			}
		}
	default:
		copy(out, elements[int64](c.data, e))
	}
	if c.microsPer > 1 {
		for i := range out {
			out[i] *= c.microsPer
		}
	}
	return out, nil
}

// elements views e's elements in a child vector of T values.
func elements[T any](data unsafe.Pointer, e listEntry) []T {
	if e.length == 0 {
		return nil
	}
	var zero T
	return unsafe.Slice((*T)(unsafe.Add(data, uintptr(e.offset)*unsafe.Sizeof(zero))), e.length)
}

func widen[T int8 | int16 | int32 | uint8 | uint16 | uint32](out []int64, in []T) {
	for i, v := range in {
		out[i] = int64(v)
	}
}
