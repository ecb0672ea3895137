package pgserver

import (
	"context"
	"log/slog"
	"net"
)

// Run serves cfg until SIGINT or SIGTERM (or ctx ends), then shuts down
// gracefully. ready, if not nil, is told the listening address.
func Run(ctx context.Context, cfg Config, log *slog.Logger, ready func(net.Addr)) error {
	return RunWith(ctx, cfg, log, ready, nil)
}
