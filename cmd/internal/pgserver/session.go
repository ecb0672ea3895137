package pgserver

import (
	"context"
	"crypto/tls"
	"database/sql"
	"database/sql/driver"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"strings"
	"sync"
	"time"

	"github.com/jackc/pgx/v5/pgproto3"
)

// session is one client connection and its own DuckDB connection.
type session struct {
	srv      *Server
	conn     net.Conn
	be       *pgproto3.Backend
	frames   *frameReader
	full     bool      // the connection holds no slot: refuse the login
	loginBy  time.Time // the --auth-timeout deadline
	db       *sql.Conn
	log      *slog.Logger
	pid      uint32
	secret   []byte
	user     string
	database string
	txn      byte // 'I' idle, 'T' in a transaction, 'E' in a failed transaction
	params   map[string]string
	gate     *gate // what this session may run (allow.go)

	statements map[string]*prepared
	portals    map[string]*portal
	cursors    int  // cursors opened, to name their tables
	skipping   bool // after an extended-protocol error, until Sync

	mu     sync.Mutex
	cancel context.CancelFunc // of the running statement
	// stopWatch ends the watchPeer of the running statement.
	stopWatch chan struct{}
	busy      bool
}

// handle serves one connection; full means it holds no slot and is only
// told that the server is full (a cancel request is still honoured).
func (s *Server) handle(c net.Conn, full bool) {
	start := time.Now()
	sess := &session{srv: s, txn: 'I', full: full,
		params: map[string]string{}, statements: map[string]*prepared{}, portals: map[string]*portal{}}
	sess.attach(c)
	sess.log = s.log.With("remote", c.RemoteAddr().String())
	defer c.Close()
	ok, err := sess.startup()
	if err != nil || !ok {
		if err != nil && !errors.Is(err, io.EOF) {
			sess.log.Info("connection refused", "error", err.Error())
		}
		return
	}
	defer s.unregister(sess)
	defer sess.closeDB()
	defer sess.dropPortals() // before the connection: open rows would block its Close
	sess.log = sess.log.With("user", sess.user, "pid", sess.pid)
	sess.log.Info("connection opened")
	err = sess.loop()
	attrs := []any{"duration", time.Since(start).String()}
	if err != nil && !errors.Is(err, io.EOF) && !errors.Is(err, net.ErrClosed) {
		attrs = append(attrs, "error", err.Error())
	}
	sess.log.Info("connection closed", attrs...)
}

// startup handles SSL negotiation, cancel requests, the startup message and
// authentication; ok reports whether a session was established.
func (sess *session) startup() (bool, error) {
	timeout := sess.srv.cfg.AuthTimeout
	if sess.full {
		timeout = min(timeout, refusalTimeout)
	}
	sess.loginBy = time.Now().Add(timeout)
	sess.conn.SetDeadline(sess.loginBy)
	defer sess.conn.SetDeadline(time.Time{})
	for {
		msg, err := sess.be.ReceiveStartupMessage()
		if err != nil {
			return false, err
		}
		switch m := msg.(type) {
		case *pgproto3.SSLRequest:
			if sess.srv.tls == nil {
				if _, err := sess.conn.Write([]byte{'N'}); err != nil {
					return false, err
				}
				continue
			}
			if _, err := sess.conn.Write([]byte{'S'}); err != nil {
				return false, err
			}
			t := tls.Server(sess.conn, sess.srv.tls)
			if err := t.Handshake(); err != nil {
				return false, fmt.Errorf("TLS handshake: %w", err)
			}
			sess.attach(t)
		case *pgproto3.GSSEncRequest:
			if _, err := sess.conn.Write([]byte{'N'}); err != nil {
				return false, err
			}
		case *pgproto3.CancelRequest:
			sess.srv.cancel(m.ProcessID, m.SecretKey)
			return false, nil
		case *pgproto3.StartupMessage:
			return sess.login(m)
		default:
			return false, fmt.Errorf("unexpected startup message %T", msg)
		}
	}
}

func (sess *session) fatal(code, msg string) {
	sess.be.Send(&pgproto3.ErrorResponse{Severity: "FATAL", SeverityUnlocalized: "FATAL", Code: code, Message: msg})
	sess.be.Flush()
}

