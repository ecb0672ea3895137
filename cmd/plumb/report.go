package main

import (
	"fmt"
	"os"

	"github.com/spf13/cobra"

	"github.com/plumb-sql/plumb/cmd/internal/diagnosis"
	"github.com/plumb-sql/plumb/cmd/internal/report"
)

func newReportCommand() *cobra.Command {
	var flags seriesFlags
	var top int
	var out string
	cmd := &cobra.Command{
		Use:   "report SOURCE --by COLUMNS --at COLUMN --value COLUMN -o report.html",
		Short: "Write a self-contained HTML report with pictures of the worst groups",
		Long: `Diagnoses every group of SOURCE and writes one HTML file: counts by verdict,
the ranked table, and for each of the top groups its series with a rolling
mean and a ±2 rolling standard deviation band, the series after its
recommended transform, and its autocorrelation with ±1.96/√n bounds. The file
needs nothing from the network.`,
		Example: `  plumb report plumb-demo/shops.parquet --by shop,product --at day --value units --period 7 --out report.html`,
		Args:    cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if out == "" {
				return fmt.Errorf("name the report file with --out (-o)")
			}
			ctx := cmd.Context()
			db, conn, err := flags.open(ctx, args[0])
			if err != nil {
				return err
			}
			defer db.Close()
			defer conn.Close()
			f, err := os.Create(out)
			if err != nil {
				return err
			}
			progress := diagnosis.StartProgress(cmd.ErrOrStderr(), flags.quiet)
			progress.CountGroups(ctx, db, flags.spec)
			rows, err := report.Render(ctx, conn, flags.spec, report.Options{Top: top}, f)
			progress.Stop()
			if cerr := f.Close(); err == nil {
				err = cerr
			}
			if err != nil {
				os.Remove(out)
				return err
			}
			if len(rows) == 0 {
				os.Remove(out)
				return fmt.Errorf("%s has no rows to report on", args[0])
			}
			fmt.Fprintf(cmd.OutOrStdout(), "report written to %s (%d groups shown)\n", out, len(rows))
			return nil
		},
	}
	flags.register(cmd)
	cmd.Flags().IntVar(&top, "top", 12, "groups to show with pictures")
	cmd.Flags().StringVarP(&out, "out", "o", "", "write the report to `FILE` (.html)")
	return cmd
}
