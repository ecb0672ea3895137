package udf

import (
	"database/sql/driver"
	_ "embed"
	"encoding/binary"
	"fmt"
	"hash/fnv"
	"math/bits"
	"strings"

	"github.com/duckdb/duckdb-go/v2"
)

// The maths: none beyond diagnose's: the shard hash (shardOf) and rankedSQL (diagnose.go).

//go:embed sql/combine_diagnoses.sql
var combineDiagnosesMacros string

// Shards cut the groups of a source into n parts that separate processes or
// machines can diagnose on their own: diagnose(..., shard := k, shards := n)
// judges the groups of shard k and returns their rows with raw p-values, and
// combine_diagnoses ranks the union of the n parts.
//
// A group's shard must be the same on every machine and in every version of
// plumb, so it is defined here rather than by DuckDB's hash(), whose values
// DuckDB does not promise to keep. The group key's columns are written as
// text (CAST(... AS VARCHAR); integers, text, booleans, dates and timestamps
// are written the same by every DuckDB version); the bytes, for each column
// in the order of by, are 0x00 for NULL, or 0x01, the text's length in
// bytes as 8 bytes little-endian, and the text; h is their 64-bit FNV-1a
// hash (Fowler, Noll and Vo; offset basis 0xcbf29ce484222325, prime
// 0x100000001b3), passed through the 64-bit finalizer of Appleby's
// MurmurHash3 (fmix64), because FNV-1a alone leaves the last bytes' effect
// in a few middle bits, and keys that differ in their last digits would
// share a shard; the shard is ⌊m·n / 2^64⌋ for the mixed value m.

// shardOf returns the shard of a group key (one entry per group column,
// nil for NULL) among n shards.
func shardOf(key []*string, n uint64) uint64 {
	h := fnv.New64a()
	var length [8]byte
	for _, k := range key {
		if k == nil {
			h.Write([]byte{0})
			continue
		}
		h.Write([]byte{1})
		binary.LittleEndian.PutUint64(length[:], uint64(len(*k)))
		h.Write(length[:])
		h.Write([]byte(*k))
	}
	hi, _ := bits.Mul64(fmix64(h.Sum64()), n)
	return hi
}

// fmix64 is MurmurHash3's finalizer: every input bit changes about half of
// the output bits.
func fmix64(h uint64) uint64 {
	h ^= h >> 33
	h *= 0xff51afd7ed558ccd
	h ^= h >> 33
	h *= 0xc4ceb9fe1a85ec53
	h ^= h >> 33
	return h
}

// combineDiagnosesFunctions provides
//
//	plumb_shard(key VARCHAR[], shards BIGINT) -> BIGINT, a group key's shard;
//	combine_diagnoses(source), the table macro over plumb_combine_sql.
func combineDiagnosesFunctions(t *types) []*function {
	return []*function{{
		name:     "plumb_shard",
		params:   []duckdb.TypeInfo{t.list(t.varchar()), t.bigint()},
		result:   t.bigint(),
		nullable: true, // a NULL key column is part of the key
		eval: func(args []driver.Value) (any, error) {
			list, ok := args[0].([]any)
			if !ok {
				return nil, fmt.Errorf("plumb_shard: the key must be a list of text, got %T", args[0])
			}
			n, err := integer(args[1], "shards")
			if err != nil {
				return nil, err
			}
			if n < 1 {
				return nil, fmt.Errorf("shards must be at least 1, got %d", n)
			}
			key := make([]*string, len(list))
			for i, e := range list {
				switch s := e.(type) {
				case nil:
				case string:
					key[i] = &s
				default:
					return nil, fmt.Errorf("plumb_shard: the key must be a list of text, got an element of type %T", e)
				}
			}
			return int64(shardOf(key, uint64(n))), nil
		},
	}, {
		name:   "plumb_combine_sql",
		params: []duckdb.TypeInfo{t.varchar()},
		result: t.varchar(),
		eval: func(args []driver.Value) (any, error) {
			source, err := text(args[0], "source")
			if err != nil {
				return nil, err
			}
			from, err := sourceSQL(source)
			if err != nil {
				return nil, err
			}
			return combineSQL(from), nil
		},
	}}
}