func (sess *session) login(m *pgproto3.StartupMessage) (bool, error) {
	srv := sess.srv
	sess.user = m.Parameters["user"]
	if srv.closing.Load() {
		sess.fatal(stateAdminShutdown, "the server is shutting down")
		return false, nil
	}
	if sess.full {
		sess.fatal(stateTooManyConns, fmt.Sprintf("sorry, too many connections (at most %d)", srv.cfg.MaxConns))
		return false, nil
	}
	if _, secure := sess.conn.(*tls.Conn); srv.cfg.TLSRequired && !secure {
		sess.fatal(stateInvalidAuthSpec, "this server accepts TLS connections only: connect with sslmode=require or stronger")
		return false, nil
	}
	if sess.user == "" {
		sess.fatal(stateInvalidAuthSpec, "no user name given")
		return false, nil
	}
	if srv.cfg.Auth == "scram" {
		host, _, _ := net.SplitHostPort(sess.conn.RemoteAddr().String())
		keys := loginKeys(sess.user, host)
		if wait := srv.logins.wait(keys); wait > 0 {
			if time.Now().Add(wait).After(sess.loginBy) {
				sess.log.Warn("login refused: too many failed logins", "user", sess.user)
				sess.fatal(stateInvalidPassword, fmt.Sprintf("too many failed logins for this user or address; try again in %s", wait.Round(time.Second)))
				return false, nil
			}
			time.Sleep(wait)
		}
		if err := scramLogin(sess.be, srv.creds, sess.user); err != nil {
			var le errLogin
			if errors.As(err, &le) {
				// The answer waits its turn, but no longer than the
				// login deadline; later attempts still queue (wait above).
				time.Sleep(min(srv.logins.failed(keys), time.Until(sess.loginBy)-50*time.Millisecond))
				sess.log.Warn("login failed", "user", sess.user, "reason", le.reason)
				code := stateInvalidPassword
				if strings.Contains(le.reason, "expected") || strings.Contains(le.reason, "mechanism") || strings.Contains(le.reason, "malformed") {
					code = stateInvalidAuthSpec
				}
				sess.fatal(code, le.reason)
				return false, nil
			}
			return false, err
		}
		srv.logins.succeeded(keys)
	}
	sess.gate = &gate{files: srv.files, role: srv.cfg.role(sess.user), readOnly: srv.cfg.ReadOnly, catalog: srv.names}
	sess.pid = srv.nextPID.Add(1)
	sess.secret = randomSecret()
	srv.register(sess)
	db, err := srv.db.Conn(context.Background())
	if err != nil {
		srv.unregister(sess)
		sess.fatal(stateInternal, "cannot open a database connection: "+err.Error())
		return false, nil
	}
	sess.db = db
	for k, v := range m.Parameters {
		if _, ok := clientParameters[strings.ToLower(k)]; ok {
			sess.params[strings.ToLower(k)] = v
		}
	}
	sess.database = m.Parameters["database"]
	if sess.database == "" {
		sess.database = sess.user
	}
	id := identity{user: sess.user, database: sess.database, version: srv.version, pid: sess.pid, users: srv.userNames()}
	if err := setupCompat(context.Background(), db, id, sess.params); err != nil {
		sess.closeDB()
		srv.unregister(sess)
		sess.fatal(stateInternal, err.Error())
		return false, nil
	}
	sess.frames.limit = maxMessage
	sess.be.Send(&pgproto3.AuthenticationOk{})
	for _, name := range startupParameters {
		sess.be.Send(&pgproto3.ParameterStatus{Name: name, Value: sess.param(strings.ToLower(name))})
	}
	sess.be.Send(&pgproto3.BackendKeyData{ProcessID: sess.pid, SecretKey: sess.secret})
	sess.be.Send(&pgproto3.ReadyForQuery{TxStatus: 'I'})
	return true, sess.be.Flush()
}

func (sess *session) param(name string) string {
	if v, ok := sess.params[name]; ok {
		return v
	}
	if name == "session_authorization" {
		return sess.user
	}
	return clientParameters[name]
}

