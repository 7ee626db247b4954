// Package testclock gives tests the instant they run at, so that the suite
// passes on any date: PHASECAST_TEST_NOW (RFC 3339) when it is set, the
// test's own fixed default otherwise. Only test files import it (the
// layering test enforces that); the program itself never reads the variable.
package testclock

import (
	"os"
	"strconv"
	"sync"
	"testing"
	"time"
)

// Env is the environment variable that moves every test's clock.
const Env = "PHASECAST_TEST_NOW"

// Now returns the instant named by PHASECAST_TEST_NOW, or def when the
// variable is unset or empty. A value that is not RFC 3339 fails the test.
func Now(tb testing.TB, def time.Time) time.Time {
	tb.Helper()
	v := os.Getenv(Env)
	if v == "" {
		return def.UTC()
	}
	t, err := time.Parse(time.RFC3339, v)
	if err != nil {
		tb.Fatalf("%s=%q: not an RFC 3339 instant (e.g. 2031-06-01T00:00:00Z)", Env, v)
	}
	return t.UTC()
}

// Clock is a clock a test can move, safe for concurrent use.
type Clock struct {
	mu sync.Mutex
	t  time.Time
}

// Start returns a Clock at Now(tb, def).
func Start(tb testing.TB, def time.Time) *Clock {
	tb.Helper()
	return &Clock{t: Now(tb, def)}
}

// At returns a Clock stopped at t, whatever PHASECAST_TEST_NOW says: for the
// few tests whose subject is one fixed date.
func At(t time.Time) *Clock { return &Clock{t: t.UTC()} }

// Now is the clock's reading; pass the method value (c.Now) as a clock.
func (c *Clock) Now() time.Time {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.t
}

// Advance moves the clock by d.
func (c *Clock) Advance(d time.Duration) {
	c.mu.Lock()
	c.t = c.t.Add(d)
	c.mu.Unlock()
}

// Set puts the clock at t.
func (c *Clock) Set(t time.Time) {
	c.mu.Lock()
	c.t = t.UTC()
	c.mu.Unlock()
}

// Or is Now for package-level variables, which have no testing.TB: the
// instant named by PHASECAST_TEST_NOW, or def. A malformed value panics with
// a message naming the variable, the value and the accepted form.
func Or(def time.Time) time.Time {
	v := os.Getenv(Env)
	if v == "" {
		return def.UTC()
	}
	t, err := time.Parse(time.RFC3339, v)
	if err != nil {
		panic(Env + "=" + strconv.Quote(v) + ": not an RFC 3339 instant (e.g. 2031-06-01T00:00:00Z)")
	}
	return t.UTC()
}
