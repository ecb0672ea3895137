package pgserver

import (
	"encoding/binary"
	"encoding/hex"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"
)

// Parameters of the extended protocol reach DuckDB as typed SQL literals
// in place of their $n tokens: then a parameter is accepted wherever a
// constant is (a table function's arguments included), and its type is the
// one the client declared in Parse where DuckDB infers none. Each literal
// is built here from the bound bytes, so no client text reaches the SQL
// unquoted.

// paramLiteral renders one bound parameter (text or binary format) of type
// oid as a SQL literal; duckType is the type DuckDB inferred for it ("" if
// none).
func paramLiteral(data []byte, format int16, oid uint32, duckType string) (string, error) {
	cast := duckdbTypeName(oid)
	if cast == "" && duckType != "LIST" {
		cast = duckType
	}
	if data == nil {
		if cast == "" {
			return "NULL", nil
		}
		return "NULL::" + cast, nil
	}
	elem, isArray := elementOf[oid]
	if duckType == "LIST" && cast == "" && format == 0 && strings.HasPrefix(strings.TrimSpace(string(data)), "{") {
		isArray = true // an untyped {...} where DuckDB expects a list
	}
	if isArray || strings.HasSuffix(cast, "[]") {
		var items []string
		var err error
		if format == 1 {
			items, err = binaryArrayLiterals(data)
		} else {
			items, err = textArrayLiterals(string(data), elem)
		}
		if err != nil {
			return "", err
		}
		list := "[" + strings.Join(items, ", ") + "]"
		if cast != "" {
			list += "::" + cast
		}
		return list, nil
	}
	if format == 1 {
		return binaryLiteral(data, oid)
	}
	return textLiteral(string(data), oid, cast)
}

// textLiteral quotes a text-format value, checking numbers and booleans so
// that a malformed one fails as PostgreSQL's invalid_text_representation.
func textLiteral(s string, oid uint32, cast string) (string, error) {
	switch oid {
	case oidInt2, oidInt4, oidInt8, 26:
		if _, err := strconv.ParseInt(strings.TrimSpace(s), 10, 64); err != nil {
			return "", fmt.Errorf("invalid input syntax for type integer: %q", s)
		}
	case oidFloat4, oidFloat8, oidNumeric:
		if _, err := strconv.ParseFloat(strings.TrimSpace(s), 64); err != nil {
			return "", fmt.Errorf("invalid input syntax for type %s: %q", map[bool]string{true: "numeric", false: "double precision"}[oid == oidNumeric], s)
		}
		if oid == oidNumeric {
			return sqlQuote(strings.TrimSpace(s)) + "::DOUBLE", nil
		}
	case oidBool:
		switch strings.ToLower(strings.TrimSpace(s)) {
		case "t", "true", "1", "yes", "on", "y":
			return "true", nil
		case "f", "false", "0", "no", "off", "n":
			return "false", nil
		}
		return "", fmt.Errorf("invalid input syntax for type boolean: %q", s)
	case oidBytea:
		if b, ok := strings.CutPrefix(s, `\x`); ok {
			raw, err := hex.DecodeString(b)
			if err != nil {
				return "", fmt.Errorf("invalid input syntax for type bytea")
			}
			return blobLiteral(raw), nil
		}
	}
	if cast == "" {
		return sqlQuote(s), nil
	}
	return sqlQuote(s) + "::" + cast, nil
}

func blobLiteral(b []byte) string {
	var sb strings.Builder
	sb.WriteString("'")
	for _, c := range b {
		fmt.Fprintf(&sb, `\x%02X`, c)
	}
	sb.WriteString("'::BLOB")
	return sb.String()
}

func floatLiteral(f float64, cast string) string {
	switch {
	case math.IsNaN(f):
		return "'nan'::" + cast
	case math.IsInf(f, 1):
		return "'inf'::" + cast
	case math.IsInf(f, -1):
		return "'-inf'::" + cast
	}
	return strconv.FormatFloat(f, 'g', -1, 64) + "::" + cast
}

