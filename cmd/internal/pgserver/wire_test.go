package pgserver

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"fmt"
	"io"
	"net"
	"runtime"
	"strings"
	"testing"
	"time"

	"github.com/jackc/pgx/v5/pgproto3"
)

// allocated reports the bytes run allocates on the heap.
func allocated(run func()) uint64 {
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	run()
	runtime.ReadMemStats(&after)
	return after.TotalAlloc - before.TotalAlloc
}

// binaryIntArray is a binary int4[] whose header claims count elements,
// followed by the given elements.
func binaryIntArray(count uint32, elems ...int32) []byte {
	b := binary.BigEndian.AppendUint32(nil, 1) // dimensions
	b = binary.BigEndian.AppendUint32(b, 0)    // no NULLs
	b = binary.BigEndian.AppendUint32(b, oidInt4)
	b = binary.BigEndian.AppendUint32(b, count)
	b = binary.BigEndian.AppendUint32(b, 1) // lower bound
	for _, e := range elems {
		b = binary.BigEndian.AppendUint32(b, 4)
		b = binary.BigEndian.AppendUint32(b, uint32(e))
	}
	return b
}

// TestWireLengthsCheckedBeforeAllocation: every count or length a client
// sends is checked against the bytes that back it before memory is sized
// by it (an attacker's header claims 2³¹−1 elements in 20 bytes).
func TestWireLengthsCheckedBeforeAllocation(t *testing.T) {
	const limit = 1 << 20 // what decoding a few bytes may allocate at most
	manyElements := "{" + strings.Repeat("1,", 5_000_000) + "1}"
	for _, test := range []struct {
		name    string
		decode  func() error
		wantErr string
	}{
		{"binary array claiming 2^31-1 elements", func() error {
			_, err := binaryArrayLiterals(binaryIntArray(1<<31-1, 7))
			return err
		}, "claims 2147483647 elements"},
		{"binary array claiming 2^32-1 elements", func() error {
			_, err := binaryArrayLiterals(binaryIntArray(1<<32-1, 7))
			return err
		}, "claims -1 elements"},
		{"binary array with its elements", func() error {
			items, err := binaryArrayLiterals(binaryIntArray(2, 7, -1))
			if err == nil && strings.Join(items, ",") != "7::INTEGER,-1::INTEGER" {
				t.Errorf("elements %v", items)
			}
			return err
		}, ""},
		{"numeric claiming weight 32767 and scale 65535", func() error {
			s, err := numericText([]byte{0, 1, 0x7f, 0xff, 0, 0, 0xff, 0xff, 0, 1})
			if err == nil && len(s) > 20 {
				t.Errorf("8 bytes became %d characters", len(s))
			}
			return err
		}, ""},
		{"binary COPY field claiming 2^31-1 bytes", func() error {
			in := append(append([]byte{}, pgcopySignature...), 0, 0, 0, 0, 0, 0, 0, 0)
			in = append(in, 0, 1, 0x7f, 0xff, 0xff, 0xff, 'x')
			_, err := readBinaryCopy(bufio.NewReader(bytes.NewReader(in)), []column{{name: "v", oid: oidBytea}}, nil)
			return err
		}, "cut short"},
		{"message header claiming 64 MiB, 3 bytes sent", func() error {
			in := append([]byte{'Q'}, binary.BigEndian.AppendUint32(nil, maxMessage)...)
			in = append(in, "SEL"...)
			f := newFrameReader(bytes.NewReader(in))
			f.typed, f.limit = true, maxMessage
			_, err := pgproto3.NewBackend(f, io.Discard).Receive()
			return err
		}, "unexpected EOF"},
		{"message header over the login limit", func() error {
			in := append([]byte{'p'}, binary.BigEndian.AppendUint32(nil, maxLoginMessage+100)...)
			f := newFrameReader(bytes.NewReader(in))
			f.typed = true
			_, err := pgproto3.NewBackend(f, io.Discard).Receive()
			return err
		}, "over the limit"},
		{"text array of 5 million one-digit elements", func() error {
			_, err := textArrayLiterals(manyElements, oidInt4)
			return err
		}, "over plumb's limit"},
		{"parameter number past 65535", func() error {
			if n := maxParam(lex("SELECT $99999999999999999999999")); n != maxParams+1 {
				t.Errorf("maxParam = %d", n)
			}
			return nil
		}, ""},
	} {
		t.Run(test.name, func(t *testing.T) {
			var err error
			if got := allocated(func() { err = test.decode() }); got > limit {
				t.Errorf("allocated %d bytes", got)
			}
			if test.wantErr == "" && err != nil {
				t.Errorf("error %v", err)
			}
			if test.wantErr != "" && (err == nil || !strings.Contains(err.Error(), test.wantErr)) {
				t.Errorf("error %v, want one containing %q", err, test.wantErr)
			}
		})
	}
}

