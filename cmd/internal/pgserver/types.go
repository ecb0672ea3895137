package pgserver

import (
	"encoding/binary"
	"encoding/json"
	"fmt"
	"math"
	"math/big"
	"strconv"
	"strings"
	"time"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/cmd/internal/output"
)

// PostgreSQL type OIDs (from the pg_type catalogue; stable across releases).
const (
	oidBool        = 16
	oidBytea       = 17
	oidInt8        = 20
	oidInt2        = 21
	oidInt4        = 23
	oidText        = 25
	oidJSON        = 114
	oidFloat4      = 700
	oidFloat8      = 701
	oidUnknown     = 705
	oidBoolArray   = 1000
	oidInt2Array   = 1005
	oidInt4Array   = 1007
	oidTextArray   = 1009
	oidInt8Array   = 1016
	oidFloat4Array = 1021
	oidFloat8Array = 1022
	oidVarchar     = 1043
	oidDate        = 1082
	oidTime        = 1083
	oidTimestamp   = 1114
	oidTimestampTZ = 1184
	oidInterval    = 1186
	oidNumeric     = 1700
	oidUUID        = 2950
	// oidJSONText is how STRUCTs, MAPs and lists without an array type are
	// described: JSON in a text column.
	oidJSONText = oidText
)

// arrayOf maps an element OID to its one-dimensional array OID.
var arrayOf = func() map[uint32]uint32 {
	m := map[uint32]uint32{}
	for _, t := range pgTypes {
		if t.elem != 0 && t.oid != 1015 && t.oid != 199 { // VARCHAR lists are sent as text[], lists of STRUCTs as json
			m[t.elem] = t.oid
		}
	}
	return m
}()

var elementOf = func() map[uint32]uint32 {
	m := map[uint32]uint32{}
	for e, a := range arrayOf {
		m[a] = e
	}
	return m
}()

// typeOID maps a DuckDB type name to a PostgreSQL type OID. Lists of types
// with a PostgreSQL array type become arrays; other lists, STRUCTs and MAPs
// are sent as JSON in a text column (oidJSONText), which every client reads
// (RPostgreSQL warns on json columns).
func typeOID(name string) uint32 {
	name = strings.ToUpper(strings.TrimSpace(name))
	if strings.HasSuffix(name, "[]") {
		if a, ok := arrayOf[typeOID(strings.TrimSuffix(name, "[]"))]; ok {
			return a
		}
		return oidJSONText
	}
	switch {
	case strings.HasPrefix(name, "DECIMAL"), name == "HUGEINT", name == "UHUGEINT", name == "UBIGINT", name == "BIGNUM", name == "VARINT":
		return oidNumeric
	case strings.HasPrefix(name, "STRUCT"), strings.HasPrefix(name, "MAP"), strings.HasPrefix(name, "UNION"), strings.HasSuffix(name, "]"), name == "JSON":
		return oidJSONText
	case strings.HasPrefix(name, "TIMESTAMP WITH TIME ZONE"), name == "TIMESTAMPTZ":
		return oidTimestampTZ
	case strings.HasPrefix(name, "TIMESTAMP"):
		return oidTimestamp
	}
	switch name {
	case "BOOLEAN":
		return oidBool
	case "TINYINT", "SMALLINT", "UTINYINT":
		return oidInt2
	case "INTEGER", "USMALLINT":
		return oidInt4
	case "BIGINT", "UINTEGER":
		return oidInt8
	case "FLOAT":
		return oidFloat4
	case "DOUBLE":
		return oidFloat8
	case "DATE":
		return oidDate
	case "TIME":
		return oidTime
	case "INTERVAL":
		return oidInterval
	case "BLOB":
		return oidBytea
	case "UUID":
		return oidUUID
	}
	return oidText
}

// typeSize is the fixed size PostgreSQL declares for a type, -1 if variable.
func typeSize(oid uint32) int16 {
	switch oid {
	case oidBool:
		return 1
	case oidInt2:
		return 2
	case oidInt4, oidFloat4, oidDate:
		return 4
	case oidInt8, oidFloat8, oidTimestamp, oidTimestampTZ, oidTime:
		return 8
	case oidInterval, oidUUID:
		return 16
	}
	return -1
}

// encodeText renders a value in PostgreSQL's text format for type oid.
func encodeText(v any, oid uint32) []byte {
	if v == nil {
		return nil
	}
	return []byte(textOf(v, oid))
}