// binaryLiteral decodes a binary-format value of type oid.
func binaryLiteral(data []byte, oid uint32) (string, error) {
	need := func(n int, what string) error {
		if len(data) != n {
			return fmt.Errorf("binary %s of %d bytes", what, len(data))
		}
		return nil
	}
	switch oid {
	case oidBool:
		if err := need(1, "boolean"); err != nil {
			return "", err
		}
		return strconv.FormatBool(data[0] != 0), nil
	case oidInt2:
		if err := need(2, "int2"); err != nil {
			return "", err
		}
		return strconv.Itoa(int(int16(binary.BigEndian.Uint16(data)))) + "::SMALLINT", nil
	case oidInt4:
		if err := need(4, "int4"); err != nil {
			return "", err
		}
		return strconv.Itoa(int(int32(binary.BigEndian.Uint32(data)))) + "::INTEGER", nil
	case oidInt8:
		if err := need(8, "int8"); err != nil {
			return "", err
		}
		return strconv.FormatInt(int64(binary.BigEndian.Uint64(data)), 10) + "::BIGINT", nil
	case oidFloat4:
		if err := need(4, "float4"); err != nil {
			return "", err
		}
		return floatLiteral(float64(math.Float32frombits(binary.BigEndian.Uint32(data))), "FLOAT"), nil
	case oidFloat8:
		if err := need(8, "float8"); err != nil {
			return "", err
		}
		return floatLiteral(math.Float64frombits(binary.BigEndian.Uint64(data)), "DOUBLE"), nil
	case oidDate:
		if err := need(4, "date"); err != nil {
			return "", err
		}
		d := pgEpoch.AddDate(0, 0, int(int32(binary.BigEndian.Uint32(data))))
		return "DATE '" + d.Format("2006-01-02") + "'", nil
	case oidTimestamp, oidTimestampTZ:
		if err := need(8, "timestamp"); err != nil {
			return "", err
		}
		ts := pgEpoch.Add(time.Duration(int64(binary.BigEndian.Uint64(data))) * time.Microsecond)
		if oid == oidTimestampTZ {
			return "TIMESTAMPTZ '" + ts.Format("2006-01-02 15:04:05.999999") + "+00'", nil
		}
		return "TIMESTAMP '" + ts.Format("2006-01-02 15:04:05.999999") + "'", nil
	case oidUUID:
		if err := need(16, "uuid"); err != nil {
			return "", err
		}
		h := hex.EncodeToString(data)
		return "'" + h[0:8] + "-" + h[8:12] + "-" + h[12:16] + "-" + h[16:20] + "-" + h[20:] + "'::UUID", nil
	case oidBytea:
		return blobLiteral(data), nil
	case oidNumeric:
		s, err := numericText(data)
		if err != nil {
			return "", err
		}
		return sqlQuote(s) + "::DOUBLE", nil
	case oidText, oidVarchar, oidUnknown, 0, oidJSON, 3802, 1042, 19:
		if oid == 3802 && len(data) > 0 && data[0] == 1 { // jsonb's version byte
			data = data[1:]
		}
		return sqlQuote(string(data)), nil
	}
	return "", fmt.Errorf("plumb cannot read a binary parameter of type %d; send it as text", oid)
}

// numericText decodes PostgreSQL's binary numeric (base-10000 digits d_k
// with a weight w: the value is the sum of d_k·10000^(w−k)) into decimal
// text. It is written as 0.DDDD…e(4(w+1)), so its length follows the
// digits the message holds, not the weight or display scale it claims (a
// weight of 32767 would otherwise spell 131,072 digits from 8 bytes).
func numericText(b []byte) (string, error) {
	if len(b) < 8 {
		return "", fmt.Errorf("binary numeric of %d bytes", len(b))
	}
	n := int(binary.BigEndian.Uint16(b))
	weight := int(int16(binary.BigEndian.Uint16(b[2:])))
	sign := binary.BigEndian.Uint16(b[4:])
	if len(b) != 8+2*n {
		return "", fmt.Errorf("binary numeric of %d bytes for %d digits", len(b), n)
	}
	switch sign {
	case 0xC000:
		return "NaN", nil
	case 0xD000:
		return "Infinity", nil
	case 0xF000:
		return "-Infinity", nil
	case 0x0000, 0x4000:
	default:
		return "", fmt.Errorf("binary numeric with an invalid sign %#x", sign)
	}
	if n == 0 {
		return "0", nil
	}
	var sb strings.Builder
	if sign == 0x4000 {
		sb.WriteString("-")
	}
	sb.WriteString("0.")
	for k := 0; k < n; k++ {
		d := binary.BigEndian.Uint16(b[8+2*k:])
		if d > 9999 {
			return "", fmt.Errorf("binary numeric digit %d out of range", d)
		}
		fmt.Fprintf(&sb, "%04d", d)
	}
	fmt.Fprintf(&sb, "e%d", 4*(weight+1))
	return sb.String(), nil
}

