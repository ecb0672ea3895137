package main

import (
	"context"
	"database/sql"
	"fmt"
	"io"
	"strings"

	"github.com/spf13/cobra"

	"github.com/plumb-sql/plumb/cmd/internal/output"
	"github.com/plumb-sql/plumb/stats/defaults"
	"github.com/plumb-sql/plumb/udf"
)

func newForecastCommand() *cobra.Command {
	var flags seriesFlags
	var horizon, holdout, top int
	var coverage float64
	var point string
	var out string
	cmd := &cobra.Command{
		Use:   "forecast SOURCE --by COLUMNS --at COLUMN --value COLUMN",
		Short: "Forecast every group through its own recipe, with prediction intervals in original units",
		Long: `Runs the forecast table function over SOURCE (a Parquet or CSV file or glob, a
table in --db, or a parenthesised SELECT): each group is judged, made
stationary by its own recipe, fitted with an autoregression (order by AIC),
forecast --horizon steps ahead with a central --coverage interval, and brought
back to original units. Prints the first rows and, with --out, writes every
row to a .parquet, .csv or .json file. With --holdout K the last K values of
each group are held out instead: the rows show them beside their forecasts,
and the summary gives each group's mean absolute scaled error and interval
coverage.`,
		Example: `  plumb forecast plumb-demo/shops.parquet --by shop,product --at day --value units --period 7 --horizon 14 --out f.parquet
  plumb forecast plumb-demo/shops.parquet --by shop,product --at day --value units --period 7 --holdout 28`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			ctx := cmd.Context()
			flags.spec.Function = "forecast"
			db, conn, err := flags.open(ctx, args[0])
			if err != nil {
				return err
			}
			defer db.Close()
			defer conn.Close()
			s := flags.spec
			call := func(fn string) string {
				return fmt.Sprintf("%s(%s, horizon := %d, coverage := %v, holdout := %d, point := %s)",
					fn, s.Args(), horizon, coverage, holdout, udf.QuoteLiteral(point))
			}
			const table = "plumb_cli_forecast"
			if _, err := conn.ExecContext(ctx, "CREATE OR REPLACE TEMP TABLE "+table+" AS FROM "+call("forecast")); err != nil {
				msg, _, _ := strings.Cut(err.Error(), "\n")
				return fmt.Errorf("forecast %s: %s", s.Source, msg)
			}
			if out != "" {
				if err := writeTable(ctx, conn, table, out); err != nil {
					return err
				}
			}
			w := cmd.OutOrStdout()
			if holdout > 0 {
				q := fmt.Sprintf(`SELECT count(*) AS groups, round(median(mase), 3) AS median_mase,
					round(avg(interval_coverage), 3) AS mean_interval_coverage, count(*) FILTER (WHERE mase IS NULL) AS not_scored
					FROM %s`, call("forecast_models"))
				if err := printQuery(ctx, conn, w, q, fmt.Sprintf("held out the last %d values of each group:\n", holdout)); err != nil {
					return err
				}
			}
			q := fmt.Sprintf("SELECT * FROM %s LIMIT %d", table, top)
			return printQuery(ctx, conn, w, q, fmt.Sprintf("the first %d rows:\n", top))
		},
	}
	flags.register(cmd)
	fl := cmd.Flags()
	fl.IntVar(&horizon, "horizon", defaults.Horizon, "steps to forecast")
	fl.Float64Var(&coverage, "coverage", defaults.Coverage, "coverage of the central prediction interval, between 0 and 1")
	fl.IntVar(&holdout, "holdout", defaults.Holdout, "hold out the last `K` values of each group and forecast them (0: none)")
	fl.StringVar(&point, "point", defaults.Point, "the point forecast in original units after a Box-Cox transform: median or mean")
	fl.IntVar(&top, "top", 20, "print this many rows")
	fl.StringVarP(&out, "out", "o", "", "write every row to `FILE` (.parquet, .csv or .json)")
	return cmd
}

// printQuery prints a heading and a query's result as an aligned table.
func printQuery(ctx context.Context, conn *sql.Conn, w io.Writer, q, heading string) error {
	rows, err := conn.QueryContext(ctx, q)
	if err != nil {
		msg, _, _ := strings.Cut(err.Error(), "\n")
		return fmt.Errorf("%s", msg)
	}
	res, err := output.Read(rows)
	rows.Close()
	if err != nil {
		return err
	}
	fmt.Fprint(w, heading)
	return output.Write(w, res, output.Table)
}
