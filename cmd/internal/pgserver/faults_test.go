package pgserver

import (
	"bufio"
	"context"
	"encoding/binary"
	"fmt"
	"io"
	"log/slog"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/jackc/pgx/v5"

	"github.com/plumb-sql/plumb/udf"
)

// stillServes checks that a fresh client gets an answer.
func stillServes(t *testing.T, ts *testServer) {
	t.Helper()
	c, err := pgx.Connect(context.Background(), ts.url("ana", "s3cret"))
	if err != nil {
		t.Fatalf("the server no longer accepts clients: %v", err)
	}
	defer c.Close(context.Background())
	var n int
	if err := c.QueryRow(context.Background(), "SELECT 7").Scan(&n); err != nil || n != 7 {
		t.Fatalf("the server no longer answers: %v", err)
	}
}

// TestClientVanishesMidResult: a client that drops its connection while a
// large result streams to it ends only its own session.
func TestClientVanishesMidResult(t *testing.T) {
	ts := startServer(t, Config{})
	other := ts.connect(t)
	c, err := pgx.Connect(context.Background(), ts.url("ana", "s3cret"))
	if err != nil {
		t.Fatal(err)
	}
	rows, err := c.Query(context.Background(), "SELECT range, range * 2 FROM range(5000000)")
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < 1000 && rows.Next(); i++ {
	}
	c.PgConn().Conn().Close() // vanish without Terminate
	time.Sleep(300 * time.Millisecond)
	var n int
	if err := other.QueryRow(context.Background(), "SELECT 8").Scan(&n); err != nil || n != 8 {
		t.Fatalf("another client: %v", err)
	}
	stillServes(t, ts)
	deadline := time.Now().Add(5 * time.Second)
	for ts.srv.busy() && time.Now().Before(deadline) {
		time.Sleep(50 * time.Millisecond)
	}
	if ts.srv.busy() {
		t.Error("the vanished client's statement is still running")
	}
}

// rawStartup opens a connection and completes a trust login by hand.
func rawStartup(addr string) (net.Conn, error) {
	c, err := net.DialTimeout("tcp", addr, 2*time.Second)
	if err != nil {
		return nil, err
	}
	params := "user\x00ana\x00database\x00plumb\x00\x00"
	msg := binary.BigEndian.AppendUint32(nil, uint32(8+len(params)))
	msg = binary.BigEndian.AppendUint32(msg, 196608) // protocol 3.0
	msg = append(msg, params...)
	if _, err := c.Write(msg); err != nil {
		c.Close()
		return nil, err
	}
	c.SetReadDeadline(time.Now().Add(2 * time.Second))
	r := bufio.NewReader(c)
	for { // read up to ReadyForQuery
		typ, err := r.ReadByte()
		if err != nil {
			c.Close()
			return nil, err
		}
		var n uint32
		if err := binary.Read(r, binary.BigEndian, &n); err != nil {
			c.Close()
			return nil, err
		}
		if _, err := io.CopyN(io.Discard, r, int64(n)-4); err != nil {
			c.Close()
			return nil, err
		}
		if typ == 'Z' {
			return c, nil
		}
		if typ == 'E' {
			c.Close()
			return nil, fmt.Errorf("login refused")
		}
	}
}

var (
	fuzzOnce   sync.Once
	fuzzServer *testServer
)

// FuzzMessageStream sends arbitrary bytes after a login: the server may
// answer or hang up, but never crash, and keeps serving everyone else.
func FuzzMessageStream(f *testing.F) {
	f.Add([]byte("Q\x00\x00\x00\x0dSELECT 1\x00"))
	f.Add([]byte("P\x00\x00\x00\x08\x00\x00\x00\x00S\x00\x00\x00\x04"))
	f.Add([]byte("B\x00\x00\x00\xff\xff\xff\xff"))
	f.Add([]byte("X\x00\x00\x00\x04"))
	f.Add([]byte("Q\xff\xff\xff\xff"))
	f.Add([]byte("D\x00\x00\x00\x06Pa\x00E\x00\x00\x00\x09\x00\x00\x00\x00\x00"))
	f.Add([]byte{0, 0, 0, 0, 0, 0})
	f.Fuzz(func(t *testing.T, data []byte) {
		fuzzOnce.Do(func() {
			// One server for the whole run, trust auth on loopback.
			cfg := Config{Addr: "127.0.0.1:0", Auth: "trust", DataDir: os.TempDir(), FailedLoginDelay: time.Millisecond}
			srv, err := New(context.Background(), cfg, slog.New(slog.NewTextHandler(io.Discard, nil)))
			if err != nil {
				t.Fatal(err)
			}
			ln, err := net.Listen("tcp", cfg.Addr)
			if err != nil {
				t.Fatal(err)
			}
			go srv.Serve(ln)
			fuzzServer = &testServer{srv: srv, addr: ln.Addr().String()}
		})
		c, err := rawStartup(fuzzServer.addr)
		if err != nil {
			t.Fatalf("login: %v", err)
		}
		c.Write(data)
		c.SetReadDeadline(time.Now().Add(200 * time.Millisecond))
		io.Copy(io.Discard, c)
		c.Close()
		ok, err := rawStartup(fuzzServer.addr)
		if err != nil {
			t.Fatalf("the server stopped serving after %q: %v", data, err)
		}
		ok.Close()
	})
}

