package pgserver

import (
	"errors"
	"fmt"
	"net"
	"time"
)

// Connection limits, after PostgreSQL's postmaster: every accepted
// connection holds one of --max-connections slots from accept on, logged in
// or not, and must finish logging in within --auth-timeout
// (authentication_timeout); a connection beyond the limit is told so
// (53300) by a short-lived handler, of which there are at most as many
// again; past that, a connection is closed unanswered.

// refusalTimeout bounds how long a connection beyond the limit may take to
// send the startup packet its refusal answers.
const refusalTimeout = 2 * time.Second

// admission is what a newly accepted connection gets.
type admission int

const (
	admitted   admission = iota // holds a slot
	turnedAway                  // is told the server is full
	dropped                     // is closed unanswered
)

// admit takes a slot for a new connection, or a refusal handler's place.
func (s *Server) admit() admission {
	s.mu.Lock()
	defer s.mu.Unlock()
	switch {
	case s.open < s.cfg.MaxConns:
		s.open++
		return admitted
	case s.refusing < s.cfg.MaxConns:
		s.refusing++
		return turnedAway
	}
	return dropped
}

// release gives back what admit took.
func (s *Server) release(a admission) {
	s.mu.Lock()
	defer s.mu.Unlock()
	switch a {
	case admitted:
		s.open--
	case turnedAway:
		s.refusing--
	}
}

// serveConn runs one accepted connection in its own goroutine.
func (s *Server) serveConn(c net.Conn) {
	a := s.admit()
	if a == dropped {
		c.Close()
		s.noteDropped()
		return
	}
	s.wg.Add(1)
	go func() {
		defer s.wg.Done()
		defer s.release(a)
		defer func() {
			// A bug met by one client's input ends that session, not
			// the server and everyone else's.
			if r := recover(); r != nil {
				s.log.Error("session ended by an internal error", "remote", c.RemoteAddr().String(), "panic", fmt.Sprint(r))
				c.Close()
			}
		}()
		s.handle(c, a == turnedAway)
	}()
}

// noteDropped logs connections closed unanswered, at most once a second
// (with how many), so that a flood does not flood the log too.
func (s *Server) noteDropped() {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.dropped++
	if time.Since(s.droppedLogged) < time.Second {
		return
	}
	s.log.Warn("connections closed unanswered: the server is full", "count", s.dropped, "max_connections", s.cfg.MaxConns)
	s.dropped, s.droppedLogged = 0, time.Now()
}

// acceptBackoff is the pause before accepting again after Accept failed
// (for instance with EMFILE, too many open files): 5 ms, doubling up to
// 1 s, as net/http's Server does, so a passing shortage of file descriptors
// slows the server down instead of stopping it.
func acceptBackoff(previous time.Duration) time.Duration {
	if previous == 0 {
		return 5 * time.Millisecond
	}
	return min(2*previous, time.Second)
}

// acceptLoop accepts until the listener is closed.
func (s *Server) acceptLoop(ln net.Listener) error {
	var backoff time.Duration
	for {
		c, err := ln.Accept()
		if err != nil {
			if s.closing.Load() {
				return nil
			}
			if errors.Is(err, net.ErrClosed) {
				return err
			}
			backoff = acceptBackoff(backoff)
			s.log.Warn("accept failed; retrying", "error", err.Error(), "retry_in", backoff.String())
			time.Sleep(backoff)
			continue
		}
		backoff = 0
		s.serveConn(c)
	}
}
