package web

import (
	"strings"
	"testing"
	"time"

	"phasecast/planner"
)

func TestZoneLabel(t *testing.T) {
	santiago, err := time.LoadLocation("America/Santiago")
	if err != nil {
		t.Fatal(err)
	}
	phoenix, err := time.LoadLocation("America/Phoenix")
	if err != nil {
		t.Fatal(err)
	}
	at := time.Date(2026, 12, 1, 3, 0, 0, 0, time.UTC)
	tests := []struct {
		name string
		loc  *time.Location
		want string
	}{
		{"NumericAbbreviation", santiago, "America/Santiago"},
		{"LetterAbbreviation", phoenix, "America/Phoenix (MST)"},
		{"UTC", time.UTC, "UTC"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := zoneLabel(tt.loc, at); got != tt.want {
				t.Errorf("zoneLabel = %q, want %q", got, tt.want)
			}
		})
	}
}

func TestAltitudeText(t *testing.T) {
	tests := []struct {
		name string
		sky  planner.SkyPoint
		want string
	}{
		{"High", planner.SkyPoint{AltRefractedDeg: 45, Airmass: 1.414, AirmassOK: true}, "45° (airmass 1.41)"},
		{"Low", planner.SkyPoint{AltRefractedDeg: 3.2, Airmass: 12.5, AirmassOK: true}, "3° (low)"},
		{"Below", planner.SkyPoint{AltRefractedDeg: -4}, "-4° (below the horizon)"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := altitudeText(tt.sky); got != tt.want {
				t.Errorf("altitudeText = %q, want %q", got, tt.want)
			}
		})
	}
}

func TestUncertaintyFormat(t *testing.T) {
	tests := []struct {
		name, got, want string
	}{
		{"PhaseSmall", fmtPhaseErr(1.8e-05), "0.000018"},
		{"Phase", fmtPhaseErr(0.00061), "0.00061"},
		{"PhaseZero", fmtPhaseErr(0), "0"},
		{"SecondsBelowOne", fmtSeconds(0.43), "0.43 s"},
		{"SecondsMicro", fmtSeconds(8.6e-5), "0.000086 s"},
		{"Seconds", fmtSeconds(12.34), "12 s"},
		{"SecondsLarge", fmtSeconds(432.1), "430 s"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if tt.got != tt.want || strings.ContainsAny(tt.got, "e+") {
				t.Errorf("got %q, want %q", tt.got, tt.want)
			}
		})
	}
}

func TestFileNameNoDoubleDash(t *testing.T) {
	tests := []struct{ base, want string }{
		{"Cerro – Ridge (north)-2026-03-14", "cerro-ridge-north-2026-03-14-night.csv"},
		{"Obs. A--B", "obs.-a-b-night.csv"},
		{"", "phasecast-night.csv"},
	}
	for _, tt := range tests {
		if got := fileName(tt.base, "night", "csv"); got != tt.want || strings.Contains(got, "--") {
			t.Errorf("fileName(%q) = %q, want %q", tt.base, got, tt.want)
		}
	}
}

// TestPulsarEventNames: with a T0 at the ascending node (pulsar timing)
// the events say whose conjunction or quadrature they are.
func TestPulsarEventNames(t *testing.T) {
	tests := []struct {
		ev   string
		conv planner.Convention
		want string
	}{
		{"inferior_conjunction", planner.ConvAscendingNode, "companion's inferior conjunction (companion in front of the pulsar)"},
		{"superior_conjunction", planner.ConvAscendingNode, "companion's superior conjunction (pulsar in front of the companion)"},
		{"max_recession", planner.ConvAscendingNode, "companion's maximum recession (pulsar approaching)"},
		{"ascending_node", planner.ConvAscendingNode, "pulsar's ascending node"},
		{"periastron", planner.ConvAscendingNode, "periastron"},
		{"inferior_conjunction", planner.ConvInferiorConjunction, "inferior conjunction"},
	}
	for _, tt := range tests {
		if got := eventName(tt.ev, tt.conv); got != tt.want {
			t.Errorf("eventName(%s, %s) = %q, want %q", tt.ev, tt.conv, got, tt.want)
		}
	}
}

// TestHorizonHelpOneLine: the horizon mask's help is one element, not a
// sentence broken across the label's grid rows.
func TestHorizonHelpOneLine(t *testing.T) {
	h := newHarness(t)
	_, body := h.get(h.client("owner"), "/sites/new")
	i := strings.Index(body, "Linear between points")
	if i < 0 {
		t.Fatal("no horizon help")
	}
	open := strings.LastIndex(body[:i], "<span")
	if open < 0 || strings.LastIndex(body[:i], "</span>") > open || !strings.Contains(body[open:i], "One point per line") {
		t.Errorf("the help is not one element: %s", body[i-200:i+50])
	}
}

func TestGoalLabelConv(t *testing.T) {
	g := planner.Goal{Center: 0.25, HalfWidth: 0.05, Event: "inferior_conjunction"}
	if got, want := goalLabelConv(g, planner.ConvAscendingNode), "companion's inferior conjunction (companion in front of the pulsar), φ 0.25 ± 0.05"; got != want {
		t.Errorf("pulsar goal = %q, want %q", got, want)
	}
	if got, want := goalLabel(g), "inferior conjunction, φ 0.25 ± 0.05"; got != want {
		t.Errorf("goal = %q, want %q", got, want)
	}
}
