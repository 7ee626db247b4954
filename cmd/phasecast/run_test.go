package main

import (
	"bytes"
	"context"
	"encoding/json"
	"io"
	"phasecast/store/testclock"
	"strings"
	"testing"
	"time"
)

// The invented site used throughout the tests: "Cerro Quilla Observatory",
// lat −27.85°, lon −69.12° (west), 2650 m.
var siteArgs = []string{"--lat", "-27.85", "--lon", "-69.12", "--elev", "2650"}

// targetArgs is an invented target.
var targetArgs = []string{"--ra", "09:53:00.0", "--dec", "-06:07:30"}

func args(parts ...[]string) []string {
	var out []string
	for _, p := range parts {
		out = append(out, p...)
	}
	return out
}

// runCmd runs the program in-process and returns its output and exit code.
func runCmd(tb testing.TB, argv ...string) (stdout, stderr string, code int) {
	tb.Helper()
	var out, errOut bytes.Buffer
	err := run(context.Background(), testClock(tb), argv, &out, &errOut)
	return out.String(), errOut.String(), exitCode(err)
}

// runJSON runs a command with --json, checks it succeeded with one JSON
// object on stdout and nothing on stderr, and returns the object.
func runJSON(tb testing.TB, argv ...string) map[string]any {
	tb.Helper()
	stdout, stderr, code := runCmd(tb, append(argv, "--json")...)
	if code != 0 || stderr != "" {
		tb.Fatalf("phasecast %s: exit %d, stderr %q", strings.Join(argv, " "), code, stderr)
	}
	dec := json.NewDecoder(strings.NewReader(stdout))
	dec.UseNumber()
	var m map[string]any
	if err := dec.Decode(&m); err != nil {
		tb.Fatalf("stdout is not a JSON object: %v\n%s", err, stdout)
	}
	if dec.More() {
		tb.Fatalf("stdout holds more than one JSON value:\n%s", stdout)
	}
	return m
}

// num returns the JSON number under key, failing if it is absent or not a number.
func num(tb testing.TB, m map[string]any, key string) float64 {
	tb.Helper()
	v, ok := m[key]
	if !ok {
		tb.Fatalf("key %q missing from %v", key, m)
	}
	n, ok := v.(json.Number)
	if !ok {
		tb.Fatalf("%s = %v (%T), want a number", key, v, v)
	}
	x, err := n.Float64()
	if err != nil {
		tb.Fatalf("%s = %v: %v", key, n, err)
	}
	return x
}

// hasKeys fails unless m has exactly the keys given.
func hasKeys(tb testing.TB, m map[string]any, keys ...string) {
	tb.Helper()
	for _, k := range keys {
		if _, ok := m[k]; !ok {
			tb.Errorf("key %q missing", k)
		}
	}
	if len(m) != len(keys) {
		tb.Errorf("got %d keys %v, want %d: %v", len(m), m, len(keys), keys)
	}
}

func TestOverview(t *testing.T) {
	for _, argv := range [][]string{{"help"}, {"--help"}} {
		stdout, stderr, code := runCmd(t, argv...)
		if code != 0 || stderr != "" {
			t.Fatalf("phasecast %v: exit %d, stderr %q", argv, code, stderr)
		}
		for _, c := range commands() {
			if !strings.Contains(stdout, "  "+c.name+" ") {
				t.Errorf("overview does not list %q:\n%s", c.name, stdout)
			}
		}
	}
}

func TestCommandHelp(t *testing.T) {
	for _, c := range commands() {
		t.Run(c.name, func(t *testing.T) {
			stdout, stderr, code := runCmd(t, c.name, "-h")
			if code != 0 || stderr != "" {
				t.Fatalf("exit %d, stderr %q", code, stderr)
			}
			if !strings.HasPrefix(stdout, "Usage: phasecast "+c.name) || !strings.Contains(stdout, "--json") {
				t.Errorf("help does not look like a usage text:\n%s", stdout)
			}
		})
	}
}