// shardArgs reads diagnose's shard and shards arguments: both NULL (no
// sharding, returned as 0, 0), or 0 <= shard < shards.
func shardArgs(shard, shards driver.Value) (int, int, error) {
	if shard == nil && shards == nil {
		return 0, 0, nil
	}
	if shard == nil || shards == nil {
		return 0, 0, fmt.Errorf("give both shard and shards (shard := k, shards := n with 0 <= k < n), or neither")
	}
	k, err := integer(shard, "shard")
	if err != nil {
		return 0, 0, err
	}
	n, err := integer(shards, "shards")
	if err != nil {
		return 0, 0, err
	}
	if n < 1 {
		return 0, 0, fmt.Errorf("shards must be at least 1, got %d", n)
	}
	if k < 0 || k >= n {
		return 0, 0, fmt.Errorf("shard must be between 0 and %d (shards := %d), got %d", n-1, n, k)
	}
	return k, n, nil
}

// shardFilter is the HAVING clause that keeps, of the group keys of a
// query grouped by q.by, those of shard q.shard; empty without shards.
func (q seriesQuery) shardFilter() string {
	if q.shards == 0 {
		return ""
	}
	texts := make([]string, len(q.by))
	for i, b := range q.by {
		texts[i] = fmt.Sprintf("CAST(%s AS VARCHAR)", quoteIdent(b))
	}
	return fmt.Sprintf("\n    HAVING plumb_shard([%s], %d) = %d", strings.Join(texts, ", "), q.shards, q.shard)
}

// diagnoseOwnColumns are the columns of diagnose's rows, sharded or not,
// that are not group columns.
func diagnoseOwnColumns() []string {
	cols := append([]string{"n", "first_at", "last_at"}, diagnoseFields...)
	for _, test := range diagnoseTests {
		cols = append(cols, test+"_q_value")
	}
	return append(cols, "rank", "shard", "shards")
}

// combineSQL is the query of combine_diagnoses(source): the union of the
// parts diagnose(..., shard := k, shards := n) returned, checked (one n for
// every row, every shard in [0, n), no group twice), with every column but
// shard and shards carried through and q-values and rank computed across
// all groups exactly as diagnose computes them (rankedSQL). The group
// columns are the columns diagnose does not make itself.
func combineSQL(from string) string {
	own := make([]string, 0, len(diagnoseFields)+16)
	for _, c := range diagnoseOwnColumns() {
		own = append(own, quoteLiteral(c))
	}
	drop := []string{quoteLiteral("rank"), quoteLiteral("shard"), quoteLiteral("shards"), quoteLiteral("plumb_ok")}
	for _, test := range diagnoseTests {
		drop = append(drop, quoteLiteral(test+"_q_value"))
	}
	groups := fmt.Sprintf("COLUMNS(lambda c: c NOT IN (%s))", strings.Join(own, ", "))
	// The empty SELECT gives a source without shard and shards those
	// columns, NULL, so that it fails with the check's message.
	return fmt.Sprintf(`WITH plumb_parts AS NOT MATERIALIZED (
    FROM %[1]s
    UNION ALL BY NAME
    SELECT NULL::BIGINT AS shard, NULL::BIGINT AS shards WHERE false
), plumb_check AS (
    SELECT count(*) AS plumb_rows,
           count(*) FILTER (WHERE shard IS NULL OR shards IS NULL) AS plumb_unmarked,
           min(shards) AS plumb_min_shards, max(shards) AS plumb_max_shards,
           min(shard) AS plumb_min_shard, max(shard) AS plumb_max_shard,
           (SELECT count(*) FROM (SELECT DISTINCT %[2]s FROM plumb_parts)) AS plumb_groups
    FROM plumb_parts
), plumb_verified AS (
    SELECT CASE
        WHEN plumb_unmarked > 0 THEN
            error('combine_diagnoses: ' || plumb_unmarked || ' rows have no shard or shards; combine the parts that diagnose(..., shard := k, shards := n) returns')
        WHEN plumb_min_shards <> plumb_max_shards THEN
            error('combine_diagnoses: the parts come from different numbers of shards (' || plumb_min_shards || ' and ' || plumb_max_shards || ')')
        WHEN plumb_min_shard < 0 OR plumb_max_shard >= plumb_max_shards THEN
            error('combine_diagnoses: a shard number lies outside 0 to ' || (plumb_max_shards - 1))
        WHEN plumb_groups < plumb_rows THEN
            error('combine_diagnoses: ' || (plumb_rows - plumb_groups) || ' groups appear more than once; is a part there twice?')
        ELSE true
    END AS plumb_ok
    FROM plumb_check
), plumb_judged AS (
    SELECT COLUMNS(lambda c: c NOT IN (%[3]s))
    FROM plumb_parts, plumb_verified
    WHERE plumb_ok
)`, from, groups, strings.Join(drop, ", ")) + rankedSQL(groups)
}