// extendedExchange logs in by hand and sends msgs, then reads up to
// ReadyForQuery; it returns the backend's messages.
func extendedExchange(t *testing.T, addr string, msgs ...pgproto3.FrontendMessage) []pgproto3.BackendMessage {
	t.Helper()
	c, err := rawStartup(addr)
	if err != nil {
		t.Fatalf("login: %v", err)
	}
	defer c.Close()
	return sendAndRead(c, msgs...)
}

// sendAndRead sends msgs on a logged-in connection and reads up to
// ReadyForQuery (or until the server hangs up or goes quiet for 5 s).
func sendAndRead(c net.Conn, msgs ...pgproto3.FrontendMessage) []pgproto3.BackendMessage {
	fe := pgproto3.NewFrontend(c, c)
	for _, m := range msgs {
		fe.Send(m)
	}
	if err := fe.Flush(); err != nil {
		return nil
	}
	var got []pgproto3.BackendMessage
	c.SetReadDeadline(time.Now().Add(5 * time.Second))
	for {
		m, err := fe.Receive()
		if err != nil {
			return got
		}
		switch m := m.(type) {
		case *pgproto3.ErrorResponse:
			cp := *m
			got = append(got, &cp)
		case *pgproto3.ReadyForQuery:
			return append(got, m)
		default:
			got = append(got, m)
		}
	}
}

func firstError(msgs []pgproto3.BackendMessage) *pgproto3.ErrorResponse {
	for _, m := range msgs {
		if e, ok := m.(*pgproto3.ErrorResponse); ok {
			return e
		}
	}
	return nil
}

// TestHugeArrayBindKeepsServing: the Bind that used to kill the process (a
// binary int4[] parameter claiming 2³¹−1 elements) is refused with an
// error, and the server then serves another client.
func TestHugeArrayBindKeepsServing(t *testing.T) {
	ts := startServer(t, Config{Auth: "trust"})
	for _, test := range []struct {
		name string
		msgs []pgproto3.FrontendMessage
		code string
	}{
		{"int4[] claiming 2^31-1 elements", []pgproto3.FrontendMessage{
			&pgproto3.Parse{Query: "SELECT len($1)", ParameterOIDs: []uint32{1007}},
			&pgproto3.Bind{Parameters: [][]byte{binaryIntArray(1<<31-1, 1, 2)}, ParameterFormatCodes: []int16{1}},
			&pgproto3.Execute{}, &pgproto3.Sync{},
		}, stateInvalidText},
		{"parameter $4000000000", []pgproto3.FrontendMessage{
			&pgproto3.Parse{Query: "SELECT $4000000000"},
			&pgproto3.Sync{},
		}, stateUndefinedParameter},
	} {
		t.Run(test.name, func(t *testing.T) {
			got := extendedExchange(t, ts.addr, test.msgs...)
			if e := firstError(got); e == nil || e.Code != test.code {
				t.Errorf("answers %#v, want an error %s", got, test.code)
			}
			stillServes(t, ts)
		})
	}
}

// TestFrameReaderStartup: the untyped packets before the startup message
// (SSLRequest, GSSENCRequest) keep the reader untyped, the startup
// message switches it to typed messages, and each is handed on whole.
func TestFrameReaderStartup(t *testing.T) {
	packet := func(code uint32, body string) []byte {
		b := binary.BigEndian.AppendUint32(nil, uint32(8+len(body)))
		return append(binary.BigEndian.AppendUint32(b, code), body...)
	}
	var in []byte
	in = append(in, packet(sslRequestCode, "")...)
	in = append(in, packet(gssEncRequestCode, "")...)
	in = append(in, packet(196608, "user\x00ana\x00\x00")...)
	in = append(in, 'Q', 0, 0, 0, 13)
	in = append(in, "SELECT 1\x00"...)
	be := pgproto3.NewBackend(newFrameReader(bytes.NewReader(in)), io.Discard)
	var got []string
	for range 3 {
		m, err := be.ReceiveStartupMessage()
		if err != nil {
			t.Fatal(err)
		}
		got = append(got, fmtType(m))
	}
	m, err := be.Receive()
	if err != nil {
		t.Fatal(err)
	}
	got = append(got, fmtType(m))
	if want := "*pgproto3.SSLRequest *pgproto3.GSSEncRequest *pgproto3.StartupMessage *pgproto3.Query"; strings.Join(got, " ") != want {
		t.Errorf("got %v, want %s", got, want)
	}
}

func fmtType(v any) string { return fmt.Sprintf("%T", v) }