// TestBadInput: every bad command line exits non-zero with one line on
// stderr that names the flag, shows the value and says what is accepted.
func TestBadInput(t *testing.T) {
	sky := func(extra ...string) []string {
		return args([]string{"sky"}, siteArgs, targetArgs, []string{"--at", "2026-12-01T03:00:00Z"}, extra)
	}
	night := func(extra ...string) []string {
		return args([]string{"night"}, siteArgs, []string{"--date", "2026-12-01", "--tz", "America/Santiago"}, extra)
	}
	phase := func(extra ...string) []string {
		return args([]string{"phase"}, siteArgs, targetArgs, []string{"--at", "2026-12-01T03:00:00Z", "--t0", "2460700.123456", "--period", "0.0612345"}, extra)
	}
	tests := []struct {
		name string
		argv []string
		want []string // substrings of the one stderr line
	}{
		{"LatOutOfRange", sky("--lat", "95"), []string{"--lat 95", "out of range", "−90..90"}},
		{"LatNotNumber", sky("--lat", "north"), []string{"--lat north", "not a number", "−90..90"}},
		{"LatNaN", sky("--lat", "NaN"), []string{"--lat NaN", "−90..90"}},
		{"LatInf", sky("--lat", "-Inf"), []string{"--lat -Inf", "−90..90"}},
		{"LatHex", sky("--lat", "0x10"), []string{"--lat 0x10"}},
		{"LonOutOfRange", sky("--lon", "-200"), []string{"--lon -200", "−180..180", "east"}},
		{"ElevOutOfRange", sky("--elev", "9500"), []string{"--elev 9500", "−500..9000"}},
		{"RAHours24", sky("--ra", "24:00:00"), []string{"--ra 24:00:00", "0h ≤ RA < 24h"}},
		{"RADegrees360", sky("--ra", "360"), []string{"--ra 360", "0 ≤ RA < 360"}},
		{"RASeconds60", sky("--ra", "09:53:60"), []string{"--ra 09:53:60", "below 60"}},
		{"RAGarbage", sky("--ra", "9h53m00s junk"), []string{`--ra "9h53m00s junk"`}},
		{"DecOutOfRange", sky("--dec", "91"), []string{"--dec 91", "−90..90"}},
		{"DecMinutes60", sky("--dec", "-06:60:00"), []string{"--dec -06:60:00", "below 60"}},
		{"TimeGarbage", sky("--at", "tomorrow"), []string{"--at tomorrow", "RFC 3339"}},
		{"TimeTooEarly", sky("--at", "1700-01-01T00:00:00Z"), []string{"--at 1700-01-01T00:00:00Z", "1800"}},
		{"PMNotNumber", sky("--pmra", "fast"), []string{"--pmra fast", "milliarcseconds"}},
		{"MissingLat", []string{"sky", "--lon", "10", "--ra", "1", "--dec", "1"}, []string{"missing --lat"}},
		{"MissingLon", []string{"sky", "--lat", "10", "--ra", "1", "--dec", "1"}, []string{"missing --lon"}},
		{"MissingRA", args([]string{"sky"}, siteArgs, []string{"--dec", "1"}), []string{"missing --ra"}},
		{"MissingDec", args([]string{"sky"}, siteArgs, []string{"--ra", "1"}), []string{"missing --dec"}},
		{"FlagWithoutValue", sky("--lat"), []string{"--lat", "needs an argument"}},
		{"UnknownFlag", sky("--latitude", "5"), []string{"unknown flag", "--latitude"}},
		{"Positional", sky("extra"), []string{`unexpected argument "extra"`}},
		{"JSONWithValue", sky("--json=yes"), []string{"--json", "yes"}},
		{"UnknownCommand", []string{"skies"}, []string{`unknown command "skies"`, "sky, night"}},
		{"NightUnknownZone", night("--tz", "Mars/Olympus_Mons"), []string{"--tz Mars/Olympus_Mons", "IANA"}},
		{"NightLocalZone", night("--tz", "Local"), []string{"--tz Local", "IANA"}},
		{"NightMissingZone", args([]string{"night"}, siteArgs, []string{"--date", "2026-12-01"}), []string{"missing --tz"}},
		{"NightBadDate", night("--date", "2026-02-30"), []string{"--date 2026-02-30", "YYYY-MM-DD"}},
		{"NightLatOutOfRange", night("--lat", "-90.5"), []string{"--lat -90.5", "−90..90"}},
		{"BJDBadTime", args([]string{"bjd"}, siteArgs, targetArgs, []string{"--at", "2026-12-01T25:00:00Z"}), []string{"--at 2026-12-01T25:00:00Z"}},
		{"PhasePeriodZero", phase("--period", "0"), []string{"--period 0", "period > 0"}},
		{"PhasePeriodNegative", phase("--period", "-0.06"), []string{"--period -0.06", "period > 0"}},
		{"PhasePeriodNaN", phase("--period", "NaN"), []string{"--period NaN"}},
		{"PhaseT0ErrNegative", phase("--t0-err", "-0.0001"), []string{"--t0-err -0.0001", "≥ 0"}},
		{"PhasePeriodErrNegative", phase("--period-err", "-1e-9"), []string{"--period-err -1e-9", "≥ 0"}},
		{"PhaseT0Garbage", phase("--t0", "2460700.12x"), []string{"--t0 2460700.12x"}},
		{"PhaseT0AsMJDInJDForm", phase("--t0", "60700.123"), []string{"--t0 60700.123", "MJD"}},
		{"PhaseUnknownStandard", phase("--t0-std", "HJD"), []string{"--t0-std HJD", "BJD_TDB"}},
		{"PhaseUnknownForm", phase("--t0-form", "JDN"), []string{"--t0-form JDN", "MJD"}},
		{"PhaseMissingT0", args([]string{"phase"}, siteArgs, targetArgs, []string{"--period", "0.06"}), []string{"missing --t0"}},
		{"PhaseMissingPeriod", args([]string{"phase"}, siteArgs, targetArgs, []string{"--t0", "2460700.5"}), []string{"missing --period"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			stdout, stderr, code := runCmd(t, tc.argv...)
			if code == 0 {
				t.Fatalf("phasecast %s: exit 0, want an error", strings.Join(tc.argv, " "))
			}
			if stdout != "" {
				t.Errorf("stdout = %q, want nothing on error", stdout)
			}
			if strings.Count(stderr, "\n") != 1 || !strings.HasSuffix(stderr, "\n") || !strings.HasPrefix(stderr, "phasecast: ") {
				t.Errorf("stderr = %q, want one line starting \"phasecast: \"", stderr)
			}
			for _, w := range tc.want {
				if !strings.Contains(stderr, w) {
					t.Errorf("stderr %q does not contain %q", stderr, w)
				}
			}
		})
	}
}

