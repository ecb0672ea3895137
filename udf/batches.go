package udf

import (
	"database/sql/driver"
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"

	"github.com/duckdb/duckdb-go/v2"
)

// Every table function hands DuckDB the groups of its source a batch at a
// time, so that it completes under DuckDB's memory_limit whatever the
// number of groups. What DuckDB 1.5.6 does (DEVELOPERS.md, "Bounded
// memory", has the measurements):
//
//   - list() cannot spill to disk: a GROUP BY that gathers (at, value)
//     pairs into lists fails with an out-of-memory error once the lists
//     outgrow memory_limit.
//   - Two GROUP BYs in one query, as UNION ALL branches or MATERIALIZED
//     CTEs, keep their lists until the query ends, even on one thread:
//     splitting the groups inside one plain query saves nothing.
//   - A recursive CTE resets the operators of its recursive part at every
//     iteration, and that frees their memory. So the batches are the
//     iterations of a recursive CTE: iteration b reads the source, keeps
//     the rows of the groups of batch b, gathers them, runs the function's
//     per-group work and appends one row per group. What it appends is
//     DuckDB's ordinary buffered data, which spills.
//
// A first pass counts the rows of every group key (plumb_keys; with shards,
// only the keys of the shard are kept); the keys, in order, are then cut
// into runs of about batchRows rows each (plumb_plan). A batch keeps its
// rows by joining the source with its keys on equality, so DuckDB pushes the
// range of the keys into the scan: on a source stored in group order (a
// Parquet file or table written group by group) each batch reads only its
// own row groups, and on any source it hashes and probes only its own rows.
// Keys with a NULL column need IS NOT DISTINCT FROM, which DuckDB does not
// push down; they take a second join, which DuckDB skips without reading
// the source when the batch has no such key.

// A batch may take batchMemoryShare of what is left of memory_limit after
// batchReserve, which DuckDB needs whatever the batch (reading the source on
// every thread, the group keys, the results so far), and after the lists
// DuckDB holds while it works on a chunk of up to 2,048 groups on each of
// its threads (chunkBytes per source row of those groups). What a batch
// needs per source row is the table function's bytesPerRow:
// gatherBytesPerRow to gather a group's (at, value) pairs, and for the
// functions that return a row per source row rowBytes, which adds their
// output.
//
// gatherBytesPerRow is about twice what gathering takes on a source in
// group order: on a source in time order every thread meets every group,
// and merging the threads' partial lists copies them. The chunks' lists
// (chunkBytes) are counted because a small memory_limit is exhausted by
// them alone.
const (
	batchMemoryShare  = 0.6
	batchReserve      = 40 << 20
	gatherBytesPerRow = 64
	chunkGroups       = 2048
)

// batchRowsCap bounds a batch even when memory_limit would allow more:
// gathering more than a few GB at once only costs the kernel time to hand
// out fresh pages, and takes memory for no gain in speed.
const batchRowsCap = 1 << 26

// rowBytes is what a batch of a function that returns a row per source row
// needs per row, when its per-group output holds lists lists of 8-byte
// values (at, the value, and its results): the gathering, plus its output
// held twice while the next batch runs (the recursive CTE keeps the last
// batch's rows beside the batch's own), plus a third for the lists'
// overhead: a function returning many lists needs more than a fixed
// allowance per row.
func rowBytes(lists int) int { return gatherBytesPerRow + 24*lists }

// chunkBytes is, per source row, what DuckDB holds while one chunk of
// groups goes from the gathering to the Go function: the (at, value) pairs
// (16 bytes), and without points the sorted pairs and the at, value and
// DOUBLE lists made from them (16 + 3 × 8 more).
func (q seriesQuery) chunkBytes() int {
	if q.points {
		return 24
	}
	return 48
}

// batchBudget is what decides how many source rows one batch may hold.
type batchBudget struct {
	limit       float64 // memory_limit, bytes
	threads     int     // DuckDB's threads
	groups      int64   // groups in the source
	rows        int64   // rows in the source
	perRow      int     // bytes a batch needs per source row
	chunkPerRow int     // bytes per source row of a chunk of groups being worked on
}

// batchRows is the most source rows one batch may hold: at least one, at
// most batchRowsCap. When the reserve and the chunks leave less than a
// tenth of the limit, a tenth is taken as the rest.
func (b batchBudget) batchRows() int64 {
	var chunks float64
	if b.groups > 0 {
		chunks = float64(max(b.threads, 1)) * math.Min(chunkGroups, float64(b.groups)) *
			float64(b.rows) / float64(b.groups) * float64(b.chunkPerRow)
	}
	rest := math.Max(b.limit-batchReserve-chunks, b.limit/10)
	rows := math.Floor(rest * batchMemoryShare / float64(max(b.perRow, 1)))
	return int64(math.Max(1, math.Min(rows, batchRowsCap)))
}

