package pgserver

import (
	"context"
	"crypto/rand"
	"crypto/subtle"
	"crypto/tls"
	"database/sql"
	"fmt"
	"log/slog"
	"net"
	"os"
	"path/filepath"
	"runtime/debug"
	"sort"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/plumb-sql/plumb/cmd/internal/sandbox"
	"github.com/plumb-sql/plumb/udf"
)

// Server accepts PostgreSQL clients and serves them from one database.
type Server struct {
	cfg    Config
	db     *sql.DB
	creds  credentials
	logins *loginThrottle
	tls    *tls.Config
	log    *slog.Logger
	files  *sandbox.Paths // what files clients may reach
	spill  string         // DuckDB's temporary directory, private to the server
	names  *catalogNames  // the database's function names, for the allow-list

	mu       sync.Mutex
	ln       net.Listener
	sessions map[uint32]*session
	open     int // connections holding a slot, logged in or not
	refusing int // connections being told the server is full
	// dropped counts connections closed unanswered since droppedLogged.
	dropped       int
	droppedLogged time.Time
	closing       atomic.Bool
	version       string // what version() answers
	wg            sync.WaitGroup
	nextPID       atomic.Uint32
}

// New opens the database with the sandbox in force and prepares to serve.
func New(ctx context.Context, cfg Config, log *slog.Logger) (*Server, error) {
	if err := cfg.Check(); err != nil {
		return nil, err
	}
	s := &Server{cfg: cfg, log: log, sessions: map[uint32]*session{}, logins: newLoginThrottle(cfg.FailedLoginDelay)}
	if cfg.TLSCert != "" {
		cert, err := tls.LoadX509KeyPair(cfg.TLSCert, cfg.TLSKey)
		if err != nil {
			return nil, fmt.Errorf("TLS: %w", err)
		}
		s.tls = &tls.Config{Certificates: []tls.Certificate{cert}, MinVersion: tls.VersionTLS12}
	}
	if cfg.Auth == "scram" {
		creds, err := newCredentials(cfg.Users)
		if err != nil {
			return nil, err
		}
		s.creds = creds
	}
	if err := s.placeFiles(); err != nil {
		return nil, err
	}
	var memoryLimit int64
	if cfg.MemoryLimit != "" {
		memoryLimit, _ = byteSize(cfg.MemoryLimit) // Check read it
		// The Go heap (plumb's functions, the sessions' buffers) is held
		// to the same limit as DuckDB's buffers; the setting is the
		// process's.
		debug.SetMemoryLimit(memoryLimit)
	}
	db, err := udf.Open(ctx, udf.Options{Path: cfg.DBPath, ReadOnly: cfg.ReadOnly, MemoryLimit: memoryLimit})
	if err != nil {
		os.RemoveAll(s.spill)
		return nil, err
	}
	if s.names, err = readCatalogNames(ctx, db); err == nil {
		err = lockDown(ctx, db, cfg, s.files, s.spill)
	}
	if err != nil {
		db.Close()
		os.RemoveAll(s.spill)
		return nil, err
	}
	s.db = db
	// Sessions' connections are closed when they end (session.closeDB);
	// none is kept idle for the next.
	db.SetMaxIdleConns(0)
	var duckdbVersion string
	if err := db.QueryRowContext(ctx, "SELECT library_version FROM pragma_version()").Scan(&duckdbVersion); err != nil {
		db.Close()
		return nil, err
	}
	s.version = fmt.Sprintf("PostgreSQL %s (plumb, DuckDB %s)", strings.TrimSuffix(clientParameters["server_version"], " (plumb)"), duckdbVersion)
	s.nextPID.Store(uint32(time.Now().UnixNano()%100000) + 1000)
	return s, nil
}

// placeFiles refuses a database file inside the data directory (a client
// could overwrite it), creates the private spill directory outside it, and
// makes the file policy: the data directory, never the spill directory, the
// database file or its write-ahead log.
func (s *Server) placeFiles() error {
	cfg := s.cfg
	if cfg.DBPath != "" && cfg.DataDir != "" {
		inside, err := sandbox.New(cfg.DataDir)
		if err != nil {
			return err
		}
		if _, err := inside.Resolve(mustAbs(cfg.DBPath)); err == nil {
			return fmt.Errorf("--db %q lies inside --data %q, where clients could read and overwrite it: put the database file outside the data directory", cfg.DBPath, cfg.DataDir)
		}
	}
	spill, err := sandbox.SpillDirectory(cfg.DataDir)
	if err != nil {
		return err
	}
	private := []string{spill}
	if cfg.DBPath != "" {
		db := mustAbs(cfg.DBPath)
		private = append(private, db, db+".wal", db+".tmp")
	}
	files, err := sandbox.New(cfg.DataDir, private...)
	if err != nil {
		os.RemoveAll(spill)
		return err
	}
	s.files, s.spill = files, spill
	return nil
}

func mustAbs(p string) string {
	if abs, err := filepath.Abs(p); err == nil {
		return abs
	}
	return p
}

