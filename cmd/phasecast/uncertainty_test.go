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
