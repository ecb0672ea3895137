package main

import (
	"context"
	"fmt"
	"log/slog"
	"os"
	"path/filepath"
	"time"

	"github.com/spf13/cobra"

	"github.com/plumb-sql/plumb/cmd/internal/explorer"
	"github.com/plumb-sql/plumb/cmd/internal/pgserver"
)

func newServeCommand() *cobra.Command {
	cfg := pgserver.Config{Addr: "127.0.0.1:5433", Grace: 10 * time.Second}
	var usersFile, logFormat, httpAddr string
	cmd := &cobra.Command{
		Use:   "serve",
		Short: "Serve plumb's SQL to PostgreSQL clients (psql, drivers, BI tools)",
		Long: `Listens for PostgreSQL clients (protocol 3) and runs their SQL, with plumb's
functions, on an embedded DuckDB database. Each client session has its own
connection, transactions and TEMP tables.

Sandbox: clients read and write files only under --data (a relative path in
SQL means one under --data; the database file and DuckDB's spill files are
out of reach, and a --db inside --data is refused), cannot install or load
extensions, attach databases or change DuckDB's configuration, and run only
what an allow-list of statements, table functions and pragmas holds (the
README lists it). Sessions never share a DuckDB connection.

Authentication is SCRAM-SHA-256 with users from --users FILE or the
PLUMB_USERS variable ("user:password" lines or comma-separated), never from
the command line; --auth trust is allowed only on a loopback address. A line
"read user:password" makes a user that only queries; "write" (the default)
may also change the database and write files under --data.
--http ADDR also serves the explorer page there (loopback only unless TLS is
given): pick a source under --data or a table, diagnose it once, then filter,
sort and page through every group and open any group's pictures and tests.
It logs in the same users, and each login has its own DuckDB connection.

SIGINT or SIGTERM stops accepting, lets running statements finish for
--grace, cancels (rolls back) what still runs, and closes the database.`,
		Example: `  PLUMB_USERS='ana:s3cret' plumb serve --data ./plumb-demo --listen 127.0.0.1:5433
  PGPASSWORD=s3cret psql 'host=127.0.0.1 port=5433 user=ana dbname=plumb' -c "SELECT shop, product, rank, violations FROM diagnose('shops.parquet', by := ['shop', 'product'], at := 'day', value := 'units') ORDER BY rank LIMIT 5"`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			var handler slog.Handler = slog.NewTextHandler(cmd.ErrOrStderr(), nil)
			if logFormat == "json" {
				handler = slog.NewJSONHandler(cmd.ErrOrStderr(), nil)
			}
			log := slog.New(handler)
			users := os.Getenv("PLUMB_USERS")
			if usersFile != "" {
				b, err := os.ReadFile(usersFile)
				if err != nil {
					return fmt.Errorf("users file: %w", err)
				}
				users = string(b)
			}
			var err error
			if cfg.Users, cfg.Roles, err = pgserver.ParseUsers(users); err != nil {
				return err
			}
			if cfg.DataDir != "" {
				if cfg.DataDir, err = filepath.Abs(cfg.DataDir); err != nil {
					return err
				}
			}
			if httpAddr == "" {
				return pgserver.Run(cmd.Context(), cfg, log, nil)
			}
			return pgserver.RunWith(cmd.Context(), cfg, log, nil, func(ctx context.Context, srv *pgserver.Server) error {
				return explorer.ServeBeside(ctx, srv, httpAddr, cfg, log)
			})
		},
	}
	f := cmd.Flags()
	f.StringVar(&cfg.Addr, "listen", cfg.Addr, "`host:port` to listen on")
	f.StringVar(&cfg.DataDir, "data", "", "the only `DIR`ectory clients may read and write files in; relative paths in SQL resolve against it")
	f.StringVar(&cfg.DBPath, "db", "", "DuckDB database `FILE` (default: in memory)")
	f.BoolVar(&cfg.ReadOnly, "read-only", false, "open --db read-only")
	f.StringVar(&cfg.Auth, "auth", "scram", "authentication: scram, or trust (loopback addresses only)")
	f.StringVar(&usersFile, "users", "", "`FILE` of user:password lines (else PLUMB_USERS)")
	f.StringVar(&cfg.TLSCert, "tls-cert", "", "TLS certificate `FILE` (PEM)")
	f.StringVar(&cfg.TLSKey, "tls-key", "", "TLS key `FILE` (PEM)")
	f.BoolVar(&cfg.TLSRequired, "tls-required", false, "refuse clients that do not use TLS (needs --tls-cert)")
	f.DurationVar(&cfg.AuthTimeout, "auth-timeout", 10*time.Second, "close a connection that has not logged in by then")
	f.DurationVar(&cfg.QueryTimeout, "query-timeout", 0, "cancel statements running longer (0: no limit)")
	f.IntVar(&cfg.MaxConns, "max-connections", 64, "most connections at once, logged in or not")
	f.StringVar(&cfg.MemoryLimit, "memory-limit", "", "DuckDB memory limit, e.g. 4GB")
	f.DurationVar(&cfg.Grace, "grace", cfg.Grace, "how long running statements may finish at shutdown")
	f.StringVar(&httpAddr, "http", "", "also serve the explorer page on `host:port` (e.g. 127.0.0.1:8080)")
	f.StringVar(&logFormat, "log-format", "text", "log lines as text or json")
	return cmd
}
