package udf

import (
	"flag"
	"os"
	"path/filepath"
	"testing"
)

var updateGolden = flag.Bool("update", false, "rewrite udf/testdata/golden from the current SQL builders")

// TestGeneratedSQLGolden pins the query text every table function
// generates, for one and for two group columns: a change to a builder shows
// as a diff of readable SQL (go test ./udf -run Golden -update rewrites the
// files after a deliberate change).
func TestGeneratedSQLGolden(t *testing.T) {
	for _, by := range []struct {
		name string
		by   []string
	}{{"by1", []string{"store"}}, {"by2", []string{"store", "sku"}}} {
		q := seriesQuery{source: quoteLiteral("sales.parquet"), by: by.by, at: "day", value: "units"}
		points := q
		points.points = true
		sharded := points
		sharded.shard, sharded.shards = 1, 4
		cases := map[string]string{
			"diagnose":             diagnoseSQL(points, "NULL", "0.05::DOUBLE", "'none'"),
			"diagnose_shard":       diagnoseSQL(sharded, "7", "0.05::DOUBLE", "'linear'"),
			"stationarize":         stationarizeSQL(q, "NULL", "0.05::DOUBLE", false),
			"stationarize_recipes": stationarizeSQL(q, "NULL", "0.05::DOUBLE", true),
			"restore":              restoreSQL(q, quoteIdent("recipes"), "last"),
			"forecast":             forecastSQL(points, []string{"14", "0.95::DOUBLE", "NULL", "0.05::DOUBLE", "'none'", "0", "false"}, false),
			"differenced":          differencedSQL(q, 1, 1),
		}
		for name, got := range cases {
			path := filepath.Join("testdata", "golden", name+"_"+by.name+".sql")
			if *updateGolden {
				if err := os.WriteFile(path, []byte(got+"\n"), 0o644); err != nil {
					t.Fatal(err)
				}
				continue
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run go test ./udf -run Golden -update)", err)
			}
			if string(want) != got+"\n" {
				t.Errorf("%s: the generated SQL differs from %s (diff it with -update and git diff)", name, path)
			}
		}
	}
	path := filepath.Join("testdata", "golden", "combine_diagnoses.sql")
	got := combineSQL(quoteLiteral("parts/*.parquet"))
	if *updateGolden {
		if err := os.WriteFile(path, []byte(got+"\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	if want, err := os.ReadFile(path); err != nil || string(want) != got+"\n" {
		t.Errorf("combine_diagnoses: the generated SQL differs from %s (%v)", path, err)
	}
}
