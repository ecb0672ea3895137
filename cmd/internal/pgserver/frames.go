package pgserver

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"net"

	"github.com/jackc/pgx/v5/pgproto3"
)

// Limits on the size of one message from a client. PostgreSQL refuses a
// startup packet over 10,000 bytes (MAX_STARTUP_PACKET_LENGTH) and an
// authentication message over 65,535 (PG_MAX_AUTH_TOKEN_LENGTH); after
// login plumb accepts up to 64 MiB, enough for a long query text or a large
// Bind.
const (
	maxStartupPacket = 10_000
	maxLoginMessage  = 65_535
	maxMessage       = 64 << 20
)

// frameReader sits between a client's connection and pgproto3's Backend.
// The Backend allocates a message's whole body as soon as it has read the
// length in its header, so a header claiming 64 MiB would cost 64 MiB per
// connection before a single byte of it arrived. frameReader reads each
// message first, into a buffer that grows only as fast as bytes arrive,
// refuses a length over its limit at once, and hands the Backend only
// complete messages.
//
// Before the startup message it never reads past the message it is handing
// on, so after an SSLRequest the raw connection can be passed to the TLS
// handshake; after it, reads are buffered (several pipelined messages in
// one read).
type frameReader struct {
	r       io.Reader
	br      *bufio.Reader // r, buffered, once typed
	typed   bool          // past the startup message: a type byte, then the length
	limit   int           // the largest message body accepted
	pending []byte        // the rest of the current message, not yet handed on
	buf     []byte        // reused for small messages
}

func newFrameReader(r io.Reader) *frameReader {
	return &frameReader{r: r, limit: maxLoginMessage, buf: make([]byte, 0, 8192)}
}

func (f *frameReader) Read(p []byte) (int, error) {
	if len(f.pending) == 0 {
		if err := f.next(); err != nil {
			return 0, err
		}
	}
	n := copy(p, f.pending)
	f.pending = f.pending[n:]
	return n, nil
}

// next reads one whole message into pending.
func (f *frameReader) next() error {
	head, src := 4, f.r
	if f.typed {
		if f.br == nil {
			f.br = bufio.NewReaderSize(f.r, 8192)
		}
		head, src = 5, io.Reader(f.br)
	}
	msg := f.buf[:head]
	if _, err := io.ReadFull(src, msg); err != nil {
		return err
	}
	length := int(int32(binary.BigEndian.Uint32(msg[head-4:])))
	body := length - 4
	switch {
	case !f.typed && (length < 8 || length > maxStartupPacket):
		return fmt.Errorf("invalid length of startup packet: %d", length)
	case f.typed && body < 0:
		return fmt.Errorf("invalid message length: %d", length)
	case f.typed && body > f.limit:
		return fmt.Errorf("message of %d bytes is over the limit of %d", body, f.limit)
	}
	msg, err := readGrowing(src, msg, body)
	if err != nil {
		return err
	}
	if cap(msg) <= 8192 {
		f.buf = msg[:0]
	} else {
		f.buf = make([]byte, 0, 8192) // let a large buffer go once handed on
	}
	if !f.typed {
		switch binary.BigEndian.Uint32(msg[4:]) {
		case sslRequestCode, gssEncRequestCode, cancelRequestCode:
		default:
			f.typed = true // a startup message: typed messages follow
		}
	}
	f.pending = msg
	return nil
}

// Codes of the untyped startup packets that are not a startup message.
const (
	cancelRequestCode = 80877102
	sslRequestCode    = 80877103
	gssEncRequestCode = 80877104
)

// readGrowing appends n bytes from r to dst, enlarging dst at most to twice
// what has arrived (plus 64 KiB), so that the memory a message takes
// follows the bytes the client actually sent, not the length it claimed.
func readGrowing(r io.Reader, dst []byte, n int) ([]byte, error) {
	for n > 0 {
		chunk := min(n, max(64<<10, len(dst)))
		start := len(dst)
		if cap(dst)-start < chunk {
			grown := make([]byte, start, start+chunk)
			copy(grown, dst)
			dst = grown
		}
		got, err := io.ReadFull(r, dst[start:start+chunk])
		dst = dst[:start+got]
		if err != nil {
			if err == io.EOF {
				err = io.ErrUnexpectedEOF
			}
			return dst, err
		}
		n -= got
	}
	return dst, nil
}

// attach reads and writes the session's messages over c, through a
// frameReader.
func (sess *session) attach(c net.Conn) {
	sess.conn = c
	sess.frames = newFrameReader(c)
	sess.be = pgproto3.NewBackend(sess.frames, c)
	sess.be.SetMaxBodyLen(maxMessage)
}
