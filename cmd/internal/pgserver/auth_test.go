package pgserver

import (
	"context"
	"encoding/base64"
	"net"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgproto3"
)

// scramChallenge starts a SCRAM-SHA-256 login as user and returns the
// salt and iteration count of the server's first message.
func scramChallenge(t *testing.T, addr, user string) (salt []byte, iterations string) {
	t.Helper()
	c, err := net.DialTimeout("tcp", addr, 2*time.Second)
	if err != nil {
		t.Fatal(err)
	}
	defer c.Close()
	c.SetDeadline(time.Now().Add(5 * time.Second))
	fe := pgproto3.NewFrontend(c, c)
	fe.Send(&pgproto3.StartupMessage{ProtocolVersion: pgproto3.ProtocolVersion30, Parameters: map[string]string{"user": user, "database": "plumb"}})
	if err := fe.Flush(); err != nil {
		t.Fatal(err)
	}
	if m, err := fe.Receive(); err != nil {
		t.Fatal(err)
	} else if _, ok := m.(*pgproto3.AuthenticationSASL); !ok {
		t.Fatalf("%s: got %T, want AuthenticationSASL", user, m)
	}
	fe.Send(&pgproto3.SASLInitialResponse{AuthMechanism: "SCRAM-SHA-256", Data: []byte("n,,n=,r=0123456789abcdefghijklmn")})
	if err := fe.Flush(); err != nil {
		t.Fatal(err)
	}
	m, err := fe.Receive()
	if err != nil {
		t.Fatal(err)
	}
	cont, ok := m.(*pgproto3.AuthenticationSASLContinue)
	if !ok {
		t.Fatalf("%s: got %T, want AuthenticationSASLContinue", user, m)
	}
	for _, field := range strings.Split(string(cont.Data), ",") {
		if v, ok := strings.CutPrefix(field, "s="); ok {
			if salt, err = base64.StdEncoding.DecodeString(v); err != nil {
				t.Fatal(err)
			}
		}
		if v, ok := strings.CutPrefix(field, "i="); ok {
			iterations = v
		}
	}
	return salt, iterations
}

// TestUnknownUsersLookReal: an unknown name gets a challenge of its own
// (the same salt each time, a different one from any other name), shaped
// like a real user's, so names cannot be enumerated by their salts.
func TestUnknownUsersLookReal(t *testing.T) {
	ts := startServer(t, Config{})
	ghost1, ghostIters := scramChallenge(t, ts.addr, "ghost")
	ghost2, _ := scramChallenge(t, ts.addr, "ghost")
	phantom, _ := scramChallenge(t, ts.addr, "phantom")
	ana1, anaIters := scramChallenge(t, ts.addr, "ana")
	ana2, _ := scramChallenge(t, ts.addr, "ana")
	ben, _ := scramChallenge(t, ts.addr, "ben")
	if string(ghost1) != string(ghost2) {
		t.Error("one unknown name got two different salts")
	}
	if string(ghost1) == string(phantom) {
		t.Error("two unknown names got the same salt")
	}
	if string(ana1) != string(ana2) || string(ana1) == string(ben) {
		t.Error("real users' salts are not stable per name and distinct")
	}
	if len(ghost1) != len(ana1) || ghostIters != anaIters || ghostIters == "" {
		t.Errorf("unknown user: %d-byte salt, i=%s; real user: %d-byte salt, i=%s", len(ghost1), ghostIters, len(ana1), anaIters)
	}
	// And both fail alike.
	_, errGhost := pgx.Connect(context.Background(), ts.url("ghost", "guess"))
	_, errAna := pgx.Connect(context.Background(), ts.url("ana", "guess"))
	if sqlStateOf(errGhost) != stateInvalidPassword || sqlStateOf(errAna) != stateInvalidPassword ||
		strings.ReplaceAll(errGhost.Error(), "ghost", "X") != strings.ReplaceAll(errAna.Error(), "ana", "X") {
		t.Errorf("unknown user: %v; wrong password: %v", errGhost, errAna)
	}
}

// TestLoginDelay: the pause before answering the n-th failure in a row,
// base·2^(n−1) capped at 32·base (the rule in throttle.go).
func TestLoginDelay(t *testing.T) {
	th := newLoginThrottle(10 * time.Millisecond)
	for n, want := range []time.Duration{10, 20, 40, 80, 160, 320, 320, 320} {
		if got := th.delay(n + 1); got != want*time.Millisecond {
			t.Errorf("failure %d: %v, want %v", n+1, got, want*time.Millisecond)
		}
	}
}

// TestLoginThrottleKeys: failures count per name and per address, across
// connections, and a success clears both.
func TestLoginThrottleKeys(t *testing.T) {
	th := newLoginThrottle(time.Second)
	th.failed(loginKeys("ana", "10.0.0.1"))
	for _, test := range []struct {
		user, host string
		waits      bool
	}{
		{"ana", "10.0.0.1", true},  // the same name and address
		{"ben", "10.0.0.1", true},  // another name from the same address
		{"ana", "10.0.0.2", true},  // the same name from elsewhere
		{"ben", "10.0.0.2", false}, // neither
	} {
		if w := th.wait(loginKeys(test.user, test.host)); (w > 0) != test.waits {
			t.Errorf("%s from %s waits %v", test.user, test.host, w)
		}
	}
	if d := th.failed(loginKeys("ana", "10.0.0.1")); d < th.delay(1)+th.delay(2)-50*time.Millisecond {
		t.Errorf("a second failure is answered after %v, want it queued behind the first", d)
	}
	th.succeeded(loginKeys("ana", "10.0.0.1"))
	if n := th.count("user\x00ana") + th.count("host\x0010.0.0.1"); n != 0 {
		t.Errorf("after a success %d failures remain", n)
	}
}

// TestParallelGuessesQueue: wrong passwords tried in parallel for one user
// are answered one after another, each after its growing delay, so that all
// of them together take at least the sum of those delays; a right password
// then gets in and clears the count.
func TestParallelGuessesQueue(t *testing.T) {
	ts := startServer(t, Config{})
	const guesses = 8
	var wg sync.WaitGroup
	codes := make([]string, guesses)
	start := time.Now()
	for g := range guesses {
		wg.Add(1)
		go func() {
			defer wg.Done()
			_, err := pgx.Connect(context.Background(), ts.url("ana", "guess"+string(rune('a'+g))))
			codes[g] = sqlStateOf(err)
		}()
	}
	wg.Wait()
	elapsed := time.Since(start)
	var least time.Duration
	for n := 1; n <= guesses; n++ {
		least += ts.srv.logins.delay(n)
	}
	for g, code := range codes {
		if code != stateInvalidPassword {
			t.Errorf("guess %d: SQLSTATE %q, want 28P01", g, code)
		}
	}
	if n := ts.srv.logins.count("user\x00ana"); n != guesses {
		t.Errorf("%d failures counted for ana, want %d", n, guesses)
	}
	if elapsed < least {
		t.Errorf("%d parallel guesses took %v, less than the %v their delays add up to", guesses, elapsed, least)
	}
	stillServes(t, ts) // waits its turn, then logs in
	if n := ts.srv.logins.count("user\x00ana"); n != 0 {
		t.Errorf("after a good login %d failures remain counted", n)
	}
}
