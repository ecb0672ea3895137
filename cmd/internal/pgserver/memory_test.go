package pgserver

import (
	"bufio"
	"context"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/jackc/pgx/v5"
)

// TestByteSize: --memory-limit in DuckDB's units (powers of 1000 for KB,
// MB, GB, TB; of 1024 for KiB, MiB, GiB, TiB).
func TestByteSize(t *testing.T) {
	for _, test := range []struct {
		in   string
		want int64
	}{
		{"1GB", 1_000_000_000}, {"4 GB", 4_000_000_000}, {"1.5GiB", 3 << 29}, {"512MiB", 512 << 20},
		{"64mb", 64_000_000}, {"100", 100}, {"2TB", 2_000_000_000_000},
	} {
		if got, err := byteSize(test.in); err != nil || got != test.want {
			t.Errorf("byteSize(%q) = %d, %v; want %d", test.in, got, err, test.want)
		}
	}
	for _, bad := range []string{"", "GB", "-1GB", "1XB", "0"} {
		if _, err := byteSize(bad); err == nil {
			t.Errorf("byteSize(%q) accepted", bad)
		}
	}
}

// TestHugeConstantListUnderMemoryLimit: DuckDB folds range(0, 100000000)
// into one constant list while binding, outside its buffer manager's
// memory_limit (it took a process past 9 GB under a 1 GB limit). Served
// with a memory limit, the process's memory is capped (RLIMIT_DATA), so
// the statement fails with DuckDB's Out of Memory error, and the server
// goes on serving. The server runs in a child process, since the cap is
// the whole process's.
func TestHugeConstantListUnderMemoryLimit(t *testing.T) {
	if os.Getenv("PLUMB_TEST_SERVE_DB") != "" {
		t.Skip("running as the server")
	}
	dbPath := filepath.Join(t.TempDir(), "served.duckdb")
	cmd := exec.Command(os.Args[0], "-test.run", "^TestServeProcess$")
	cmd.Env = append(os.Environ(), "PLUMB_TEST_SERVE_DB="+dbPath, "PLUMB_TEST_SERVE_GRACE=1s", "PLUMB_TEST_SERVE_MEMORY=64MB")
	stdout, _ := cmd.StdoutPipe()
	cmd.Stderr = os.Stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	defer func() {
		cmd.Process.Signal(os.Interrupt)
		cmd.Wait()
	}()
	addr, err := bufio.NewReader(stdout).ReadString('\n')
	if err != nil {
		t.Fatalf("server did not start: %v", err)
	}
	addr = strings.TrimSpace(strings.TrimPrefix(addr, "listening "))
	go io.Copy(io.Discard, stdout)
	url := "postgres://ana@" + addr + "/plumb?sslmode=disable"
	c, err := pgx.Connect(context.Background(), url)
	if err != nil {
		t.Fatal(err)
	}
	defer c.Close(context.Background())
	var n int64
	err = c.QueryRow(context.Background(), "SELECT len(range(0, 100000000))").Scan(&n)
	if err == nil || !strings.Contains(err.Error(), "Out of Memory") {
		t.Fatalf("a 100,000,000-value constant list under a 64 MB limit: %d, %v; want DuckDB's Out of Memory error", n, err)
	}
	for _, q := range []string{"SELECT 7", "SELECT len(difference([1.0, 4, 9, 16]))::INTEGER + 4"} {
		other, err := pgx.Connect(context.Background(), url)
		if err != nil {
			t.Fatalf("after the refused list, a new client: %v", err)
		}
		var k int
		if err := other.QueryRow(context.Background(), q).Scan(&k); err != nil || k != 7 {
			t.Errorf("%s: %d %v", q, k, err)
		}
		other.Close(context.Background())
	}
}