func textOf(v any, oid uint32) string {
	switch x := v.(type) {
	case bool:
		if x {
			return "t"
		}
		return "f"
	case float64:
		return floatText(x, 64)
	case float32:
		return floatText(float64(x), 32)
	case string:
		return x
	case []byte:
		if oid == oidUUID && len(x) == 16 {
			return uuidText(x)
		}
		return `\x` + fmt.Sprintf("%x", x)
	case time.Time:
		switch oid {
		case oidDate:
			return x.Format("2006-01-02")
		case oidTimestampTZ:
			return x.UTC().Format("2006-01-02 15:04:05.999999") + "+00"
		case oidTime:
			return x.Format("15:04:05.999999")
		}
		return x.Format("2006-01-02 15:04:05.999999")
	case duckdb.Interval:
		return intervalText(x)
	case duckdb.Decimal:
		return x.String()
	case *big.Int:
		return x.String()
	case duckdb.UUID:
		return x.String()
	case *duckdb.UUID:
		return x.String()
	case []any:
		if elem, ok := elementOf[oid]; ok {
			return arrayText(x, elem)
		}
		return jsonText(x)
	case map[string]any, output.Struct, duckdb.OrderedMap, duckdb.Map:
		return jsonText(x)
	}
	return fmt.Sprint(v)
}

func floatText(f float64, bits int) string { return output.FormatFloat(f, -1, bits) }

func intervalText(i duckdb.Interval) string {
	var parts []string
	if i.Months != 0 {
		parts = append(parts, fmt.Sprintf("%d mons", i.Months))
	}
	if i.Days != 0 {
		parts = append(parts, fmt.Sprintf("%d days", i.Days))
	}
	if i.Micros != 0 || len(parts) == 0 {
		us := i.Micros
		sign := ""
		if us < 0 {
			sign, us = "-", -us
		}
		parts = append(parts, fmt.Sprintf("%s%02d:%02d:%02d", sign, us/3600e6, us/60e6%60, us/1e6%60))
		if frac := us % 1e6; frac != 0 {
			parts[len(parts)-1] += strings.TrimRight(fmt.Sprintf(".%06d", frac), "0")
		}
	}
	return strings.Join(parts, " ")
}

