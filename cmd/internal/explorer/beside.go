package explorer

import (
	"context"
	"fmt"
	"log/slog"
	"net"

	"github.com/plumb-sql/plumb/cmd/internal/pgserver"
)

// ServeBeside serves the explorer on addr for plumb serve's server srv
// (same database, users and --data) until ctx ends. Without TLS it listens
// only on a loopback address: the login form's password would otherwise
// cross the network in clear text.
func ServeBeside(ctx context.Context, srv *pgserver.Server, addr string, cfg pgserver.Config, log *slog.Logger) error {
	host, _, err := net.SplitHostPort(addr)
	if err != nil {
		return fmt.Errorf("--http %q: %w", addr, err)
	}
	tls := cfg.TLSCert != ""
	if ip := net.ParseIP(host); !tls && host != "localhost" && (ip == nil || !ip.IsLoopback()) {
		return fmt.Errorf("--http is allowed only on a loopback address without --tls-cert, not %q", host)
	}
	e, err := New(Config{DB: srv.DB(), Files: srv.Files(), Trust: srv.Trust(), CheckPassword: srv.CheckPassword,
		TLS: tls, Log: log, QueryTimeout: cfg.QueryTimeout})
	if err != nil {
		return err
	}
	ln, err := net.Listen("tcp", addr)
	if err != nil {
		e.Close()
		return err
	}
	scheme := "http"
	if tls {
		scheme = "https"
	}
	log.Info("explorer listening", "url", scheme+"://"+ln.Addr().String()+"/")
	return e.Serve(ctx, ln, cfg.Grace, cfg.TLSCert, cfg.TLSKey)
}
