package demodata

import (
	"context"
	"database/sql"
	"database/sql/driver"
	"fmt"
	"path/filepath"
	"strings"
	"time"

	"github.com/duckdb/duckdb-go/v2"

	"github.com/plumb-sql/plumb/udf"
)

// Files are the Parquet files written for one dataset.
type Files struct {
	Data  string // the series
	Truth string // one row per group: what was planted
}

// Write loads each dataset into a table of its name in db, with its truth in
// <name>_truth, and copies both to Parquet files in dir.
func Write(ctx context.Context, db *sql.DB, dir string, sets []Dataset) (map[string]Files, error) {
	conn, err := db.Conn(ctx)
	if err != nil {
		return nil, err
	}
	defer conn.Close()
	out := map[string]Files{}
	for _, ds := range sets {
		if err := load(ctx, conn, ds); err != nil {
			return nil, fmt.Errorf("demo %s: %w", ds.Name, err)
		}
		files := Files{
			Data:  filepath.Join(dir, ds.Name+".parquet"),
			Truth: filepath.Join(dir, ds.Name+"_truth.parquet"),
		}
		for table, path := range map[string]string{ds.Name: files.Data, ds.Name + "_truth": files.Truth} {
			q := fmt.Sprintf("COPY %s TO '%s' (FORMAT parquet)", table, strings.ReplaceAll(path, "'", "''"))
			if _, err := conn.ExecContext(ctx, q); err != nil {
				return nil, fmt.Errorf("demo %s: write %s: %w", ds.Name, path, err)
			}
		}
		out[ds.Name] = files
	}
	return out, nil
}

// load creates and fills the dataset's data and truth tables.
func load(ctx context.Context, conn *sql.Conn, ds Dataset) error {
	atType, valType := "TIMESTAMP", "DOUBLE"
	if ds.Step == 24*time.Hour {
		atType = "DATE"
	}
	if ds.Name == "shops" {
		valType = "INTEGER"
	}
	var keyDefs []string
	for _, k := range ds.KeyCol {
		keyDefs = append(keyDefs, k+" VARCHAR")
	}
	keys := strings.Join(keyDefs, ", ")
	ddl := fmt.Sprintf(`CREATE OR REPLACE TABLE %[1]s (%[2]s, %[3]s %[4]s, %[5]s %[6]s);
CREATE OR REPLACE TABLE %[1]s_truth (%[2]s, kind VARCHAR, phi DOUBLE, period INTEGER, level DOUBLE,
    unit_root BOOLEAN, mean_changes BOOLEAN, spread_changes BOOLEAN, seasonal BOOLEAN)`,
		ds.Name, keys, ds.AtCol, atType, ds.ValCol, valType)
	if _, err := conn.ExecContext(ctx, ddl); err != nil {
		return err
	}
	return conn.Raw(func(raw any) error {
		dc, ok := raw.(driver.Conn)
		if !ok {
			return fmt.Errorf("unexpected connection type %T", raw)
		}
		data, err := duckdb.NewAppenderFromConn(dc, "", ds.Name)
		if err != nil {
			return err
		}
		truth, err := duckdb.NewAppenderFromConn(dc, "", ds.Name+"_truth")
		if err != nil {
			data.Close()
			return err
		}
		err = appendAll(ds, valType == "INTEGER", data, truth)
		if cerr := data.Close(); err == nil {
			err = cerr
		}
		if cerr := truth.Close(); err == nil {
			err = cerr
		}
		return err
	})
}

func appendAll(ds Dataset, whole bool, data, truth *duckdb.Appender) error {
	row := make([]driver.Value, len(ds.KeyCol)+2)
	for _, s := range ds.Series {
		for i, k := range s.Key {
			row[i] = k
		}
		for t, v := range s.Values {
			row[len(s.Key)] = ds.Start.Add(time.Duration(t) * ds.Step)
			if whole {
				row[len(s.Key)+1] = int32(v)
			} else {
				row[len(s.Key)+1] = v
			}
			if err := data.AppendRow(row...); err != nil {
				return err
			}
		}
		tr := s.Truth
		trow := make([]driver.Value, 0, len(s.Key)+8)
		for _, k := range s.Key {
			trow = append(trow, k)
		}
		trow = append(trow, string(tr.Kind), tr.Phi, int32(tr.Period), tr.Level,
			tr.UnitRoot(), tr.MeanChanges(), tr.SpreadChanges(), tr.SeasonalPattern())
		if err := truth.AppendRow(trow...); err != nil {
			return err
		}
	}
	return nil
}

// WriteFiles generates the demo scenario for seed and sizes and writes its
// Parquet files to dir through a database of its own, for callers that
// need only the files.
func WriteFiles(ctx context.Context, dir string, seed uint64, sizes Sizes) (map[string]Files, error) {
	sets, err := Generate(seed, sizes)
	if err != nil {
		return nil, err
	}
	db, err := udf.Open(ctx, udf.Options{})
	if err != nil {
		return nil, err
	}
	defer db.Close()
	return Write(ctx, db, dir, sets)
}
