package loadtest

import (
	"flag"
	"fmt"
	"os"
	"strconv"
	"testing"
	"time"
)

// Flags for running the tests by hand; each has an environment variable
// with the same effect (the flag wins when both are given).
var (
	flagDuration = flag.Duration("duration", 0, "load test: how long the clients run (PHASECAST_LOAD_DURATION); default 5s short, 60s full")
	flagClients  = flag.Int("clients", 0, "load test: concurrent clients (PHASECAST_LOAD_CLIENTS); default 50 short, 100 full")
	flagSeed     = flag.Int64("seed", 0, "crash test: seed of the random kill moments and writes (PHASECAST_CRASH_SEED); default 1")
	flagKills    = flag.Int("kills", 0, "crash test: how many times the server is killed (PHASECAST_CRASH_KILLS); default 20")
)

// Bounds on what the tests accept, so that no setting runs away.
const (
	maxDuration = 10 * time.Minute
	maxClients  = 1000
	maxKills    = 200
)

// loadConfig is what TestLoad runs.
type loadConfig struct {
	mode     string // short or full
	duration time.Duration
	clients  int
}

// loadSettings reads PHASECAST_LOAD (short or full; the test skips when it
// is unset) and the overrides.
func loadSettings(tb testing.TB) loadConfig {
	tb.Helper()
	var c loadConfig
	switch mode := os.Getenv("PHASECAST_LOAD"); mode {
	case "":
		tb.Skip("load test skipped: set PHASECAST_LOAD=short (5 s, 50 clients) or PHASECAST_LOAD=full (60 s, 100 clients)")
	case "short":
		c = loadConfig{mode: mode, duration: 5 * time.Second, clients: 50}
	case "full":
		c = loadConfig{mode: mode, duration: 60 * time.Second, clients: 100}
	default:
		tb.Fatalf("PHASECAST_LOAD=%q is not accepted; accepted: short or full (or unset to skip)", mode)
	}
	if d, ok := durationSetting(tb, "PHASECAST_LOAD_DURATION", *flagDuration); ok {
		c.duration = d
	}
	if n, ok := intSetting(tb, "PHASECAST_LOAD_CLIENTS", *flagClients, 1, maxClients); ok {
		c.clients = n
	}
	return c
}

// crashConfig is what TestCrashSafety runs.
type crashConfig struct {
	seed  int64
	kills int
}

// crashSettings reads PHASECAST_CRASH (the test skips unless it is 1) and
// the overrides.
func crashSettings(tb testing.TB) crashConfig {
	tb.Helper()
	switch v := os.Getenv("PHASECAST_CRASH"); v {
	case "":
		tb.Skip("crash test skipped: set PHASECAST_CRASH=1 to run it (about 30 s)")
	case "1":
	default:
		tb.Fatalf("PHASECAST_CRASH=%q is not accepted; accepted: 1 (or unset to skip)", v)
	}
	c := crashConfig{seed: 1, kills: 20}
	if *flagSeed != 0 {
		c.seed = *flagSeed
	} else if s := os.Getenv("PHASECAST_CRASH_SEED"); s != "" {
		v, err := strconv.ParseInt(s, 10, 64)
		if err != nil {
			tb.Fatalf("PHASECAST_CRASH_SEED=%q is not accepted; accepted: an integer", s)
		}
		c.seed = v
	}
	if n, ok := intSetting(tb, "PHASECAST_CRASH_KILLS", *flagKills, 1, maxKills); ok {
		c.kills = n
	}
	return c
}

// durationSetting returns the flag value if set, else the environment
// variable's, checked against (0, maxDuration].
func durationSetting(tb testing.TB, env string, fl time.Duration) (time.Duration, bool) {
	tb.Helper()
	d, src := fl, "-duration"
	if d == 0 {
		s := os.Getenv(env)
		if s == "" {
			return 0, false
		}
		var err error
		if d, err = time.ParseDuration(s); err != nil {
			tb.Fatalf("%s=%q is not accepted; accepted: a Go duration such as 60s or 2m", env, s)
		}
		src = env
	}
	if d <= 0 || d > maxDuration {
		tb.Fatalf("%s %v is not accepted; accepted: more than 0 and at most %v", src, d, maxDuration)
	}
	return d, true
}

// intSetting returns the flag value if set, else the environment
// variable's, checked against [lo, hi].
func intSetting(tb testing.TB, env string, fl, lo, hi int) (int, bool) {
	tb.Helper()
	n, src := fl, "flag"
	if n == 0 {
		s := os.Getenv(env)
		if s == "" {
			return 0, false
		}
		var err error
		if n, err = strconv.Atoi(s); err != nil {
			tb.Fatalf("%s=%q is not accepted; accepted: an integer %d..%d", env, s, lo, hi)
		}
		src = env
	}
	if n < lo || n > hi {
		tb.Fatalf("%s %d is not accepted; accepted: %d..%d", src, n, lo, hi)
	}
	return n, true
}

// describe is a one-line summary of the settings for the log.
func (c loadConfig) describe() string {
	return fmt.Sprintf("mode %s, %d clients, %v", c.mode, c.clients, c.duration)
}