// readCatalogNames reads the names of the database's table functions and
// of all its functions (DuckDB's and plumb's).
func readCatalogNames(ctx context.Context, db *sql.DB) (*catalogNames, error) {
	names := &catalogNames{table: map[string]bool{}, functions: map[string]bool{}}
	rows, err := db.QueryContext(ctx, "SELECT DISTINCT lower(function_name), function_type IN ('table', 'table_macro') FROM duckdb_functions()")
	if err != nil {
		return nil, fmt.Errorf("read the function catalogue: %w", err)
	}
	defer rows.Close()
	for rows.Next() {
		var name string
		var table bool
		if err := rows.Scan(&name, &table); err != nil {
			return nil, err
		}
		names.functions[name] = true
		if table {
			names.table[name] = true
		}
	}
	return names, rows.Err()
}

// lockDown confines every client: files only under the data directory,
// spill files in a directory of the server's own, no extensions, and a
// locked configuration. DuckDB applies these settings to the whole
// database; the allow-list (allow.go) and the file policy (rewrite.go)
// check each statement before DuckDB sees it.
func lockDown(ctx context.Context, db *sql.DB, cfg Config, files *sandbox.Paths, spill string) error {
	stmts := []string{"SET temp_directory = " + udf.QuoteLiteral(spill)}
	if files.Data() != "" { // the policy writes every path with links resolved
		stmts = append(stmts, "SET allowed_directories = ["+udf.QuoteLiteral(files.Data())+"]")
	}
	if cfg.MemoryLimit != "" {
		stmts = append(stmts, "SET memory_limit = "+udf.QuoteLiteral(cfg.MemoryLimit))
	}
	stmts = append(stmts,
		"SET enable_external_access = false",
		"SET autoinstall_known_extensions = false",
		"SET autoload_known_extensions = false",
		"SET allow_community_extensions = false",
		"SET lock_configuration = true",
	)
	for _, q := range stmts {
		if _, err := db.ExecContext(ctx, q); err != nil {
			return fmt.Errorf("sandbox (%s): %w", q, err)
		}
	}
	return nil
}

// Serve accepts connections on ln until Shutdown.
func (s *Server) Serve(ln net.Listener) error {
	s.mu.Lock()
	s.ln = ln
	s.mu.Unlock()
	s.log.Info("listening", "addr", ln.Addr().String(), "auth", s.cfg.Auth, "tls", s.tls != nil, "data", s.cfg.DataDir)
	return s.acceptLoop(ln)
}

// Files is the server's file policy, for anything else in the process that
// serves files to clients: a path a client names is reachable only if
// Files().Resolve allows it.
func (s *Server) Files() *sandbox.Paths { return s.files }

// Addr is the listening address (useful with port 0).
func (s *Server) Addr() net.Addr {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.ln == nil {
		return nil
	}
	return s.ln.Addr()
}

// register makes a logged-in session known to cancel requests and
// shutdown; its connection already holds a slot (admit).
func (s *Server) register(sess *session) {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.sessions[sess.pid] = sess
}

func (s *Server) unregister(sess *session) {
	s.mu.Lock()
	delete(s.sessions, sess.pid)
	s.mu.Unlock()
}

// cancel handles a CancelRequest: the running statement of the session
// with that process ID and secret, if any, is interrupted.
func (s *Server) cancel(pid uint32, secret []byte) {
	s.mu.Lock()
	sess := s.sessions[pid]
	s.mu.Unlock()
	if sess != nil && subtle.ConstantTimeCompare(sess.secret, secret) == 1 {
		s.log.Info("cancel request", "pid", pid)
		sess.cancelRunning()
	}
}

// Shutdown stops accepting, lets running statements finish for the grace
// period, then cancels what still runs (its transaction rolls back), closes
// every session and finally the database, which checkpoints a file.
func (s *Server) Shutdown() error {
	s.closing.Store(true)
	s.mu.Lock()
	if s.ln != nil {
		s.ln.Close()
	}
	s.mu.Unlock()
	deadline := time.Now().Add(s.cfg.Grace)
	for time.Now().Before(deadline) && s.busy() {
		time.Sleep(20 * time.Millisecond)
	}
	s.mu.Lock()
	for _, sess := range s.sessions {
		sess.cancelRunning()
		sess.shutdown()
	}
	s.mu.Unlock()
	done := make(chan struct{})
	go func() { s.wg.Wait(); close(done) }()
	select {
	case <-done:
	case <-time.After(5 * time.Second):
		s.log.Warn("sessions still open after shutdown; closing the database anyway")
	}
	s.log.Info("closing database")
	err := s.db.Close()
	os.RemoveAll(s.spill)
	return err
}

func (s *Server) busy() bool {
	s.mu.Lock()
	defer s.mu.Unlock()
	for _, sess := range s.sessions {
		if sess.running() {
			return true
		}
	}
	return false
}

// userNames lists the configured users, sorted, for pg_roles.
func (s *Server) userNames() []string {
	names := make([]string, 0, len(s.cfg.Users))
	for u := range s.cfg.Users {
		names = append(names, u)
	}
	sort.Strings(names)
	if len(names) == 0 {
		names = []string{"plumb"}
	}
	return names
}

// randomSecret is a session's cancel key (4 bytes, as protocol 3.0 has it).
func randomSecret() []byte {
	b := make([]byte, 4)
	rand.Read(b)
	return b
}
