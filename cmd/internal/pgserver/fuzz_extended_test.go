package pgserver

import (
	"context"
	"io"
	"log/slog"
	"net"
	"os"
	"sync"
	"testing"
	"time"

	"github.com/jackc/pgx/v5/pgproto3"
)

var (
	extendedOnce   sync.Once
	extendedServer *testServer
	// extendedConn is the session FuzzExtended reuses from one input to
	// the next (every input closes what it opened and ends with Sync); a
	// failed input drops it.
	extendedConn net.Conn
)

// sharedFuzzServer starts one trust-auth server for a whole fuzzing run.
func sharedFuzzServer(t *testing.T) *testServer {
	extendedOnce.Do(func() {
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
		extendedServer = &testServer{srv: srv, addr: ln.Addr().String()}
	})
	return extendedServer
}

// What FuzzExtended prepares and what types it declares for the
// parameters: a byte of the input picks one of each.
var (
	fuzzQueries = []string{
		"SELECT $1",
		"SELECT $1 IS NULL",
		"SELECT len($1)",
		"SELECT $1, $2",
		"SELECT $1::VARCHAR || $2::VARCHAR",
		"SELECT count(*) FROM range(3) WHERE range = $1",
		"SELECT difference($1::DOUBLE[])",
		"SELECT $1::INTEGER[]",
		"SELECT $70000",
		"SELECT 1",
	}
	fuzzOIDs = []uint32{0, oidBool, oidInt2, oidInt4, oidInt8, oidFloat4, oidFloat8, oidText, oidBytea, oidNumeric,
		oidDate, oidTimestamp, oidTimestampTZ, oidUUID, oidJSON, 3802, 1000, 1007, 1016, 1022, 1009, 1231, 1001, 999999}
)

// FuzzExtended drives a real session through Parse, Bind, Describe,
// Execute, Close and Sync with random parameter bytes, types and formats.
// Whatever the parameters, the session answers up to ReadyForQuery and
// then still runs a query; the session is kept for the next input while it
// does (a server that died would fail the next login).
func FuzzExtended(f *testing.F) {
	f.Add(uint8(2), uint8(17), uint8(1), binaryIntArray(1<<31-1, 1), []byte(nil))
	f.Add(uint8(0), uint8(9), uint8(1), []byte{0, 1, 0x7f, 0xff, 0, 0, 0xff, 0xff, 0, 1}, []byte(nil))
	f.Add(uint8(3), uint8(7), uint8(0), []byte("a"), []byte("b"))
	f.Add(uint8(7), uint8(0), uint8(0), []byte("{1,2,NULL}"), []byte(nil))
	f.Add(uint8(6), uint8(19), uint8(1), []byte{0, 0, 0, 1, 0, 0, 0, 0, 0, 0, 2, 190, 0, 0, 0, 2, 0, 0, 0, 1, 0, 0, 0, 8, 0x3f, 0xf0, 0, 0, 0, 0, 0, 0}, []byte(nil))
	f.Add(uint8(8), uint8(3), uint8(1), []byte{0, 0, 0, 1}, []byte{})
	f.Fuzz(func(t *testing.T, query, oid, formats uint8, first, second []byte) {
		ts := sharedFuzzServer(t)
		if extendedConn == nil {
			c, err := rawStartup(ts.addr)
			if err != nil {
				t.Fatalf("login (the server stopped taking clients?): %v", err)
			}
			extendedConn = c
		}
		c := extendedConn
		kept := false
		defer func() {
			if !kept {
				c.Close()
				extendedConn = nil
			}
		}()
		params := [][]byte{first}
		if formats&2 != 0 {
			params = append(params, second)
		}
		if formats&4 != 0 {
			params[0] = nil // NULL
		}
		codes := []int16{int16(formats & 1)}
		if formats&8 != 0 {
			codes = append(codes, int16(formats>>4&1))
		}
		oids := []uint32{fuzzOIDs[int(oid)%len(fuzzOIDs)], fuzzOIDs[int(oid)/len(fuzzOIDs)%len(fuzzOIDs)]}
		start := time.Now()
		got := sendAndRead(c,
			&pgproto3.Parse{Name: "s", Query: fuzzQueries[int(query)%len(fuzzQueries)], ParameterOIDs: oids[:1+int(formats>>5&1)]},
			&pgproto3.Describe{ObjectType: 'S', Name: "s"},
			&pgproto3.Bind{DestinationPortal: "p", PreparedStatement: "s", ParameterFormatCodes: codes, Parameters: params,
				ResultFormatCodes: []int16{int16(formats >> 6 & 1)}},
			&pgproto3.Describe{ObjectType: 'P', Name: "p"},
			&pgproto3.Execute{Portal: "p", MaxRows: uint32(formats >> 7)},
			&pgproto3.Close{ObjectType: 'P', Name: "p"},
			&pgproto3.Close{ObjectType: 'S', Name: "s"},
			&pgproto3.Sync{},
		)
		if len(got) == 0 {
			t.Fatalf("no answer after %v", time.Since(start))
		}
		if _, ok := got[len(got)-1].(*pgproto3.ReadyForQuery); !ok {
			t.Fatalf("the session ended without ReadyForQuery: %#v", got)
		}
		after := sendAndRead(c, &pgproto3.Query{String: "SELECT 41 + 1"})
		if len(after) < 2 || firstError(after) != nil {
			t.Fatalf("the session no longer answers: %#v", after)
		}
		kept = true
	})
}
