package pgserver

import (
	"context"
	"fmt"
	"log/slog"
	"net"
	"os"
	"os/signal"
	"syscall"
)

// Run serves cfg until SIGINT or SIGTERM (or ctx ends), then shuts down
// gracefully. ready, if not nil, is told the listening address.
func Run(ctx context.Context, cfg Config, log *slog.Logger, ready func(net.Addr)) error {
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
	served := make(chan error, 1)
	go func() { served <- srv.Serve(ln) }()
	select {
	case <-ctx.Done():
		log.Info("shutting down", "grace", cfg.Grace.String())
		err := srv.Shutdown()
		<-served
		log.Info("stopped")
		return err
	case err := <-served:
		srv.Shutdown()
		return err
	}
}
