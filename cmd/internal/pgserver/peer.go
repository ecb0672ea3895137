package pgserver

import (
	"context"
	"crypto/tls"
	"time"
)

// peerCheckInterval is how often a running statement's client connection
// is checked; a statement whose client has gone is cancelled within about
// that long, as PostgreSQL's client_connection_check_interval does.
const peerCheckInterval = 250 * time.Millisecond

// watchPeer cancels a running statement when its client's connection
// closes: the session is blocked in the statement, not reading, so without
// this a killed client's statement would run on and keep its slot. It
// returns when stop is closed or ctx ends.
func (sess *session) watchPeer(ctx context.Context, cancel context.CancelFunc, stop <-chan struct{}) {
	c := sess.conn
	if t, ok := c.(*tls.Conn); ok {
		c = t.NetConn()
	}
	tick := time.NewTicker(peerCheckInterval)
	defer tick.Stop()
	for {
		select {
		case <-stop:
			return
		case <-ctx.Done():
			return
		case <-tick.C:
			if peerGone(c) {
				sess.log.Info("client gone; cancelling its statement")
				cancel()
				return
			}
		}
	}
}
