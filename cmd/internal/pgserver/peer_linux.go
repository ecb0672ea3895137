package pgserver

import (
	"net"
	"syscall"

	"golang.org/x/sys/unix"
)

// peerGone polls c's socket for POLLRDHUP (the peer shut down its end,
// even with unread data pending), POLLHUP or POLLERR, without waiting.
func peerGone(c net.Conn) bool {
	sc, ok := c.(syscall.Conn)
	if !ok {
		return false
	}
	raw, err := sc.SyscallConn()
	if err != nil {
		return false
	}
	gone := false
	raw.Control(func(fd uintptr) {
		fds := []unix.PollFd{{Fd: int32(fd), Events: unix.POLLRDHUP}}
		if n, err := unix.Poll(fds, 0); err == nil && n > 0 {
			gone = fds[0].Revents&(unix.POLLRDHUP|unix.POLLHUP|unix.POLLERR) != 0
		}
	})
	return gone
}
