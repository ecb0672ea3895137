package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"strings"

	"github.com/spf13/cobra"

	"github.com/plumb-sql/plumb/cmd/internal/output"
	"github.com/plumb-sql/plumb/cmd/internal/statements"
	"github.com/plumb-sql/plumb/udf"
)

func newQueryCommand() *cobra.Command {
	var file, dbPath, format string
	cmd := &cobra.Command{
		Use:   "query [SQL]",
		Short: "Run SQL statements with plumb's functions",
		Long: `Runs SQL statements in order on one connection, printing each result.
The SQL comes from the argument, from a file (-f), or from standard input.
On an error, DuckDB's message goes to standard error and plumb exits non-zero;
statements before it have run. With --db naming a file that does not exist yet,
the database is created, and kept only if every statement succeeds.

The examples run after plumb demo, from the folder it ran in (the repository,
for examples/).`,
		Example: `  plumb query "SELECT difference([1, 4, 9, 16])"
  plumb query --db demo.duckdb "CREATE OR REPLACE TABLE containers AS FROM 'plumb-demo/containers.parquet'"
  plumb query --db demo.duckdb -f examples/02_differenced_containers.sql
  echo "SELECT shop, product, day, differenced_value FROM differenced('plumb-demo/shops.parquet', by := ['shop', 'product'], at := 'day', value := 'units', lag := 7) LIMIT 5" | plumb query --format csv`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			f, err := output.ParseFormat(format)
			if err != nil {
				return err
			}
			script, err := readScript(args, file, cmd.InOrStdin())
			if err != nil {
				return err
			}
			created := false
			if dbPath != "" {
				_, err := os.Stat(dbPath)
				created = errors.Is(err, fs.ErrNotExist)
			}
			db, err := udf.Open(cmd.Context(), udf.Options{Path: dbPath})
			if err != nil {
				return err
			}
			err = runScript(cmd.Context(), db, script, cmd.OutOrStdout(), f)
			if cerr := db.Close(); err == nil {
				err = cerr
			}
			switch {
			case created && err != nil:
				// A failed script leaves no new, half-written database behind.
				os.Remove(dbPath)
				os.Remove(dbPath + ".wal")
				return fmt.Errorf("%w\n%s was not created, since the script failed", err, dbPath)
			case created:
				fmt.Fprintf(cmd.ErrOrStderr(), "created the database %s\n", dbPath)
			}
			return err
		},
	}
	cmd.Flags().StringVarP(&file, "file", "f", "", "read the SQL from `FILE`")
	cmd.Flags().StringVar(&dbPath, "db", "", "DuckDB database `FILE` (default: in memory)")
	cmd.Flags().StringVar(&format, "format", "table", "output format: table, csv or json (one object a line)")
	return cmd
}

func readScript(args []string, file string, stdin io.Reader) (string, error) {
	switch {
	case len(args) == 1 && file != "":
		return "", fmt.Errorf("give the SQL as an argument or with -f, not both")
	case len(args) == 1:
		return args[0], nil
	case file != "":
		b, err := os.ReadFile(file)
		return string(b), err
	default:
		b, err := io.ReadAll(stdin)
		return string(b), err
	}
}

// runScript runs each statement of script on one connection, so that TEMP
// tables and transactions carry from one statement to the next, and writes
// every result to w.
func runScript(ctx context.Context, db sqlDB, script string, w io.Writer, f output.Format) error {
	stmts := statements.Split(script)
	if len(stmts) == 0 {
		return fmt.Errorf("no SQL statement given")
	}
	conn, err := db.Conn(ctx)
	if err != nil {
		return err
	}
	defer conn.Close()
	for i, s := range stmts {
		rows, err := conn.QueryContext(ctx, s)
		if err != nil {
			return statementError(i, len(stmts), s, err)
		}
		res, err := output.Read(rows)
		rows.Close()
		if err != nil {
			return statementError(i, len(stmts), s, err)
		}
		if i > 0 && f == output.Table {
			fmt.Fprintln(w)
		}
		if err := output.Write(w, res, f); err != nil {
			return err
		}
	}
	return nil
}

func statementError(i, n int, stmt string, err error) error {
	if n == 1 {
		return err
	}
	first, _, _ := strings.Cut(stmt, "\n")
	if len(first) > 60 {
		first = first[:60] + "..."
	}
	return fmt.Errorf("statement %d of %d (%s): %w", i+1, n, first, err)
}