// batchFunctions provides
//
//	plumb_batch_rows(memory_limit VARCHAR, threads BIGINT, groups BIGINT, rows BIGINT,
//	                 bytes_per_row BIGINT, chunk_bytes_per_row BIGINT) -> BIGINT
//
// the most source rows one batch may hold (batchBudget), with memory_limit
// as current_setting('memory_limit') shows it ("3.7 GiB").
func batchFunctions(t *types) []*function {
	return []*function{{
		name:   "plumb_batch_rows",
		params: []duckdb.TypeInfo{t.varchar(), t.bigint(), t.bigint(), t.bigint(), t.bigint(), t.bigint()},
		result: t.bigint(),
		eval: func(args []driver.Value) (any, error) {
			s, err := text(args[0], "memory_limit")
			if err != nil {
				return nil, err
			}
			limit, err := parseBytes(s)
			if err != nil {
				return nil, err
			}
			var n [5]int
			for i, name := range []string{"threads", "groups", "rows", "bytes_per_row", "chunk_bytes_per_row"} {
				if n[i], err = integer(args[i+1], name); err != nil {
					return nil, err
				}
			}
			b := batchBudget{limit: limit, threads: n[0], groups: int64(n[1]), rows: int64(n[2]), perRow: n[3], chunkPerRow: n[4]}
			return b.batchRows(), nil
		},
	}}
}

var byteCount = regexp.MustCompile(`^\s*([0-9]+(?:\.[0-9]*)?)\s*([A-Za-z]*)\s*$`)

// parseBytes reads a size as DuckDB writes memory_limit: a number and a
// unit, binary (KiB, MiB, GiB, TiB, PiB, EiB) or decimal (KB, MB, ...),
// or bytes.
func parseBytes(s string) (float64, error) {
	m := byteCount.FindStringSubmatch(s)
	if m == nil {
		return 0, fmt.Errorf("cannot read the memory limit %q", s)
	}
	x, err := strconv.ParseFloat(m[1], 64)
	if err != nil {
		return 0, fmt.Errorf("cannot read the memory limit %q: %w", s, err)
	}
	unit := strings.ToLower(m[2])
	powers := map[string]int{"": 0, "b": 0, "byte": 0, "bytes": 0,
		"k": 1, "kb": 1, "kib": 1, "m": 2, "mb": 2, "mib": 2, "g": 3, "gb": 3, "gib": 3,
		"t": 4, "tb": 4, "tib": 4, "p": 5, "pb": 5, "pib": 5, "e": 6, "eb": 6, "eib": 6}
	p, ok := powers[unit]
	if !ok {
		return 0, fmt.Errorf("cannot read the memory limit %q: unknown unit %q", s, m[2])
	}
	base := 1000.0
	if strings.HasSuffix(unit, "ib") {
		base = 1024
	}
	return x * math.Pow(base, float64(p)), nil
}

// planCTEs returns the first tables of batchedCTEs: plumb_input (the
// source's needed columns), plumb_keys (the rows of every group key; with
// shards only the keys of the shard) and plumb_plan (each key's batch,
// numbered from 0: the keys in order, cut into runs of about
// plumb_batch_rows rows). SET VARIABLE plumb_batch_rows = n chooses the
// rows per batch instead of memory_limit.
func (q seriesQuery) planCTEs(bytesPerRow int) string {
	by := q.byList("")
	null := make([]string, len(q.by))
	for i, b := range q.by {
		null[i] = quoteIdent(b) + " IS NULL"
	}
	return renderStage("plan.sql", struct {
		Input, By, NullKey, ShardFilter string
		BytesPerRow, ChunkBytes         int
	}{q.inputCTE(), by, strings.Join(null, " OR "), q.shardFilter(), bytesPerRow, q.chunkBytes()})
}

// batchedCTEs returns a WITH RECURSIVE clause whose last table, plumb_done,
// holds the rows perGroup makes of the groups of the source, gathered a
// batch at a time (planCTEs). perGroup is a SELECT over plumb_series
// (seriesCTEs) that returns at most one row per group; bytesPerRow is what
// a batch needs per source row (gatherBytesPerRow or rowBytes). The caller
// appends its own CTEs and final SELECT over plumb_done.
//
// plumb_batches holds, for each batch, one row per group with perGroup's
// row packed in plumb_row, and one marker row (plumb_marker) that carries
// the batch number on. Its first row is a marker whose plumb_row is
// perGroup applied to a group of NULLs, so that every column has perGroup's
// own type from the start. Inside an iteration plumb_out is MATERIALIZED:
// DuckDB then runs perGroup's Go function on all its threads, where after a
// GROUP BY it would often use one.
func (q seriesQuery) batchedCTEs(perGroup string, bytesPerRow int) string {
	equal := make([]string, len(q.by))
	same := make([]string, len(q.by))
	for i, b := range q.by {
		c := quoteIdent(b)
		equal[i] = fmt.Sprintf("plumb_input.%[1]s = plumb_k.%[1]s", c)
		same[i] = fmt.Sprintf("plumb_input.%[1]s IS NOT DISTINCT FROM plumb_k.%[1]s", c)
	}
	return renderStage("batches.sql", struct {
		Plan, NoSeries, Series, PerGroup, KeysEqual, KeysSame string
	}{
		Plan:      q.planCTEs(bytesPerRow),
		NoSeries:  q.seriesCTEs("(SELECT *, NULL::BIGINT AS plumb_counted FROM plumb_input LIMIT 0)", "plumb_no_series"),
		Series:    q.seriesCTEs("plumb_batch_input", "plumb_series"),
		PerGroup:  perGroup,
		KeysEqual: strings.Join(equal, " AND "),
		KeysSame:  strings.Join(same, " AND "),
	})
}
