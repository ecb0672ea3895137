package pgserver

import (
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/stats/longtests"
)

// The client matrix: one script per client under testdata/clients, each
// printing a table of operation × result and exiting 1 if any operation
// failed. Every script runs against a fresh server with SCRAM users and the
// demo's shops written under --data, referred to by a relative path.

// clientScript says how to run one client's script and what it needs.
type clientScript struct {
	name    string
	command func(t *testing.T, dir string) []string
}

func python(t *testing.T, module string) string {
	t.Helper()
	py := needTool(t, "/usr/bin/python3", "python3")
	if err := exec.Command(py, "-c", "import "+module).Run(); err != nil {
		missing(t, "the Python module "+module+" for /usr/bin/python3", "apt-get install python3-"+module)
	}
	return py
}

var clientScripts = []clientScript{
	{"psql", func(t *testing.T, dir string) []string {
		needTool(t, "psql", "postgresql-client")
		return []string{"bash", filepath.Join(dir, "psql_client.sh")}
	}},
	{"psycopg2", func(t *testing.T, dir string) []string {
		return []string{python(t, "psycopg2"), filepath.Join(dir, "psycopg2_client.py")}
	}},
	{"psycopg3", func(t *testing.T, dir string) []string {
		return []string{python(t, "psycopg"), filepath.Join(dir, "psycopg3_client.py")}
	}},
	{"sqlalchemy", func(t *testing.T, dir string) []string {
		python(t, "pandas")
		return []string{python(t, "sqlalchemy"), filepath.Join(dir, "sqlalchemy_client.py")}
	}},
	{"jdbc", func(t *testing.T, dir string) []string {
		java := needTool(t, "java", "default-jdk-headless")
		jar := "/usr/share/java/postgresql.jar"
		if _, err := os.Stat(jar); err != nil {
			missing(t, "pgjdbc at "+jar, "apt-get install libpostgresql-jdbc-java")
		}
		return []string{java, "-cp", jar, filepath.Join(dir, "JdbcClient.java")}
	}},
	{"rpostgresql", func(t *testing.T, dir string) []string {
		rscript := needTool(t, "Rscript", "r-base-core")
		if err := exec.Command(rscript, "-e", "library(RPostgreSQL)").Run(); err != nil {
			missing(t, "R's RPostgreSQL library", "apt-get install r-cran-rpostgresql")
		}
		return []string{rscript, filepath.Join(dir, "rpostgresql_client.R")}
	}},
	{"node", func(t *testing.T, dir string) []string {
		node := needTool(t, "node", "nodejs")
		if _, err := os.Stat(filepath.Join(nodeModules(), "pg-copy-streams")); err != nil {
			missing(t, "node-postgres, pg-cursor and pg-copy-streams in "+nodeModules(),
				"run npm ci in cmd/internal/pgserver/testdata/clients/node, or set PLUMB_NODE_MODULES to a node_modules folder that has them")
		}
		return []string{node, filepath.Join(dir, "node", "node_client.js")}
	}},
}

// nodeModules is where the node client finds node-postgres and its
// companions: PLUMB_NODE_MODULES when set, else node_modules beside
// testdata/clients/node/package.json, where .ci/run's npm ci puts them.
func nodeModules() string {
	if d := os.Getenv("PLUMB_NODE_MODULES"); d != "" {
		return d
	}
	abs, _ := filepath.Abs(filepath.Join("testdata", "clients", "node", "node_modules"))
	return abs
}

// TestClientMatrix runs every client's script; its table is logged, and
// the test fails if any operation failed.
func TestClientMatrix(t *testing.T) {
	longtests.Require(t, "seven PostgreSQL clients' scripts against a server, about 15 s")
	dir, err := filepath.Abs(filepath.Join("testdata", "clients"))
	if err != nil {
		t.Fatal(err)
	}
	for _, cs := range clientScripts {
		t.Run(cs.name, func(t *testing.T) {
			args := cs.command(t, dir)
			ts := startServer(t, Config{})
			shops := writeDemoShops(t, ts.data)
			rel, err := filepath.Rel(ts.data, shops)
			if err != nil {
				t.Fatal(err)
			}
			host, port, _ := net.SplitHostPort(ts.addr)
			cmd := exec.Command(args[0], args[1:]...)
			cmd.Dir = dir
			cmd.Env = append(os.Environ(), "PLUMB_HOST="+host, "PLUMB_PORT="+port, "PLUMB_USER=ana", "PLUMB_PASSWORD=s3cret",
				"PLUMB_SHOPS="+rel, "NODE_PATH="+nodeModules(), "PYTHONDONTWRITEBYTECODE=1")
			out, err := cmd.CombinedOutput()
			t.Logf("%s:\n%s", cs.name, out)
			if err != nil {
				t.Errorf("%s: %v (the table above shows what failed)", cs.name, err)
			}
			if !strings.Contains(string(out), " passed, 0 failed") {
				t.Errorf("%s: the script did not report a clean table", cs.name)
			}
		})
	}
}
