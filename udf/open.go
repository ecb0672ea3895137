package udf

import (
	"context"
	"database/sql"
	"database/sql/driver"
	"fmt"
	"net/url"
	"strings"
	"sync"
	"sync/atomic"
	"text/template"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/stats/defaults"
)

// Options say which database to open and how.
type Options struct {
	// Path is the database file; empty means an in-memory database.
	Path string
	// ReadOnly opens the file read-only (ignored for in-memory databases).
	ReadOnly bool
	// Settings are DuckDB configuration options applied at start-up, such
	// as "threads" or "memory_limit".
	Settings map[string]string
	// MemoryLimit, in bytes, bounds the list arguments plumb's functions
	// accept (maxListValues); 0: no bound. It does not set DuckDB's own
	// memory_limit.
	MemoryLimit int64
}

// Open opens a DuckDB database with every plumb function registered.
// Scalar functions are registered once on the database; the macros that give
// them named options, and the table macros, are created as TEMP macros on
// every connection as it opens, so they are there on every connection of the
// returned pool and never stored in a database file.
func Open(ctx context.Context, opts Options) (*sql.DB, error) {
	dsn := opts.Path
	query := url.Values{}
	if opts.ReadOnly && opts.Path != "" {
		query.Set("access_mode", "read_only")
	}
	for k, v := range opts.Settings {
		query.Set(k, v)
	}
	if len(query) > 0 {
		dsn += "?" + query.Encode()
	}
	var ready atomic.Bool
	connector, err := duckdb.NewConnector(dsn, func(execer driver.ExecerContext) error {
		if !ready.Load() {
			return nil // the first connection: Open creates its macros below
		}
		return createMacros(ctx, execer)
	})
	if err != nil {
		return nil, fmt.Errorf("open database %q: %w", displayPath(opts.Path), err)
	}
	db := sql.OpenDB(connector)
	if err := registerAll(ctx, db, &ready, opts.MemoryLimit); err != nil {
		db.Close()
		return nil, err
	}
	return db, nil
}

func displayPath(p string) string {
	if p == "" {
		return ":memory:"
	}
	return p
}

// registerAll registers every scalar function through the pool's first
// connection, creates the macros on it, and then sets ready so that every
// later connection creates its own macros as it opens. DuckDB binds a macro
// body when the macro is created, so the functions must come first.
func registerAll(ctx context.Context, db *sql.DB, ready *atomic.Bool, memoryLimit int64) error {
	conn, err := db.Conn(ctx)
	if err != nil {
		return fmt.Errorf("udf: connect: %w", err)
	}
	defer conn.Close()
	functions, err := allFunctions()
	if err != nil {
		return err
	}
	for _, f := range functions {
		f.maxList = maxListValues(memoryLimit)
	}
	if err := register(conn, functions); err != nil {
		return err
	}
	err = conn.Raw(func(driverConn any) error {
		execer, ok := driverConn.(driver.ExecerContext)
		if !ok {
			return fmt.Errorf("udf: connection %T cannot execute statements", driverConn)
		}
		return createMacros(ctx, execer)
	})
	if err != nil {
		return err
	}
	ready.Store(true)
	return nil
}

// family is one SQL function, or a family of them, and its file: the Go
// file udf/<name>.go holds its registration (functions), its argument
// checks and a line naming where its maths lives; udf/sql/<name>.sql, a
// template rendered with package defaults, creates its macros (TEMP
// macros that give the Go functions named options and defaults).
// Families without macros hold plumb's internal plumb_* helpers.
type family struct {
	name      string
	functions func(*types) []*function
	macros    string
}

// families lists every family plumb registers, in registration order.
var families = []family{
	{"timeaxis", timeAxisFunctions, ""},
	{"difference", differenceFunctions, differenceMacros},
	{"differenced", differencedFunctions, differencedMacros},
	{"unit_root", unitRootFunctions, unitRootMacros},
	{"stability", stabilityFunctions, stabilityMacros},
	{"seasonality", seasonalityFunctions, seasonalityMacros},
	{"white_noise", whiteNoiseFunctions, whiteNoiseMacros},
	{"rolling", rollingFunctions, rollingMacros},
	{"box_cox", boxCoxFunctions, boxCoxMacros},
	{"stationarity", stationarityFunctions, stationarityMacros},
	{"outlier_positions", outlierPositionsFunctions, outlierPositionsMacros},
	{"demand_profile", demandProfileFunctions, demandProfileMacros},
	{"zivot_andrews", zivotAndrewsFunctions, zivotAndrewsMacros},
	{"mean_break", meanBreakFunctions, meanBreakMacros},
	{"diagnose", diagnoseFunctions, diagnoseMacros},
	{"rolling_dispersion", rollingDispersionFunctions, rollingDispersionMacros},
	{"stationarize", stationarizeFunctions, stationarizeMacros},
	{"restore", restoreFunctions, restoreMacros},
	{"forecast", forecastFunctions, forecastMacros},
	{"batches", batchFunctions, ""},
	{"combine_diagnoses", combineDiagnosesFunctions, combineDiagnosesMacros},
	{"columns", columnsFunctions, ""},
}

// allFunctions lists every Go scalar function plumb registers.
func allFunctions() ([]*function, error) {
	t := &types{}
	var all []*function
	for _, f := range families {
		all = append(all, f.functions(t)...)
	}
	for _, f := range all {
		if strings.HasSuffix(f.name, "_sql") {
			raiseInSQL(f)
		}
	}
	return all, t.err
}

// raiseInSQL makes a function that writes a table function's query (the
// plumb_<name>_sql functions) answer a bad argument with a query that
// raises it through SQL's error(): the user then reads "Invalid Input
// Error: period must be at least 2, ...", the same words the commands
// print, instead of the message behind duckdb-go's prefix for a Go
// function's error ("database/sql/driver: API error: plumb_diagnose_sql:").
func raiseInSQL(f *function) {
	eval := f.eval
	f.eval = func(args []driver.Value) (any, error) {
		v, err := eval(args)
		if err != nil {
			return "SELECT error(" + quoteLiteral(err.Error()) + ")", nil
		}
		return v, nil
	}
}

// macros is the SQL that creates plumb's TEMP macros on a connection: every
// family's template, rendered with the defaults.
var macros = func() string {
	var b strings.Builder
	for _, f := range families {
		if f.macros == "" {
			continue
		}
		tmpl, err := template.New(f.name).Option("missingkey=error").Parse(f.macros)
		if err == nil {
			err = tmpl.Execute(&b, defaults.SQL())
		}
		if err != nil {
			// A template is fixed at build time: every test that opens a
			// database fails on it.
			return fmt.Sprintf("SELECT error('udf: macros of %s: %s')", f.name, strings.ReplaceAll(err.Error(), "'", "''"))
		}
		b.WriteString("\n")
	}
	return b.String()
}()

var (
	qualifiedOnce   sync.Once
	qualifiedMacros string
)

// createMacros creates plumb's TEMP macros on one connection, with every
// call of a plumb scalar function qualified (qualifyCalls).
func createMacros(ctx context.Context, execer driver.ExecerContext) error {
	qualifiedOnce.Do(func() { qualifiedMacros = qualifyCalls(macros) })
	if _, err := execer.ExecContext(ctx, qualifiedMacros, nil); err != nil {
		return fmt.Errorf("udf: create macros: %w", err)
	}
	return nil
}
