package pgserver

import (
	"fmt"
	"strings"

	"github.com/jackc/pgx/v5/pgproto3"
)

// The extended query protocol: Parse, Bind, Describe, Execute, Close and
// Sync. After an error everything up to Sync is skipped.

func (sess *session) parse(m *pgproto3.Parse) error {
	if sess.skipping {
		return nil
	}
	p := &prepared{sql: m.Query}
	var err error
	if p.rewritten, p.paths, err = sess.rewrite(m.Query); err != nil {
		return err
	}
	p.toks = lex(p.rewritten)
	if maxParam(p.toks) > maxParams { // before anything is sized by it
		return pgError{stateUndefinedParameter, fmt.Sprintf("parameter numbers go up to $%d", maxParams)}
	}
	if sh, ok := sess.ownShape(p.rewritten); ok {
		p.shape, p.own = sh, true
		p.shape.params = make([]uint32, maxParam(p.toks))
		p.shape.paramTypes = make([]string, len(p.shape.params))
	} else {
		// Casts on the parameters the client typed help DuckDB place them.
		declared := make([]string, len(m.ParameterOIDs))
		for i, oid := range m.ParameterOIDs {
			declared[i] = duckdbTypeName(oid)
		}
		ctx := sess.begin()
		sh, err := sess.describeSQL(ctx, castParams(p.toks, declared))
		sess.end()
		if err != nil {
			return err
		}
		p.shape = sh
		// A cast written beside a parameter ($1::DATE) says what the
		// client should send where DuckDB infers no type.
		for n, oid := range paramCastOIDs(p.toks) {
			if n <= len(p.shape.params) && p.shape.params[n-1] == 0 {
				p.shape.params[n-1] = oid
			}
		}
	}
	p.params = make([]uint32, len(p.shape.params))
	for i := range p.params {
		switch {
		case i < len(m.ParameterOIDs) && m.ParameterOIDs[i] != 0:
			p.params[i] = m.ParameterOIDs[i]
			p.declared = append(p.declared, m.ParameterOIDs[i])
		default:
			p.params[i] = p.shape.params[i]
			if p.params[i] == 0 {
				p.params[i] = oidText // untyped: the client sends text
			}
			p.declared = append(p.declared, 0)
		}
	}
	sess.statements[m.Name] = p
	sess.be.Send(&pgproto3.ParseComplete{})
	return nil
}

// castParams writes $n::TYPE for every parameter with a type in types.
func castParams(toks []token, types []string) string {
	var b strings.Builder
	for _, t := range toks {
		b.WriteString(t.text)
		if t.kind == tokParam {
			if n := paramNumber(t.text); n >= 1 && n <= len(types) && types[n-1] != "" {
				b.WriteString("::" + types[n-1])
			}
		}
	}
	return b.String()
}

func (sess *session) bind(m *pgproto3.Bind) error {
	if sess.skipping {
		return nil
	}
	p, ok := sess.statements[m.PreparedStatement]
	if !ok {
		return pgError{"26000", fmt.Sprintf("prepared statement %q does not exist", m.PreparedStatement)}
	}
	if len(m.Parameters) != len(p.params) {
		return pgError{stateProtocolViolation, fmt.Sprintf("bind message supplies %d parameters, but the statement requires %d", len(m.Parameters), len(p.params))}
	}
	pt := &portal{stmt: p, formats: m.ResultFormatCodes, shape: p.shape}
	{
		literals := make([]string, len(m.Parameters))
		for i, data := range m.Parameters {
			format := formatOf(m.ParameterFormatCodes, i)
			oid := p.declared[i]
			if oid == 0 && format == 1 {
				oid = p.params[i]
			}
			if isSource, isPath := p.paths[i+1]; isPath && data != nil {
				if format != 0 {
					return pgError{stateInsufficientPriv, fmt.Sprintf("parameter $%d names a file or source: send it in text format", i+1)}
				}
				checked, err := sess.gate.paramValue(string(data), isSource)
				if err != nil {
					return err
				}
				data = []byte(checked)
			}
			lit, err := paramLiteral(data, format, oid, p.shape.paramTypes[i])
			if err != nil {
				return pgError{stateInvalidText, fmt.Sprintf("parameter $%d: %v", i+1, err)}
			}
			literals[i] = lit
		}
		sql, err := inlineParams(p.toks, literals)
		if err != nil {
			return pgError{stateProtocolViolation, err.Error()}
		}
		if !p.own { // the values are in: check the statement as it will run
			if err := sess.gate.check(sql); err != nil {
				return err
			}
		}
		pt.sql = sql
		if p.shape.incomplete && !p.own {
			ctx := sess.begin()
			sh, err := sess.describeSQL(ctx, sql)
			sess.end()
			if err != nil {
				return err
			}
			pt.shape = sh
		}
	}
	sess.closeCursor(sess.portals[m.DestinationPortal])
	sess.portals[m.DestinationPortal] = pt
	sess.be.Send(&pgproto3.BindComplete{})
	return nil
}

