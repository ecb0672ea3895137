package main

import (
	"context"
	"database/sql"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"github.com/plumb-sql/plumb/cmd/internal/diagnosis"
	"github.com/plumb-sql/plumb/cmd/internal/output"
	"github.com/plumb-sql/plumb/stats/defaults"
	"github.com/plumb-sql/plumb/udf"
)

// seriesFlags are the flags plumb diagnose and plumb report share.
type seriesFlags struct {
	spec        diagnosis.Spec
	by          string
	dbPath      string
	memoryLimit string
	quiet       bool
	flags       *pflag.FlagSet
}

func (f *seriesFlags) register(cmd *cobra.Command) {
	fl := cmd.Flags()
	f.flags = fl
	fl.StringVar(&f.by, "by", "", "group `COLUMNS`, comma-separated (required)")
	fl.StringVar(&f.spec.At, "at", "", "time `COLUMN`: DATE, TIMESTAMP or integer (required)")
	fl.StringVar(&f.spec.Value, "value", "", "value `COLUMN` (required)")
	fl.IntVar(&f.spec.Period, "period", 0, "seasonal period, at least 2 (left out: detected among "+defaults.PeriodList()+")")
	fl.Float64Var(&f.spec.Alpha, "alpha", defaults.Alpha, "level of the verdict's tests")
	fl.StringVar(&f.spec.Fill, "fill", defaults.Fill, "gaps and missing values: none, linear or previous")
	fl.StringVar(&f.dbPath, "db", "", "DuckDB database `FILE` holding the source table (default: in memory)")
	fl.StringVar(&f.memoryLimit, "memory-limit", "", "DuckDB's memory_limit, such as 4GB (default: DuckDB's, 80% of the machine's memory); the groups are taken in batches that fit")
	fl.BoolVar(&f.quiet, "quiet", false, "no progress display")
}

// settings are the DuckDB settings the flags ask for.
func (f *seriesFlags) settings() map[string]string {
	if f.memoryLimit == "" {
		return nil
	}
	return map[string]string{"memory_limit": f.memoryLimit}
}

// open opens the database, checks the source and returns a connection.
func (f *seriesFlags) open(ctx context.Context, source string) (*sql.DB, *sql.Conn, error) {
	f.spec.Source = source
	f.spec.By = nil
	for _, b := range strings.Split(f.by, ",") {
		if b = strings.TrimSpace(b); b != "" {
			f.spec.By = append(f.spec.By, b)
		}
	}
	// The options are checked as SQL checks them (udf's checks): a period
	// given must be at least 2, and --alpha 0 is refused, not replaced.
	var period *int
	if f.flags != nil && f.flags.Changed("period") {
		period = &f.spec.Period
	}
	if err := udf.CheckPeriod(period); err != nil {
		return nil, nil, err
	}
	if err := udf.CheckAlpha(f.spec.Alpha); err != nil {
		return nil, nil, err
	}
	db, err := udf.Open(ctx, udf.Options{Path: f.dbPath, ReadOnly: f.dbPath != "", Settings: f.settings()})
	if err != nil {
		return nil, nil, err
	}
	conn, err := db.Conn(ctx)
	if err != nil {
		db.Close()
		return nil, nil, err
	}
	if err := f.spec.Check(ctx, conn); err != nil {
		conn.Close()
		db.Close()
		return nil, nil, err
	}
	return db, conn, nil
}

func newDiagnoseCommand() *cobra.Command {
	var flags seriesFlags
	var top int
	var out, shard string
	cmd := &cobra.Command{
		Use:   "diagnose SOURCE --by COLUMNS --at COLUMN --value COLUMN",
		Short: "Diagnose every group of a source and print the ones furthest from stationary",
		Long: `Runs the diagnose table function over SOURCE (a Parquet or CSV file or glob, a
table in --db, or a parenthesised SELECT), prints the top groups as a table,
and with --out writes every group's row to a .parquet, .csv or .json file.

With --shard K/N it diagnoses only the groups of shard K of N (a stable hash
of the group columns, the same on every machine) and writes them, unranked,
to the Parquet file --out names; plumb combine ranks the N parts together.`,
		Example: `  plumb diagnose plumb-demo/shops.parquet --by shop,product --at day --value units --period 7
  plumb diagnose plumb-demo/shops.parquet --by shop,product --at day --value units --top 5 --out ranked.csv
  plumb diagnose plumb-demo/shops.parquet --by shop,product --at day --value units --shard 3/4 --out parts/part-3.parquet`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if shard != "" {
				k, n, err := parseShard(shard)
				if err != nil {
					return err
				}
				if strings.ToLower(filepath.Ext(out)) != ".parquet" {
					return fmt.Errorf("--shard writes a part for plumb combine: name a .parquet file with --out")
				}
				flags.spec.Shard, flags.spec.Shards = k, n
			}
			ctx := cmd.Context()
			db, conn, err := flags.open(ctx, args[0])
			if err != nil {
				return err
			}
			defer db.Close()
			defer conn.Close()
			const table = "plumb_cli_diagnosis"
			progress := diagnosis.StartProgress(cmd.ErrOrStderr(), flags.quiet)
			progress.CountGroups(ctx, db, flags.spec)
			n, err := flags.spec.Materialize(ctx, conn, table)
			progress.Stop()
			if err != nil {
				return err
			}
			if flags.spec.Shards > 0 {
				// A shard may hold no group; its empty part still tells
				// plumb combine that the shard was done.
				if err := writePart(ctx, conn, table, out, flags.spec.Shard, flags.spec.Shards); err != nil {
					return err
				}
				fmt.Fprintf(cmd.OutOrStdout(), "shard %d of %d: %d groups diagnosed, written to %s\n", flags.spec.Shard, flags.spec.Shards, n, out)
				return nil
			}
			if n == 0 {
				return fmt.Errorf("%s has no rows to diagnose", args[0])
			}
			if out != "" {
				if err := writeTable(ctx, conn, table, out); err != nil {
					return err
				}
				fmt.Fprintf(cmd.ErrOrStderr(), "wrote %d groups to %s\n", n, out)
			}
			return printTop(ctx, conn, table, flags.spec.By, top, n, cmd)
		},
	}
	flags.register(cmd)
	cmd.Flags().IntVar(&top, "top", 20, "print this many groups")
	cmd.Flags().StringVarP(&out, "out", "o", "", "write every group's row to `FILE` (.parquet, .csv or .json)")
	cmd.Flags().StringVar(&shard, "shard", "", "diagnose only shard `K/N` (0 <= K < N) and write it, unranked, to --out FILE.parquet for plumb combine")
	return cmd
}

