package main

import (
	"context"
	"database/sql"
	"fmt"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"github.com/plumb-sql/plumb/udf"
)

func newCombineCommand() *cobra.Command {
	var top int
	var out, dbPath, memoryLimit string
	cmd := &cobra.Command{
		Use:   "combine PARTS [--out FILE]",
		Short: "Rank together the parts plumb diagnose --shard wrote",
		Long: `Runs combine_diagnoses over PARTS (a glob of the Parquet files plumb diagnose
--shard K/N wrote, a table in --db, or a parenthesised SELECT): the q-values
and the rank are computed across all groups, so the rows equal those of one
plumb diagnose over the whole source. For Parquet files it first checks
that every shard 0 to N-1 is there, once. Prints the top groups and with
--out writes every group's row to a .parquet, .csv or .json file.`,
		Example: `  for k in 0 1 2 3; do plumb diagnose plumb-demo/shops.parquet --by shop,product --at day --value units --shard $k/4 --out parts/part-$k.parquet; done
  plumb combine 'parts/*.parquet' --out ranked.parquet`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			ctx := cmd.Context()
			opts := udf.Options{Path: dbPath, ReadOnly: dbPath != ""}
			if memoryLimit != "" {
				opts.Settings = map[string]string{"memory_limit": memoryLimit}
			}
			db, err := udf.Open(ctx, opts)
			if err != nil {
				return err
			}
			defer db.Close()
			conn, err := db.Conn(ctx)
			if err != nil {
				return err
			}
			defer conn.Close()
			source := args[0]
			if isParquet(source) {
				if err := checkParts(ctx, conn, source); err != nil {
					return err
				}
			}
			const table = "plumb_cli_combined"
			q := fmt.Sprintf("CREATE TEMP TABLE %s AS FROM combine_diagnoses(%s)", udf.QuoteIdent(table), udf.QuoteLiteral(source))
			if _, err := conn.ExecContext(ctx, q); err != nil {
				return fmt.Errorf("combine %s: %s", source, firstLine(err))
			}
			var n int
			if err := conn.QueryRowContext(ctx, "SELECT count(*) FROM "+udf.QuoteIdent(table)).Scan(&n); err != nil {
				return err
			}
			if n == 0 {
				return fmt.Errorf("%s holds no diagnosed group", source)
			}
			if out != "" {
				if err := writeTable(ctx, conn, table, out); err != nil {
					return err
				}
				fmt.Fprintf(cmd.ErrOrStderr(), "wrote %d groups to %s\n", n, out)
			}
			by, err := groupColumns(ctx, conn, table)
			if err != nil {
				return err
			}
			return printTop(ctx, conn, table, by, top, n, cmd)
		},
	}
	cmd.Flags().IntVar(&top, "top", 20, "print this many groups")
	cmd.Flags().StringVarP(&out, "out", "o", "", "write every group's row to `FILE` (.parquet, .csv or .json)")
	cmd.Flags().StringVar(&dbPath, "db", "", "DuckDB database `FILE` holding the parts' table (default: in memory)")
	cmd.Flags().StringVar(&memoryLimit, "memory-limit", "", "DuckDB's memory_limit, such as 4GB")
	return cmd
}

// isParquet tells a file path or glob of Parquet files from a table name or
// a SELECT.
func isParquet(source string) bool {
	s := strings.TrimSpace(source)
	return !strings.HasPrefix(s, "(") && strings.HasSuffix(strings.ToLower(s), ".parquet")
}

// checkParts reads the key-value metadata plumb diagnose --shard writes in
// each part and checks that every shard of one count is there exactly once:
// a missing part would silently change every q-value and lose its groups.
func checkParts(ctx context.Context, conn *sql.Conn, glob string) error {
	rows, err := conn.QueryContext(ctx, fmt.Sprintf(`
		SELECT file_name,
		       max(CASE WHEN decode(key) = '%s' THEN decode(value) END),
		       max(CASE WHEN decode(key) = '%s' THEN decode(value) END)
		FROM parquet_kv_metadata(%s)
		GROUP BY file_name
		UNION ALL
		SELECT file_name, NULL, NULL FROM parquet_file_metadata(%s)
		WHERE file_name NOT IN (SELECT file_name FROM parquet_kv_metadata(%s))
		ORDER BY file_name`, partShardKey, partShardsKey, udf.QuoteLiteral(glob), udf.QuoteLiteral(glob), udf.QuoteLiteral(glob)))
	if err != nil {
		return fmt.Errorf("read the parts %s: %s", glob, firstLine(err))
	}
	defer rows.Close()
	files := map[int][]string{}
	shards := -1
	for rows.Next() {
		var file string
		var shard, count sql.NullString
		if err := rows.Scan(&file, &shard, &count); err != nil {
			return err
		}
		k, errK := strconv.Atoi(shard.String)
		n, errN := strconv.Atoi(count.String)
		if !shard.Valid || !count.Valid || errK != nil || errN != nil {
			return fmt.Errorf("%s is not a part written by plumb diagnose --shard (it has no shard number)", file)
		}
		if shards >= 0 && n != shards {
			return fmt.Errorf("the parts come from different numbers of shards (%d and %d; %s is one of %d)", shards, n, file, n)
		}
		shards = n
		files[k] = append(files[k], file)
	}
	if err := rows.Err(); err != nil {
		return fmt.Errorf("read the parts %s: %s", glob, firstLine(err))
	}
	var missing []string
	for k := range shards {
		switch len(files[k]) {
		case 0:
			missing = append(missing, strconv.Itoa(k))
		case 1:
		default:
			return fmt.Errorf("shard %d of %d is there %d times: %s", k, shards, len(files[k]), strings.Join(files[k], ", "))
		}
	}
	switch {
	case len(missing) == 1:
		return fmt.Errorf("%s has no part for shard %s of 0-%d", glob, missing[0], shards-1)
	case len(missing) > 1:
		return fmt.Errorf("%s has no part for shards %s of 0-%d", glob, strings.Join(missing, ", "), shards-1)
	}
	return nil
}

// groupColumns are a combined table's columns before n: diagnose's rows
// start with the group columns.
func groupColumns(ctx context.Context, conn *sql.Conn, table string) ([]string, error) {
	rows, err := conn.QueryContext(ctx, "SELECT * FROM "+udf.QuoteIdent(table)+" LIMIT 0")
	if err != nil {
		return nil, err
	}
	cols, err := rows.Columns()
	rows.Close()
	if err != nil {
		return nil, err
	}
	if i := slices.Index(cols, "n"); i > 0 {
		return cols[:i], nil
	}
	return nil, fmt.Errorf("%s has no group columns before n", table)
}

func firstLine(err error) string {
	line, _, _ := strings.Cut(err.Error(), "\n")
	return strings.TrimSpace(line)
}
