package pgserver

import (
	"context"
	"crypto/subtle"
	"database/sql"
	"errors"
	"fmt"
	"log/slog"
	"net"
	"os"
	"os/signal"
	"syscall"

	"github.com/xdg-go/scram"
)

// This file is what code serving beside the PostgreSQL listener in the same
// process (the explorer page of plumb serve --http) needs from the server:
// its database, its users' verifiers and its file policy (Files).

// DB is the server's database, sandboxed as every client's session is.
func (s *Server) DB() *sql.DB { return s.db }

// Trust reports whether the server runs with --auth trust (loopback only).
func (s *Server) Trust() bool { return s.cfg.Auth == "trust" }

// CheckPassword reports whether password is user's, checked against the
// same SCRAM-SHA-256 verifier a PostgreSQL client's login is: the password
// is salted and iterated with the verifier's own salt and count (RFC 5802:
// SaltedPassword = Hi(password, salt, i), ClientKey = HMAC(SaltedPassword,
// "Client Key"), StoredKey = H(ClientKey)) and the stored keys compared in
// constant time. An unknown user costs the same work against its mock
// verifier (credentials.lookup), so the answer's timing does not tell
// unknown users from wrong passwords.
func (s *Server) CheckPassword(user, password string) bool {
	stored, known := s.creds.lookup(user)
	client, err := scram.SHA256.NewClient(user, password, "")
	if err != nil { // a password SASLprep refuses
		return false
	}
	got := client.GetStoredCredentials(stored.KeyFactors)
	same := subtle.ConstantTimeCompare([]byte(got.StoredKey), []byte(stored.StoredKey)) == 1
	return same && known
}

// RunWith is Run with beside started once the database is open: it serves
// on the same database until ctx ends, and is stopped (its context
// cancelled, then waited for) before the database closes. beside may be nil.
func RunWith(ctx context.Context, cfg Config, log *slog.Logger, ready func(net.Addr), beside func(context.Context, *Server) error) error {
	srv, err := New(ctx, cfg, log)
	if err != nil {
		return err
	}
	if cfg.MemoryLimit != "" {
		m, _ := byteSize(cfg.MemoryLimit) // New checked it
		if err := capProcessMemory(processMemoryCap(m)); err != nil {
			srv.db.Close()
			return fmt.Errorf("cap the process's memory: %w", err)
		}
	}
	ln, err := net.Listen("tcp", cfg.Addr)
	if err != nil {
		srv.Shutdown()
		return err
	}
	if ready != nil {
		ready(ln.Addr())
	}
	ctx, stop := signal.NotifyContext(ctx, os.Interrupt, syscall.SIGTERM)
	defer stop()
	besideCtx, stopBeside := context.WithCancel(ctx)
	// Without beside the channel stays nil, so the select below never
	// picks it.
	var besideDone chan error
	if beside != nil {
		besideDone = make(chan error, 1)
		go func() { besideDone <- beside(besideCtx, srv) }()
	}
	served := make(chan error, 1)
	go func() { served <- srv.Serve(ln) }()
	var besideErr error
	besideFinished := false
	select {
	case <-ctx.Done():
	case err = <-served:
	case besideErr = <-besideDone:
		besideFinished = true
	}
	log.Info("shutting down", "grace", cfg.Grace.String())
	stopBeside()
	if !besideFinished && besideDone != nil {
		besideErr = <-besideDone
	}
	serr := srv.Shutdown()
	if err == nil {
		err = <-served
	}
	log.Info("stopped")
	return errors.Join(err, besideErr, serr)
}
