package main

import (
	"strings"
	"testing"
)

// TestPhaseWarnsWhenMeaningless: `phase` says in words when the period's
// uncertainty has grown to a third of a cycle or more, and stays quiet for
// a good ephemeris.
func TestPhaseWarnsWhenMeaningless(t *testing.T) {
	out, _, code := runCmd(t, phaseArgs("--period-err", "1e-4")...)
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	if !strings.Contains(out, "Warning: ") || !strings.Contains(out, "meaningless") || !strings.Contains(out, "1σ of a predicted time") {
		t.Errorf("no warning in words for σP = 1e-4 d:\n%s", out)
	}
	m := runJSON(t, phaseArgs("--period-err", "1e-4", "--json")...)
	if w, _ := m["warning"].(string); !strings.Contains(w, "meaningless") {
		t.Errorf("JSON warning %q", w)
	}
	good, _, _ := runCmd(t, phaseArgs()...)
	if strings.Contains(good, "Warning: ") {
		t.Errorf("a warning for a good ephemeris:\n%s", good)
	}
}

// TestEventsWarnsWhenMeaningless: `events` warns in words when the timing
// error over the range reaches a third of a cycle, and not otherwise.
func TestEventsWarnsWhenMeaningless(t *testing.T) {
	out, _, code := runCmd(t, eventsArgs("--period-err", "1e-4")...)
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	if !strings.Contains(out, "Warning: ") || !strings.Contains(out, "meaningless") {
		t.Errorf("no warning in words for σP = 1e-4 d:\n%s", out)
	}
	good, _, _ := runCmd(t, eventsArgs()...)
	if strings.Contains(good, "Warning: ") {
		t.Errorf("a warning for a good ephemeris:\n%s", good)
	}
}

// TestPadSigmaFlag: --pad-sigma is read by plan, run and windows, and a
// bad value names the flag.
func TestPadSigmaFlag(t *testing.T) {
	site := []string{"--lat", "-27.85", "--lon", "-69.12", "--elev", "2650", "--tz", "America/Santiago", "--targets", "../../planner/testdata/run_targets.csv"}
	for _, argv := range [][]string{
		{"plan", "--date", "2026-12-01"},
		{"run", "--from", "2026-12-01", "--nights", "2"},
		{"windows", "--from", "2026-12-01T00:00:00Z", "--to", "2026-12-03T00:00:00Z"},
	} {
		cmd := argv[0]
		_, errOut, code := runCmd(t, append(append(argv, site...), "--pad-sigma", "11")...)
		if code != 2 || !strings.Contains(errOut, "--pad-sigma") || !strings.Contains(errOut, "0..10") {
			t.Errorf("%s --pad-sigma 11: exit %d, %q", cmd, code, errOut)
		}
		if out, errOut, code := runCmd(t, append(append(argv, site...), "--pad-sigma", "2")...); code != 0 || out == "" {
			t.Errorf("%s --pad-sigma 2: exit %d, %q", cmd, code, errOut)
		}
	}
}
