// Package demo runs plumb's demo end to end: it generates the scenario,
// writes it to Parquet, runs the example SQL on it, materialises the
// transformed tables and says where every file went.
package demo

import (
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/plumb-sql/plumb/cmd/internal/demodata"
	"github.com/plumb-sql/plumb/cmd/internal/diagnosis"
	"github.com/plumb-sql/plumb/cmd/internal/output"
	"github.com/plumb-sql/plumb/cmd/internal/report"
	"github.com/plumb-sql/plumb/cmd/internal/statements"
	"github.com/plumb-sql/plumb/examples"
	"github.com/plumb-sql/plumb/udf"
)

// Config says where and how big.
type Config struct {
	Dir   string
	Seed  uint64
	Sizes demodata.Sizes
}

// Run performs the demo and writes its summary to w.
func Run(ctx context.Context, cfg Config, w io.Writer) error {
	if err := os.MkdirAll(cfg.Dir, 0o755); err != nil {
		return fmt.Errorf("demo directory: %w", err)
	}
	sets, err := demodata.Generate(cfg.Seed, cfg.Sizes)
	if err != nil {
		return err
	}
	db, err := udf.Open(ctx, udf.Options{})
	if err != nil {
		return err
	}
	defer db.Close()
	files, err := demodata.Write(ctx, db, cfg.Dir, sets)
	if err != nil {
		return err
	}

	fmt.Fprintf(w, "plumb demo (seed %d)\n\n", cfg.Seed)
	for _, ds := range sets {
		fmt.Fprintf(w, "%s: %d series, one per %s, each %d %ss of %s; planted behaviour per series:\n  %s\n",
			ds.Name, len(ds.Series), strings.Join(ds.KeyCol, " and "), seriesLength(ds), ds.AtCol, ds.ValCol, kindCounts(ds))
	}

	exs, err := examples.All()
	if err != nil {
		return err
	}
	conn, err := db.Conn(ctx)
	if err != nil {
		return err
	}
	defer conn.Close()
	for _, ex := range exs {
		fmt.Fprintf(w, "\n== %s (examples/%s)\n", ex.Title, ex.Name)
		for _, stmt := range statements.Split(ex.SQL) {
			if !returnsRows(stmt) {
				if _, err := conn.ExecContext(ctx, stmt); err != nil {
					return fmt.Errorf("example %s: %w", ex.Name, err)
				}
				continue
			}
			rows, err := conn.QueryContext(ctx, stmt)
			if err != nil {
				return fmt.Errorf("example %s: %w", ex.Name, err)
			}
			res, err := output.Read(rows)
			rows.Close()
			if err != nil {
				return fmt.Errorf("example %s: %w", ex.Name, err)
			}
			if err := output.Write(w, res, output.Table); err != nil {
				return err
			}
		}
	}

	outputs := []struct{ file, sql, what string }{
		{"shops_differenced.parquet",
			`FROM differenced('shops', by := ['shop', 'product'], at := 'day', value := 'units') ORDER BY shop, product, day`,
			"every shop series differenced once (first row of each series NULL)"},
		{"shops_diagnosis.parquet",
			`FROM diagnose('shops', by := ['shop', 'product'], at := 'day', value := 'units', period := 7)`,
			"one row per shop series: the verdict, the tests, q-values and rank"},
		{"shops_stationary.parquet",
			`FROM stationarize('shops', by := ['shop', 'product'], at := 'day', value := 'units', period := 7) ORDER BY shop, product, day`,
			"every shop series transformed by its own recipe"},
		{"shops_recipes.parquet",
			`FROM stationarize_recipes('shops', by := ['shop', 'product'], at := 'day', value := 'units', period := 7)`,
			"the recipes, to restore forecasts with restore()"},
	}
	var written [][2]string
	for _, o := range outputs {
		path := filepath.Join(cfg.Dir, o.file)
		copySQL := fmt.Sprintf("COPY (%s) TO '%s' (FORMAT parquet)", o.sql, strings.ReplaceAll(path, "'", "''"))
		if _, err := conn.ExecContext(ctx, copySQL); err != nil {
			return fmt.Errorf("materialise %s: %w", o.file, err)
		}
		written = append(written, [2]string{path, o.what})
	}

	reportPath := filepath.Join(cfg.Dir, "shops_report.html")
	rf, err := os.Create(reportPath)
	if err != nil {
		return err
	}
	spec := diagnosis.Spec{Source: "shops", By: []string{"shop", "product"}, At: "day", Value: "units", Period: 7}
	_, err = report.Render(ctx, conn, spec, report.Options{Top: 12, Title: "Stationarity of the co-operative's shop series (plumb demo)"}, rf)
	if cerr := rf.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return fmt.Errorf("demo report: %w", err)
	}
	written = append(written, [2]string{reportPath, "the HTML report: counts, ranking and pictures of the 12 worst shop series"})

	fmt.Fprintf(w, "\nFiles written:\n")
	for _, ds := range sets {
		f := files[ds.Name]
		fmt.Fprintf(w, "  %-40s %s\n", f.Data, "the "+ds.Name+" series")
		fmt.Fprintf(w, "  %-40s %s\n", f.Truth, "what was planted in each "+ds.Name+" series")
	}
	for _, f := range written {
		fmt.Fprintf(w, "  %-40s %s\n", f[0], f[1])
	}
	fmt.Fprintf(w, "\nOpen the report: %s\n", reportPath)
	fmt.Fprintf(w, "Try: go run ./cmd/plumb query \"%s\"\n", TrySQL(files["shops"].Data))
	return nil
}

// TrySQL is the query the demo suggests last: the five shop series
// furthest from stationary, in a handful of columns that fit a terminal.
func TrySQL(shops string) string {
	return fmt.Sprintf("SELECT rank, shop, product, violations, mean_cause, differences FROM diagnose('%s', "+
		"by := ['shop', 'product'], at := 'day', value := 'units', period := 7) ORDER BY rank LIMIT 5", strings.ReplaceAll(shops, "'", "''"))
}

func seriesLength(ds demodata.Dataset) int {
	if len(ds.Series) == 0 {
		return 0
	}
	return len(ds.Series[0].Values)
}

func kindCounts(ds demodata.Dataset) string {
	counts := map[demodata.Kind]int{}
	for _, s := range ds.Series {
		counts[s.Truth.Kind]++
	}
	var parts []string
	for _, k := range demodata.Kinds {
		parts = append(parts, fmt.Sprintf("%s %d", k, counts[k]))
	}
	return strings.Join(parts, ", ")
}

// returnsRows reports whether a statement is a query whose rows are worth
// printing (not CREATE, INSERT, COPY, SET and the like).
func returnsRows(stmt string) bool {
	for _, line := range strings.Split(stmt, "\n") {
		line = strings.TrimSpace(line)
		if line == "" || strings.HasPrefix(line, "--") {
			continue
		}
		word := strings.ToUpper(strings.Fields(line)[0])
		switch word {
		case "SELECT", "WITH", "FROM", "VALUES", "TABLE", "SUMMARIZE", "DESCRIBE", "SHOW", "EXPLAIN", "PIVOT", "UNPIVOT", "(":
			return true
		}
		return false
	}
	return false
}