func (sess *session) describe(m *pgproto3.Describe) error {
	if sess.skipping {
		return nil
	}
	if m.ObjectType == 'S' {
		p, ok := sess.statements[m.Name]
		if !ok {
			return pgError{"26000", fmt.Sprintf("prepared statement %q does not exist", m.Name)}
		}
		sess.be.Send(&pgproto3.ParameterDescription{ParameterOIDs: p.params})
		sess.sendShape(p.shape, nil)
		return nil
	}
	pt, ok := sess.portals[m.Name]
	if !ok {
		return pgError{"34000", fmt.Sprintf("portal %q does not exist", m.Name)}
	}
	sess.sendShape(pt.shape, pt.formats)
	return nil
}

func (sess *session) sendShape(sh shape, formats []int16) {
	if sh.returnsRows() || (sh.kind == 0 && len(sh.columns) > 0) {
		sess.be.Send(rowDescription(sh.columns, formats))
	} else {
		sess.be.Send(&pgproto3.NoData{})
	}
}

func (sess *session) execute(m *pgproto3.Execute) error {
	if sess.skipping {
		return nil
	}
	pt, ok := sess.portals[m.Portal]
	if !ok {
		return pgError{"34000", fmt.Sprintf("portal %q does not exist", m.Portal)}
	}
	if pt.cursor != nil || (m.MaxRows > 0 && !pt.stmt.own && pt.shape.returnsRows()) {
		return sess.fetch(pt, int64(m.MaxRows))
	}
	return sess.run(pt.stmt.sql, pt.sql, &pt.shape, pt.formats, false)
}

// maxParam is the highest $n in a statement.
// maxParams is the most parameters a statement may have: a Bind message
// counts them in 16 bits, as PostgreSQL does.
const maxParams = 65535

func maxParam(toks []token) int {
	n := 0
	for _, t := range toks {
		if t.kind == tokParam && paramNumber(t.text) > n {
			n = paramNumber(t.text)
		}
	}
	return n
}

// paramCastOIDs finds casts written on parameters ($3::DATE, $1::int8[])
// and maps each parameter number to the cast type's OID.
func paramCastOIDs(toks []token) map[int]uint32 {
	out := map[int]uint32{}
	idx := significant(toks)
	for k := 0; k+2 < len(idx); k++ {
		if toks[idx[k]].kind != tokParam || !toks[idx[k+1]].is("::") || toks[idx[k+2]].kind != tokWord {
			continue
		}
		name := toks[idx[k+2]].name()
		if k+4 < len(idx) && toks[idx[k+3]].is("[") && toks[idx[k+4]].is("]") {
			name += "[]"
		}
		out[paramNumber(toks[idx[k]].text)] = castOID(name)
	}
	return out
}

// castOID maps a type name as written in a cast, PostgreSQL's or DuckDB's,
// to an OID.
func castOID(name string) uint32 {
	base, array := strings.CutSuffix(strings.ToLower(name), "[]")
	oid := uint32(0)
	for _, t := range pgTypes {
		if t.name == base || t.format == base {
			oid = t.oid
			break
		}
	}
	if oid == 0 {
		switch base {
		case "int", "integer":
			oid = oidInt4
		case "string", "varchar":
			oid = oidText
		default:
			oid = typeOID(base)
		}
	}
	if array {
		if oid == oidVarchar || oid == 1042 { // lists of VARCHAR are text[]
			oid = oidText
		}
		if a, ok := arrayOf[oid]; ok {
			return a
		}
		return oidText
	}
	return oid
}