// arrayText renders a one-dimensional PostgreSQL array literal.
func arrayText(list []any, elem uint32) string {
	var b strings.Builder
	b.WriteByte('{')
	for i, e := range list {
		if i > 0 {
			b.WriteByte(',')
		}
		if e == nil {
			b.WriteString("NULL")
			continue
		}
		s := textOf(e, elem)
		if elem == oidText || s == "" || strings.ContainsAny(s, `{},"\ `) || strings.EqualFold(s, "null") {
			s = `"` + strings.NewReplacer(`\`, `\\`, `"`, `\"`).Replace(s) + `"`
		}
		b.WriteString(s)
	}
	b.WriteByte('}')
	return b.String()
}

// jsonText renders lists, structs and maps as JSON.
func jsonText(v any) string {
	b, err := json.Marshal(output.JSONValue(v))
	if err != nil {
		return fmt.Sprint(v)
	}
	return string(b)
}

// pgEpoch is PostgreSQL's zero for dates and timestamps.
var pgEpoch = time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)

// encodeBinary renders a value in PostgreSQL's binary format for type oid;
// types without a binary form here fall back to their text bytes, which is
// what PostgreSQL sends for text-like types too.
func encodeBinary(v any, oid uint32) []byte {
	if v == nil {
		return nil
	}
	if elem, ok := elementOf[oid]; ok {
		if list, ok := v.([]any); ok {
			return arrayBinary(list, elem)
		}
	}
	switch oid {
	case oidBool:
		if b, _ := v.(bool); b {
			return []byte{1}
		}
		return []byte{0}
	case oidInt2:
		return binary.BigEndian.AppendUint16(nil, uint16(toInt(v)))
	case oidInt4:
		return binary.BigEndian.AppendUint32(nil, uint32(toInt(v)))
	case oidInt8:
		return binary.BigEndian.AppendUint64(nil, uint64(toInt(v)))
	case oidFloat4:
		return binary.BigEndian.AppendUint32(nil, math.Float32bits(float32(toFloat(v))))
	case oidFloat8:
		return binary.BigEndian.AppendUint64(nil, math.Float64bits(toFloat(v)))
	case oidDate:
		t, _ := v.(time.Time)
		days := int32(t.Sub(pgEpoch).Hours() / 24)
		if t.Before(pgEpoch) && t.Sub(pgEpoch)%(24*time.Hour) != 0 {
			days--
		}
		return binary.BigEndian.AppendUint32(nil, uint32(days))
	case oidTimestamp, oidTimestampTZ:
		t, _ := v.(time.Time)
		us := t.UnixMicro() - pgEpoch.UnixMicro()
		return binary.BigEndian.AppendUint64(nil, uint64(us))
	case oidInterval:
		i, _ := v.(duckdb.Interval)
		b := binary.BigEndian.AppendUint64(nil, uint64(i.Micros))
		b = binary.BigEndian.AppendUint32(b, uint32(i.Days))
		return binary.BigEndian.AppendUint32(b, uint32(i.Months))
	case oidUUID:
		switch u := v.(type) {
		case []byte:
			if len(u) == 16 {
				return u
			}
		case duckdb.UUID:
			return u[:]
		case *duckdb.UUID:
			return u[:]
		}
	case oidNumeric:
		return numericBinary(textOf(v, oid))
	case oidBytea:
		if b, ok := v.([]byte); ok {
			return b
		}
	}
	return []byte(textOf(v, oid))
}

func toInt(v any) int64 {
	switch x := v.(type) {
	case int8:
		return int64(x)
	case int16:
		return int64(x)
	case int32:
		return int64(x)
	case int64:
		return x
	case uint8:
		return int64(x)
	case uint16:
		return int64(x)
	case uint32:
		return int64(x)
	case uint64:
		return int64(x)
	case int:
		return int64(x)
	}
	return 0
}

func toFloat(v any) float64 {
	switch x := v.(type) {
	case float64:
		return x
	case float32:
		return float64(x)
	}
	return float64(toInt(v))
}

// arrayBinary is the binary form of a one-dimensional array.
func arrayBinary(list []any, elem uint32) []byte {
	hasNull := uint32(0)
	for _, e := range list {
		if e == nil {
			hasNull = 1
		}
	}
	b := binary.BigEndian.AppendUint32(nil, 1) // dimensions
	b = binary.BigEndian.AppendUint32(b, hasNull)
	b = binary.BigEndian.AppendUint32(b, elem)
	b = binary.BigEndian.AppendUint32(b, uint32(len(list)))
	b = binary.BigEndian.AppendUint32(b, 1) // lower bound
	for _, e := range list {
		if e == nil {
			b = binary.BigEndian.AppendUint32(b, 0xFFFFFFFF)
			continue
		}
		data := encodeBinary(e, elem)
		b = binary.BigEndian.AppendUint32(b, uint32(len(data)))
		b = append(b, data...)
	}
	return b
}

// numericBinary encodes a decimal string as PostgreSQL's binary numeric:
// base-10000 digits with a weight, sign and display scale.
func numericBinary(s string) []byte {
	neg := strings.HasPrefix(s, "-")
	s = strings.TrimPrefix(s, "-")
	intPart, frac, _ := strings.Cut(s, ".")
	scale := len(frac)
	// Pad the integer part to a multiple of 4 on the left, the fraction on the right.
	for len(intPart)%4 != 0 {
		intPart = "0" + intPart
	}
	for len(frac)%4 != 0 {
		frac += "0"
	}
	all := intPart + frac
	var digits []uint16
	for i := 0; i < len(all); i += 4 {
		d, _ := strconv.Atoi(all[i : i+4])
		digits = append(digits, uint16(d))
	}
	weight := len(intPart)/4 - 1
	for len(digits) > 0 && digits[0] == 0 { // leading zero groups
		digits = digits[1:]
		weight--
	}
	for len(digits) > 0 && digits[len(digits)-1] == 0 {
		digits = digits[:len(digits)-1]
	}
	sign := uint16(0)
	if neg && len(digits) > 0 {
		sign = 0x4000
	}
	if len(digits) == 0 {
		weight = 0
	}
	b := binary.BigEndian.AppendUint16(nil, uint16(len(digits)))
	b = binary.BigEndian.AppendUint16(b, uint16(int16(weight)))
	b = binary.BigEndian.AppendUint16(b, sign)
	b = binary.BigEndian.AppendUint16(b, uint16(scale))
	for _, d := range digits {
		b = binary.BigEndian.AppendUint16(b, d)
	}
	return b
}

// uuidText writes 16 bytes in the canonical 8-4-4-4-12 form.
func uuidText(b []byte) string {
	h := fmt.Sprintf("%x", b)
	return h[0:8] + "-" + h[8:12] + "-" + h[12:16] + "-" + h[16:20] + "-" + h[20:]
}