func TestExitCodes(t *testing.T) {
	tests := []struct {
		name string
		err  error
		want int
	}{
		{"OK", nil, exitOK},
		{"Usage", usageErrorf("bad"), exitUsage},
		{"Internal", &internalError{msg: "boom"}, exitInternal},
		{"Other", context.Canceled, exitFailure},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := exitCode(tc.err); got != tc.want {
				t.Errorf("exitCode(%v) = %d, want %d", tc.err, got, tc.want)
			}
		})
	}
}

func TestPanicBecomesError(t *testing.T) {
	var out, errOut bytes.Buffer
	err := func() (err error) {
		// The same recover path as run's, exercised with a command that panics.
		defer func() {
			if r := recover(); r != nil {
				t.Fatalf("panic escaped: %v", r)
			}
		}()
		return runWith(context.Background(), testClock(t), []command{{"boom", "panics", func(context.Context, func() time.Time, []string, io.Writer, io.Writer) error {
			panic("deliberate")
		}}}, []string{"boom"}, &out, &errOut)
	}()
	if exitCode(err) != exitInternal {
		t.Errorf("exit code %d, want %d", exitCode(err), exitInternal)
	}
	if line := errOut.String(); strings.Count(line, "\n") != 1 || !strings.Contains(line, "internal error: deliberate") {
		t.Errorf("stderr = %q, want one line reporting the internal error", line)
	}
}

// TestFlagsWithoutCommandAreServes: "phasecast --addr X" is "phasecast serve
// --addr X" (checked through serve's own flag validation, so no server starts).
func TestFlagsWithoutCommandAreServes(t *testing.T) {
	_, stderr, code := runCmd(t, "--addr", "no-port-here")
	if code != exitUsage || !strings.Contains(stderr, "--addr no-port-here") || !strings.Contains(stderr, "HOST:PORT") {
		t.Errorf("exit %d, stderr %q; want serve's --addr message", code, stderr)
	}
}

// testNow is the instant the command tests run at: PHASECAST_TEST_NOW when
// set, else an afternoon in December 2026 (UTC). Commands read it only where
// the user gave no date or instant.
var testNow = testclock.Or(time.Date(2026, 12, 1, 18, 0, 0, 0, time.UTC))

// testClock is the clock handed to run() in tests.
func testClock(tb testing.TB) func() time.Time {
	tb.Helper()
	return func() time.Time { return testNow }
}
