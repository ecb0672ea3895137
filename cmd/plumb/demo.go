package main

import (
	"github.com/spf13/cobra"

	"github.com/plumb-sql/plumb/cmd/internal/demo"
	"github.com/plumb-sql/plumb/cmd/internal/demodata"
)

func newDemoCommand() *cobra.Command {
	cfg := demo.Config{Dir: "plumb-demo", Seed: 1, Sizes: demodata.DefaultSizes}
	cmd := &cobra.Command{
		Use:   "demo",
		Short: "Generate the demo scenario, run the examples on it and write the results",
		Long: `Generates the demo scenario (a grocery co-operative's daily unit sales per
shop and product line, and a fleet of refrigerated containers' hourly
temperatures), each series with one planted behaviour and the truth written
beside it; writes it to Parquet; runs the SQL in examples/; materialises a
differenced table; and says where every file went. The same seed and sizes
always give the same data.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return demo.Run(cmd.Context(), cfg, cmd.OutOrStdout())
		},
	}
	f := cmd.Flags()
	f.StringVar(&cfg.Dir, "dir", cfg.Dir, "write the demo files to `DIR`")
	f.Uint64Var(&cfg.Seed, "seed", cfg.Seed, "random seed")
	f.IntVar(&cfg.Sizes.Shops, "shops", cfg.Sizes.Shops, "number of shops")
	f.IntVar(&cfg.Sizes.Products, "products", cfg.Sizes.Products, "product lines per shop (at most 8)")
	f.IntVar(&cfg.Sizes.Days, "days", cfg.Sizes.Days, "days of sales per series")
	f.IntVar(&cfg.Sizes.Containers, "containers", cfg.Sizes.Containers, "number of containers")
	f.IntVar(&cfg.Sizes.Hours, "hours", cfg.Sizes.Hours, "hours of temperatures per container")
	return cmd
}