// loop reads and answers messages until the client leaves.
func (sess *session) loop() error {
	for {
		msg, err := sess.be.Receive()
		if err != nil {
			return err
		}
		if sess.srv.closing.Load() && !sess.running() {
			sess.fatal(stateAdminShutdown, "the server is shutting down")
			return nil
		}
		switch m := msg.(type) {
		case *pgproto3.Query:
			sess.simpleQuery(m.String)
		case *pgproto3.Parse:
			sess.step("parse", m.Query, func() error { return sess.parse(m) })
		case *pgproto3.Bind:
			sess.step("bind", sess.statementText(m.PreparedStatement), func() error { return sess.bind(m) })
		case *pgproto3.Describe:
			sess.step("describe", sess.describedText(m), func() error { return sess.describe(m) })
		case *pgproto3.Execute:
			sess.handle(sess.execute(m))
		case *pgproto3.Close:
			if m.ObjectType == 'S' {
				delete(sess.statements, m.Name)
			} else {
				sess.closeCursor(sess.portals[m.Name])
				delete(sess.portals, m.Name)
			}
			sess.be.Send(&pgproto3.CloseComplete{})
		case *pgproto3.Sync:
			sess.skipping = false
			if sess.txn == 'I' { // the implicit transaction ends with its portals
				sess.endTransactionPortals()
			}
			sess.be.Send(&pgproto3.ReadyForQuery{TxStatus: sess.txn})
			if err := sess.be.Flush(); err != nil {
				return err
			}
		case *pgproto3.Flush:
			if err := sess.be.Flush(); err != nil {
				return err
			}
		case *pgproto3.Terminate:
			return nil
		case *pgproto3.CopyData, *pgproto3.CopyDone, *pgproto3.CopyFail:
			// the rest of a COPY the server already ended with an error;
			// PostgreSQL ignores these outside copy mode too
		default:
			sess.be.Send(&pgproto3.ErrorResponse{Severity: "ERROR", SeverityUnlocalized: "ERROR", Code: stateProtocolViolation,
				Message: fmt.Sprintf("plumb does not support the %T message", msg)})
			sess.be.Send(&pgproto3.ReadyForQuery{TxStatus: sess.txn})
			if err := sess.be.Flush(); err != nil {
				return err
			}
		}
	}
}

// step runs one extended-protocol step; a failure is logged with the
// statement it concerns (Execute logs its own) and answered by handle.
func (sess *session) step(name, sql string, run func() error) {
	if sess.skipping {
		return
	}
	start := time.Now()
	err := run()
	if err != nil {
		sess.logStatement(name, sql, start, 0, err)
	}
	sess.handle(err)
}

func (sess *session) statementText(name string) string {
	if p, ok := sess.statements[name]; ok {
		return p.sql
	}
	return ""
}

func (sess *session) describedText(m *pgproto3.Describe) string {
	if m.ObjectType == 'S' {
		return sess.statementText(m.Name)
	}
	if pt, ok := sess.portals[m.Name]; ok {
		return pt.stmt.sql
	}
	return ""
}

// closeDB ends the session's DuckDB connection: an open transaction is
// rolled back, and the connection is closed instead of going back to
// database/sql's pool, so no TEMP table, prepared statement or transaction
// of this session can reach another (Conn.Raw returning ErrBadConn makes
// database/sql discard the connection).
func (sess *session) closeDB() {
	if sess.db == nil {
		return
	}
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	sess.db.ExecContext(ctx, "ROLLBACK") // fails harmlessly when no transaction is open
	sess.db.Raw(func(any) error { return driver.ErrBadConn })
	sess.db.Close()
	sess.db = nil
}

// handle sends the error of an extended-protocol step; after an error the
// rest of the messages up to Sync are skipped, as the protocol requires.
func (sess *session) handle(err error) {
	if err == nil {
		return
	}
	sess.be.Send(sess.responseFor(err))
	sess.skipping = true
}

// begin marks a statement as running and returns its context.
func (sess *session) begin() context.Context {
	ctx := context.Background()
	var cancel context.CancelFunc
	if t := sess.srv.cfg.QueryTimeout; t > 0 {
		ctx, cancel = context.WithTimeout(ctx, t)
	} else {
		ctx, cancel = context.WithCancel(ctx)
	}
	stop := make(chan struct{})
	go sess.watchPeer(ctx, cancel, stop)
	sess.mu.Lock()
	sess.cancel, sess.busy, sess.stopWatch = cancel, true, stop
	sess.mu.Unlock()
	return ctx
}

func (sess *session) end() {
	sess.mu.Lock()
	if sess.cancel != nil {
		sess.cancel()
	}
	if sess.stopWatch != nil {
		close(sess.stopWatch)
	}
	sess.cancel, sess.busy, sess.stopWatch = nil, false, nil
	sess.mu.Unlock()
}

// markBusy registers cancel as the running statement's, as begin does, for
// a statement whose context outlives it (a cursor's).
func (sess *session) markBusy(cancel context.CancelFunc) {
	sess.mu.Lock()
	sess.cancel, sess.busy = cancel, true
	sess.mu.Unlock()
}

// markIdle ends what markBusy began without cancelling the context.
func (sess *session) markIdle() {
	sess.mu.Lock()
	sess.cancel, sess.busy = nil, false
	sess.mu.Unlock()
}

func (sess *session) cancelRunning() {
	sess.mu.Lock()
	defer sess.mu.Unlock()
	if sess.cancel != nil {
		sess.cancel()
	}
}

func (sess *session) running() bool {
	sess.mu.Lock()
	defer sess.mu.Unlock()
	return sess.busy
}

// shutdown closes the client connection so its loop ends.
func (sess *session) shutdown() {
	sess.conn.SetReadDeadline(time.Now())
}
