package main

import "github.com/spf13/cobra"

func newRootCommand() *cobra.Command {
	root := &cobra.Command{
		Use:   "plumb",
		Short: "Stationarity diagnosis of many grouped time series, in SQL",
		Long: `plumb embeds DuckDB and adds SQL functions that test, transform and restore
thousands of grouped time series in one query: unit-root and stationarity
tests, differencing and its inverse, and table functions over whole sources.`,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.AddCommand(newDemoCommand(), newQueryCommand(), newDiagnoseCommand(), newForecastCommand(), newReportCommand(), newServeCommand(), newBenchCommand(), newCombineCommand())
	return root
}
