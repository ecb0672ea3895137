// Command plumb diagnoses the stationarity of many grouped time series with
// SQL: it embeds DuckDB with plumb's functions registered.
package main

import (
	"fmt"
	"os"
)

func main() {
	if err := newRootCommand().Execute(); err != nil {
		fmt.Fprintln(os.Stderr, "plumb:", err)
		os.Exit(1)
	}
}