// binaryArrayLiterals reads a one-dimensional binary array into element
// literals.
func binaryArrayLiterals(b []byte) ([]string, error) {
	if len(b) < 12 {
		return nil, fmt.Errorf("binary array of %d bytes", len(b))
	}
	dims := int(binary.BigEndian.Uint32(b))
	elem := binary.BigEndian.Uint32(b[8:])
	if dims == 0 {
		return nil, nil
	}
	if dims != 1 || len(b) < 20 {
		return nil, fmt.Errorf("plumb accepts one-dimensional arrays only (got %d dimensions)", dims)
	}
	n := int(int32(binary.BigEndian.Uint32(b[12:])))
	// Every element takes at least its 4-byte length, so the count the
	// header claims is checked against the bytes present before the list
	// is allocated.
	if n < 0 || n > (len(b)-20)/4 {
		return nil, fmt.Errorf("binary array header claims %d elements in %d bytes", n, len(b))
	}
	if n > maxArrayElements {
		return nil, errTooManyElements(n)
	}
	p := 20
	items := make([]string, 0, n)
	for k := 0; k < n; k++ {
		if p+4 > len(b) {
			return nil, fmt.Errorf("binary array cut short")
		}
		size := int(int32(binary.BigEndian.Uint32(b[p:])))
		p += 4
		if size < 0 {
			items = append(items, "NULL")
			continue
		}
		if p+size > len(b) {
			return nil, fmt.Errorf("binary array cut short")
		}
		lit, err := binaryLiteral(b[p:p+size], elem)
		if err != nil {
			return nil, err
		}
		items = append(items, lit)
		p += size
	}
	return items, nil
}

// maxArrayElements is the most elements an array parameter may have: an
// element becomes a SQL literal of its own (a few tens of bytes while it is
// built, from as little as two bytes of the message), so a 64 MiB message
// of one-digit elements must not turn into gigabytes. 4,194,304 values is
// plumb's own bound, above any series a client would bind as one array.
const maxArrayElements = 1 << 22

func errTooManyElements(n int) error {
	return fmt.Errorf("an array parameter of %d elements is over plumb's limit of %d", n, maxArrayElements)
}

// textArrayLiterals reads PostgreSQL's array text ({1,2,"a b",NULL}) into
// element literals of type elem (0: left to DuckDB).
func textArrayLiterals(s string, elem uint32) ([]string, error) {
	// Each element costs tens of bytes while parsed and rendered, whatever
	// its own length, so the count is bounded first (at most one element
	// per comma, plus one).
	if n := strings.Count(s, ",") + 1; n > maxArrayElements {
		return nil, errTooManyElements(n)
	}
	elems, err := parseArrayText(s)
	if err != nil {
		return nil, err
	}
	items := make([]string, len(elems))
	for k, e := range elems {
		if e == nil {
			items[k] = "NULL"
			continue
		}
		lit, err := textLiteral(*e, elem, duckdbTypeName(elem))
		if err != nil {
			return nil, err
		}
		items[k] = lit
	}
	return items, nil
}

// parseArrayText splits a one-dimensional array literal into its elements
// (nil for NULL), following PostgreSQL's array input rules: braces,
// commas, double quotes with backslash escapes, unquoted NULL.
func parseArrayText(s string) ([]*string, error) {
	s = strings.TrimSpace(s)
	if strings.HasPrefix(s, "[") { // an explicit lower bound: [0:2]={...}
		if k := strings.Index(s, "="); k >= 0 {
			s = s[k+1:]
		}
	}
	if len(s) < 2 || s[0] != '{' || s[len(s)-1] != '}' {
		return nil, fmt.Errorf("malformed array literal: %q", s)
	}
	body := s[1 : len(s)-1]
	var out []*string
	if strings.TrimSpace(body) == "" {
		return out, nil
	}
	for i := 0; i <= len(body); {
		for i < len(body) && body[i] == ' ' {
			i++
		}
		var b strings.Builder
		quoted := false
		if i < len(body) && body[i] == '"' {
			quoted = true
			i++
			for ; i < len(body) && body[i] != '"'; i++ {
				if body[i] == '\\' && i+1 < len(body) {
					i++
				}
				b.WriteByte(body[i])
			}
			if i >= len(body) {
				return nil, fmt.Errorf("malformed array literal: unterminated quote")
			}
			i++
			for i < len(body) && body[i] == ' ' {
				i++
			}
		} else {
			for ; i < len(body) && body[i] != ','; i++ {
				if body[i] == '{' {
					return nil, fmt.Errorf("plumb accepts one-dimensional arrays only")
				}
				if body[i] == '\\' && i+1 < len(body) {
					i++
				}
				b.WriteByte(body[i])
			}
		}
		v := b.String()
		if !quoted {
			v = strings.TrimSpace(v)
		}
		if !quoted && strings.EqualFold(v, "NULL") {
			out = append(out, nil)
		} else {
			out = append(out, &v)
		}
		if i < len(body) && body[i] != ',' {
			return nil, fmt.Errorf("malformed array literal: %q", s)
		}
		i++
	}
	return out, nil
}

// inlineParams replaces every $n token with its literal.
func inlineParams(toks []token, literals []string) (string, error) {
	var b strings.Builder
	for _, t := range toks {
		if t.kind == tokParam {
			n := paramNumber(t.text)
			if n < 1 || n > len(literals) {
				return "", fmt.Errorf("there is no parameter $%d", n)
			}
			b.WriteString(literals[n-1])
			continue
		}
		b.WriteString(t.text)
	}
	return b.String(), nil
}
