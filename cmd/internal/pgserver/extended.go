package pgserver

import (
	"fmt"

	"github.com/jackc/pgx/v5/pgproto3"
)

// The extended query protocol: Parse, Bind, Describe, Execute, Close and
// Sync. After an error everything up to Sync is skipped.

func (sess *session) parse(m *pgproto3.Parse) error {
	if sess.skipping {
		return nil
	}
	p := &prepared{sql: m.Query}
	if sh, ok := specialShape(m.Query); ok {
		p.shape = sh
	} else if copyToStdout.MatchString(m.Query) || copyFromStdin.MatchString(m.Query) {
		p.shape = shape{}
	} else {
		ctx := sess.begin()
		sh, err := sess.describeSQL(ctx, normalize(m.Query))
		sess.end()
		if err != nil {
			return err
		}
		p.shape = sh
	}
	p.params = make([]uint32, len(p.shape.params))
	for i := range p.params {
		if i < len(m.ParameterOIDs) && m.ParameterOIDs[i] != 0 {
			p.params[i] = m.ParameterOIDs[i]
		} else {
			p.params[i] = p.shape.params[i]
		}
	}
	sess.statements[m.Name] = p
	sess.be.Send(&pgproto3.ParseComplete{})
	return nil
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
	args := make([]any, len(m.Parameters))
	for i, data := range m.Parameters {
		v, err := decodeParam(data, formatOf(m.ParameterFormatCodes, i), p.params[i])
		if err != nil {
			return pgError{stateInvalidText, fmt.Sprintf("parameter $%d: %v", i+1, err)}
		}
		args[i] = v
	}
	sess.closeCursor(sess.portals[m.DestinationPortal])
	sess.portals[m.DestinationPortal] = &portal{stmt: p, args: args, formats: m.ResultFormatCodes}
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
	sess.sendShape(pt.stmt.shape, pt.formats)
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
	if pt.cursor != nil || (m.MaxRows > 0 && sess.fetchable(pt.stmt)) {
		return sess.fetch(pt, int64(m.MaxRows))
	}
	return sess.run(pt.stmt.sql, pt.args, pt.formats, false)
}

// fetchable reports whether a statement's rows may be fetched a few at a
// time: one DuckDB runs and that returns rows (not a client command plumb
// answers itself, nor COPY).
func (sess *session) fetchable(p *prepared) bool {
	if _, special := specialShape(p.sql); special {
		return false
	}
	if copyToStdout.MatchString(p.sql) || copyFromStdin.MatchString(p.sql) {
		return false
	}
	return p.shape.returnsRows()
}
