package udf

import (
	"context"
	"database/sql"
	"strings"
	"testing"
)

// openTest opens an in-memory database limited to one connection, so that
// TEMP tables made by one statement are seen by the next.
func openTest(t *testing.T) *sql.DB {
	t.Helper()
	db, err := Open(context.Background(), Options{})
	if err != nil {
		t.Fatal(err)
	}
	db.SetMaxOpenConns(1)
	t.Cleanup(func() { db.Close() })
	return db
}

func exec(t *testing.T, db *sql.DB, q string) {
	t.Helper()
	if _, err := db.Exec(q); err != nil {
		t.Fatalf("%s: %v", q, err)
	}
}

// queryString runs a query returning one value and renders it as DuckDB's VARCHAR.
func queryString(t *testing.T, db *sql.DB, q string) string {
	t.Helper()
	var s sql.NullString
	if err := db.QueryRow("SELECT (" + q + ")::VARCHAR").Scan(&s); err != nil {
		t.Fatalf("%s: %v", q, err)
	}
	if !s.Valid {
		return "NULL"
	}
	return s.String
}

// queryError runs q and returns its error message, failing if there is none.
func queryError(t *testing.T, db *sql.DB, q string) string {
	t.Helper()
	rows, err := db.Query(q)
	if err == nil {
		for rows.Next() {
		}
		err = rows.Err()
		rows.Close()
	}
	if err == nil {
		t.Fatalf("%s: no error", q)
	}
	return err.Error()
}

func TestOpenRegistersEverything(t *testing.T) {
	db := openTest(t)
	rows, err := db.Query(`SELECT DISTINCT function_name, function_type FROM duckdb_functions()
		WHERE function_name LIKE 'plumb_%' OR (function_type IN ('macro', 'table_macro') AND schema_name = 'main' AND database_name = 'temp')`)
	if err != nil {
		t.Fatal(err)
	}
	defer rows.Close()
	got := map[string]string{}
	for rows.Next() {
		var name, kind string
		if err := rows.Scan(&name, &kind); err != nil {
			t.Fatal(err)
		}
		got[name] = kind
	}
	functions, err := allFunctions()
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range functions {
		if got[f.name] != "scalar" {
			t.Errorf("scalar function %s: registered as %q", f.name, got[f.name])
		}
	}
	for name, kind := range map[string]string{
		"difference": "macro", "undifference": "macro", "differenced": "table_macro", "unit_root": "macro",
		"stability": "macro", "seasonality": "macro", "white_noise": "macro", "rolling_spread": "macro",
		"rolling_mean": "macro", "box_cox": "macro", "inverse_box_cox": "macro", "box_cox_lambda": "macro",
		"stationarity": "macro", "outlier_positions": "macro", "demand_profile": "macro", "zivot_andrews": "macro", "mean_break": "macro", "diagnose": "table_macro", "rolling_dispersion": "table_macro",
		"stationarize": "table_macro", "stationarize_recipes": "table_macro", "restore": "table_macro",
		"forecast": "table_macro", "forecast_models": "table_macro",
		"combine_diagnoses": "table_macro",
	} {
		if got[name] != kind {
			t.Errorf("%s: registered as %q, want %q", name, got[name], kind)
		}
	}
}

// TestMacrosOnEveryConnection checks that a connection opened after the
// first one has the macros too.
func TestMacrosOnEveryConnection(t *testing.T) {
	db, err := Open(context.Background(), Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	ctx := context.Background()
	var conns []*sql.Conn
	for range 3 {
		c, err := db.Conn(ctx)
		if err != nil {
			t.Fatal(err)
		}
		conns = append(conns, c)
	}
	for i, c := range conns {
		var s string
		if err := c.QueryRowContext(ctx, "SELECT difference([1, 3, 6])::VARCHAR").Scan(&s); err != nil {
			t.Errorf("connection %d: %v", i, err)
		} else if s != "[2.0, 3.0]" {
			t.Errorf("connection %d: %s", i, s)
		}
		c.Close()
	}
}

// TestOpenFileStoresNoMacros checks that plumb's macros are TEMP: a database
// file written through plumb holds only the user's tables.
func TestOpenFileStoresNoMacros(t *testing.T) {
	path := t.TempDir() + "/x.duckdb"
	db, err := Open(context.Background(), Options{Path: path})
	if err != nil {
		t.Fatal(err)
	}
	exec(t, db, "CREATE TABLE kept AS SELECT 1 AS a")
	db.Close()
	db, err = Open(context.Background(), Options{Path: path, ReadOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	if got := queryString(t, db, "SELECT count(*) FROM duckdb_functions() WHERE database_name = 'x'"); got != "0" {
		t.Errorf("the file holds %s functions or macros", got)
	}
	if got := queryString(t, db, "SELECT a FROM kept"); got != "1" {
		t.Errorf("table kept: %s", got)
	}
	if msg := queryError(t, db, "CREATE TABLE t2 AS SELECT 1"); !strings.Contains(msg, "read-only") {
		t.Errorf("writing a read-only file: %s", msg)
	}
}