// TestShutdownDuringCreateTable sends SIGTERM to a plumb server process
// (this test binary, re-run as a server) while a CREATE TABLE AS runs; the
// reopened database file must hold the whole table or none of it.
func TestShutdownDuringCreateTable(t *testing.T) {
	if os.Getenv("PLUMB_TEST_SERVE_DB") != "" {
		t.Skip("not run inside the server process that TestShutdownDuringCreateTable starts")
	}
	for _, test := range []struct {
		name  string
		grace time.Duration
		rows  int64
		wait  time.Duration
	}{
		{"cut short", 50 * time.Millisecond, 400_000_000, 300 * time.Millisecond},
		{"finishes within the grace period", 20 * time.Second, 2_000_000, 50 * time.Millisecond},
	} {
		t.Run(test.name, func(t *testing.T) {
			dbPath := filepath.Join(t.TempDir(), "served.duckdb")
			cmd := exec.Command(os.Args[0], "-test.run", "^TestServeProcess$")
			cmd.Env = append(os.Environ(), "PLUMB_TEST_SERVE_DB="+dbPath, "PLUMB_TEST_SERVE_GRACE="+test.grace.String())
			stdout, _ := cmd.StdoutPipe()
			cmd.Stderr = os.Stderr
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			addr, err := bufio.NewReader(stdout).ReadString('\n')
			if err != nil {
				t.Fatalf("server did not start: %v", err)
			}
			addr = strings.TrimSpace(strings.TrimPrefix(addr, "listening "))
			go io.Copy(io.Discard, stdout)
			c, err := pgx.Connect(context.Background(), "postgres://ana@"+addr+"/plumb?sslmode=disable")
			if err != nil {
				t.Fatal(err)
			}
			done := make(chan error, 1)
			go func() {
				_, err := c.Exec(context.Background(), fmt.Sprintf("CREATE TABLE big AS SELECT range AS i, range * 2 AS j FROM range(%d)", test.rows))
				done <- err
			}()
			time.Sleep(test.wait)
			cmd.Process.Signal(syscall.SIGTERM)
			ctasErr := <-done
			if err := cmd.Wait(); err != nil {
				t.Fatalf("server exit: %v", err)
			}
			db, err := udf.Open(context.Background(), udf.Options{Path: dbPath, ReadOnly: true})
			if err != nil {
				t.Fatal(err)
			}
			defer db.Close()
			var n int64
			err = db.QueryRow("SELECT count(*) FROM big").Scan(&n)
			switch {
			case err != nil && strings.Contains(err.Error(), "does not exist"):
				t.Logf("table absent (CREATE TABLE said: %v)", ctasErr)
				if ctasErr == nil {
					t.Error("the client was told the table was created, but it is not there")
				}
			case err != nil:
				t.Fatal(err)
			case n != test.rows:
				t.Errorf("table has %d rows, want all %d or no table", n, test.rows)
			default:
				t.Logf("table complete with %d rows", n)
			}
		})
	}
}

// TestServeProcess is the server side of TestShutdownDuringCreateTable.
func TestServeProcess(t *testing.T) {
	dbPath := os.Getenv("PLUMB_TEST_SERVE_DB")
	if dbPath == "" {
		t.Skip("not a test on its own: the server process TestShutdownDuringCreateTable starts (it sets PLUMB_TEST_SERVE_DB)")
	}
	grace, _ := time.ParseDuration(os.Getenv("PLUMB_TEST_SERVE_GRACE"))
	data := filepath.Join(filepath.Dir(dbPath), "data") // --db must lie outside --data
	if err := os.MkdirAll(data, 0o755); err != nil {
		t.Fatal(err)
	}
	cfg := Config{Addr: "127.0.0.1:0", Auth: "trust", DBPath: dbPath, DataDir: data, Grace: grace,
		MemoryLimit: os.Getenv("PLUMB_TEST_SERVE_MEMORY")}
	err := Run(context.Background(), cfg, slog.New(slog.NewTextHandler(io.Discard, nil)), func(a net.Addr) {
		fmt.Printf("listening %s\n", a)
	})
	if err != nil {
		t.Fatal(err)
	}
}