// parseShard reads --shard K/N.
func parseShard(s string) (k, n int, err error) {
	ks, ns, ok := strings.Cut(s, "/")
	if ok {
		k, err = strconv.Atoi(strings.TrimSpace(ks))
		if err == nil {
			n, err = strconv.Atoi(strings.TrimSpace(ns))
		}
	}
	if !ok || err != nil {
		return 0, 0, fmt.Errorf("--shard %s: write the shard as K/N, such as 3/8 for shard 3 of 8", s)
	}
	if n < 1 {
		return 0, 0, fmt.Errorf("--shard %s: the number of shards must be at least 1", s)
	}
	if k < 0 || k >= n {
		return 0, 0, fmt.Errorf("--shard %s: the shard must be between 0 and %d", s, n-1)
	}
	return k, n, nil
}

// writeTable copies a table to a file whose format its extension names.
func writeTable(ctx context.Context, conn *sql.Conn, table, path string) error {
	format := map[string]string{".parquet": "parquet", ".csv": "csv", ".json": "json"}[strings.ToLower(filepath.Ext(path))]
	if format == "" {
		return fmt.Errorf("--out %s: use a .parquet, .csv or .json file", path)
	}
	q := fmt.Sprintf("COPY %s TO %s (FORMAT %s)", udf.QuoteIdent(table), udf.QuoteLiteral(path), format)
	if _, err := conn.ExecContext(ctx, q); err != nil {
		msg, _, _ := strings.Cut(err.Error(), "\n")
		return fmt.Errorf("write %s: %s", path, msg)
	}
	return nil
}

// writePart copies a table of one shard's rows to a Parquet file with the
// shard's number and count in the file's key-value metadata, where plumb
// combine checks that every shard is there once. A missing folder is
// created.
func writePart(ctx context.Context, conn *sql.Conn, table, path string, shard, shards int) error {
	// Parts go to a folder of their own (--out parts/part-3.parquet).
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	q := fmt.Sprintf("COPY %s TO %s (FORMAT parquet, KV_METADATA {%s: '%d', %s: '%d'})", udf.QuoteIdent(table), udf.QuoteLiteral(path),
		partShardKey, shard, partShardsKey, shards)
	if _, err := conn.ExecContext(ctx, q); err != nil {
		msg, _, _ := strings.Cut(err.Error(), "\n")
		return fmt.Errorf("write %s: %s", path, msg)
	}
	return nil
}

// The key-value metadata of a part's Parquet file.
const (
	partShardKey  = "plumb_shard"
	partShardsKey = "plumb_shards"
)

func printTop(ctx context.Context, conn *sql.Conn, table string, groupColumns []string, top, n int, cmd *cobra.Command) error {
	by := make([]string, len(groupColumns))
	for i, b := range groupColumns {
		by[i] = udf.QuoteIdent(b)
	}
	q := fmt.Sprintf(`SELECT rank, %s, n, status, array_to_string(violations, ',') AS violations, %s AS causes,
		differences AS d, seasonal_differences AS "D", round(box_cox_lambda, 2) AS lambda, cured, round(score, 3) AS score,
		round(kpss_q_value, 4) AS kpss_q, round(mean_q_value, 4) AS mean_q, round(spread_q_value, 4) AS spread_q
		FROM %s ORDER BY rank LIMIT %d`, strings.Join(by, ", "), diagnosis.CausesSQL, udf.QuoteIdent(table), top)
	rows, err := conn.QueryContext(ctx, q)
	if err != nil {
		return err
	}
	res, err := output.Read(rows)
	rows.Close()
	if err != nil {
		return err
	}
	fmt.Fprintf(cmd.OutOrStdout(), "%d groups diagnosed; the %d furthest from stationary:\n", n, min(top, n))
	return output.Write(cmd.OutOrStdout(), res, output.Table)
}
