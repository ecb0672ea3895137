package pgserver

import (
	"context"
	"errors"
	"io"
	"log/slog"
	"net"
	"os"
	"sync/atomic"
	"syscall"
	"testing"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgproto3"
)

// idleConnections opens n connections that never send a byte.
func idleConnections(t *testing.T, addr string, n int) []net.Conn {
	t.Helper()
	conns := make([]net.Conn, 0, n)
	for range n {
		c, err := net.DialTimeout("tcp", addr, 2*time.Second)
		if err != nil {
			t.Fatalf("after %d idle connections: %v", len(conns), err)
		}
		conns = append(conns, c)
	}
	t.Cleanup(func() {
		for _, c := range conns {
			c.Close()
		}
	})
	return conns
}

// TestUnauthenticatedConnectionsCount: connections that never log in hold
// slots of --max-connections (so a flood of them cannot grow without
// bound), a client beyond the limit is told 53300, and each idle one is
// closed at --auth-timeout, after which a real user gets in again.
func TestUnauthenticatedConnectionsCount(t *testing.T) {
	const maxConns = 4
	ts := startServer(t, Config{MaxConns: maxConns, AuthTimeout: 700 * time.Millisecond})
	idle := idleConnections(t, ts.addr, maxConns)
	time.Sleep(100 * time.Millisecond) // let the server accept them all
	_, err := pgx.Connect(context.Background(), ts.url("ana", "s3cret"))
	if code := sqlStateOf(err); code != stateTooManyConns {
		t.Fatalf("a client beyond %d idle connections: %v (SQLSTATE %q), want 53300", maxConns, err, code)
	}
	// Each idle connection is closed by the server at the deadline.
	for i, c := range idle {
		c.SetReadDeadline(time.Now().Add(5 * time.Second))
		if _, err := c.Read(make([]byte, 1)); !errors.Is(err, io.EOF) {
			t.Fatalf("idle connection %d: read %v, want the server to close it", i, err)
		}
	}
	stillServes(t, ts)

	// A flood far past the limit: the excess is refused or dropped, the
	// server lives, and serves again once the flood has timed out.
	idleConnections(t, ts.addr, 50*maxConns)
	deadline := time.Now().Add(10 * time.Second)
	for {
		c, err := pgx.Connect(context.Background(), ts.url("ana", "s3cret"))
		if err == nil {
			c.Close(context.Background())
			break
		}
		if time.Now().After(deadline) {
			t.Fatalf("no login within 10 s of a flood of %d idle connections: %v", 50*maxConns, err)
		}
		time.Sleep(100 * time.Millisecond)
	}
	stillServes(t, ts)
}

// flakyListener fails its first failures Accept calls, as a listener does
// while the process is out of file descriptors.
type flakyListener struct {
	net.Listener
	failures atomic.Int32
}

func (l *flakyListener) Accept() (net.Conn, error) {
	if l.failures.Add(-1) >= 0 {
		return nil, &net.OpError{Op: "accept", Net: "tcp", Err: os.NewSyscallError("accept4", syscall.EMFILE)}
	}
	return l.Listener.Accept()
}

// TestAcceptErrorsDoNotStopTheServer: Accept failing with EMFILE ("too
// many open files") pauses the server instead of ending Serve (which used
// to exit the process).
func TestAcceptErrorsDoNotStopTheServer(t *testing.T) {
	cfg := Config{Addr: "127.0.0.1:0", Auth: "scram", Users: map[string]string{"ana": "s3cret"}, DataDir: t.TempDir()}
	srv, err := New(context.Background(), cfg, slog.New(slog.NewTextHandler(io.Discard, nil)))
	if err != nil {
		t.Fatal(err)
	}
	ln, err := net.Listen("tcp", cfg.Addr)
	if err != nil {
		t.Fatal(err)
	}
	flaky := &flakyListener{Listener: ln}
	flaky.failures.Store(6)
	served := make(chan error, 1)
	go func() { served <- srv.Serve(flaky) }()
	t.Cleanup(func() { srv.Shutdown() })
	ts := &testServer{srv: srv, addr: ln.Addr().String()}
	stillServes(t, ts)
	select {
	case err := <-served:
		t.Fatalf("Serve returned %v after accept errors", err)
	default:
	}
	if left := flaky.failures.Load(); left >= 0 {
		t.Errorf("%d accept failures were never met", left+1)
	}
}

// TestAcceptBackoff: 5 ms, doubling, up to 1 s (net/http's Server).
func TestAcceptBackoff(t *testing.T) {
	want := []time.Duration{5, 10, 20, 40, 80, 160, 320, 640, 1000, 1000}
	var d time.Duration
	for i, w := range want {
		d = acceptBackoff(d)
		if d != w*time.Millisecond {
			t.Errorf("pause %d: %v, want %v", i+1, d, w*time.Millisecond)
		}
	}
}

// TestVanishedClientsFreeTheirSlots: with --max-connections 2 and no
// --query-timeout, two clients killed in the middle of long statements
// neither keep running nor keep their slots: a new client gets in and is
// answered, and the statements stop.
func TestVanishedClientsFreeTheirSlots(t *testing.T) {
	ts := startServer(t, Config{MaxConns: 2, Auth: "trust"})
	for _, query := range []string{
		"SELECT sum(a.range * b.range) FROM range(200000) a, range(200000) b",                     // a cross join of 4e10 rows
		"SELECT sum(len(difference(list_value(a.range::DOUBLE, 1, 2)))) FROM range(2000000000) a", // a plumb function per row
	} {
		// A raw client, killed without a word: no Terminate, no
		// CancelRequest (pgx would send one).
		c, err := rawStartup(ts.addr)
		if err != nil {
			t.Fatal(err)
		}
		fe := pgproto3.NewFrontend(c, c)
		fe.SendQuery(&pgproto3.Query{String: query})
		if err := fe.Flush(); err != nil {
			t.Fatal(err)
		}
		time.Sleep(300 * time.Millisecond) // the statement is running
		if !ts.srv.busy() {
			t.Fatalf("%s is not running", query)
		}
		c.Close()
	}
	start := time.Now()
	for ts.srv.busy() && time.Since(start) < 10*time.Second {
		time.Sleep(20 * time.Millisecond)
	}
	if ts.srv.busy() {
		t.Fatal("a vanished client's statement still runs 10 s later")
	}
	t.Logf("statements stopped %v after the last client vanished", time.Since(start))
	deadline := time.Now().Add(5 * time.Second)
	for {
		c, err := pgx.Connect(context.Background(), ts.url("ana", "s3cret"))
		if err == nil {
			var n int
			if err := c.QueryRow(context.Background(), "SELECT 3").Scan(&n); err != nil || n != 3 {
				t.Fatalf("new client: %v", err)
			}
			c.Close(context.Background())
			break
		}
		if time.Now().After(deadline) {
			t.Fatalf("no slot free 5 s after the statements stopped: %v", err)
		}
		time.Sleep(50 * time.Millisecond)
	}
}
