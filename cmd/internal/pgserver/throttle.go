package pgserver

import (
	"sync"
	"time"
)

// loginThrottle slows password guessing across connections. Failed logins
// are counted per user name and per client address; each failure is
// answered only after a delay that doubles with the failures counted so
// far, and failures of the same name or address queue behind each other,
// so parallel guesses are answered one after another, not all at once. A
// new attempt for a name or address with failures waits until the queue is
// through before its password is checked. A successful login clears its
// name's and its address's counts. PostgreSQL's auth_delay module delays
// each failure by a constant; the doubling and the queue are plumb's.
type loginThrottle struct {
	base time.Duration // the delay after a first failure

	mu        sync.Mutex
	state     map[string]*failures
	forgotten time.Time // when forget last swept state
}

type failures struct {
	count int
	until time.Time // when the last queued failure is answered
}

// maxLoginDelayFactor caps the doubling at 32 times the base delay (32 s with the
// default 1 s), so a name attacked from elsewhere is slowed, not locked out.
const maxLoginDelayFactor = 32

// forgetFailuresAfter is how long a quiet name or address keeps its count.
const forgetFailuresAfter = 10 * time.Minute

func newLoginThrottle(base time.Duration) *loginThrottle {
	return &loginThrottle{base: base, state: map[string]*failures{}}
}

// delay is the pause before answering the n-th failure in a row:
// base·2^(n−1), at most 32·base.
func (t *loginThrottle) delay(n int) time.Duration {
	d := t.base
	for k := 1; k < n && d < maxLoginDelayFactor*t.base; k++ {
		d *= 2
	}
	return min(d, maxLoginDelayFactor*t.base)
}

// loginKeys names what a login attempt is counted against.
func loginKeys(user, host string) []string {
	return []string{"user\x00" + user, "host\x00" + host}
}

// wait is how long an attempt for keys must wait before its password is
// checked: until the failures queued for any of them have been answered.
func (t *loginThrottle) wait(keys []string) time.Duration {
	t.mu.Lock()
	defer t.mu.Unlock()
	now := time.Now()
	var longest time.Duration
	for _, k := range keys {
		if f := t.state[k]; f != nil {
			longest = max(longest, f.until.Sub(now))
		}
	}
	return longest
}

// failed counts a failure against keys and returns how long to wait before
// answering it: behind every failure already queued for those keys, plus
// the delay its count calls for.
func (t *loginThrottle) failed(keys []string) time.Duration {
	t.mu.Lock()
	defer t.mu.Unlock()
	now := time.Now()
	t.forget(now)
	var answer time.Time
	for _, k := range keys {
		f := t.state[k]
		if f == nil {
			f = &failures{}
			t.state[k] = f
		}
		f.count++
		if f.until.Before(now) {
			f.until = now
		}
		f.until = f.until.Add(t.delay(f.count))
		if f.until.After(answer) {
			answer = f.until
		}
	}
	return answer.Sub(now)
}

// succeeded clears the counts of keys.
func (t *loginThrottle) succeeded(keys []string) {
	t.mu.Lock()
	defer t.mu.Unlock()
	for _, k := range keys {
		delete(t.state, k)
	}
}

// count is the failures counted against key.
func (t *loginThrottle) count(key string) int {
	t.mu.Lock()
	defer t.mu.Unlock()
	if f := t.state[key]; f != nil {
		return f.count
	}
	return 0
}

// forget drops the counts of names and addresses quiet for a while, so the
// table stays as small as the recent guessing.
func (t *loginThrottle) forget(now time.Time) {
	if len(t.state) < 1024 || now.Sub(t.forgotten) < time.Minute {
		return
	}
	t.forgotten = now
	for k, f := range t.state {
		if now.Sub(f.until) > forgetFailuresAfter {
			delete(t.state, k)
		}
	}
}
