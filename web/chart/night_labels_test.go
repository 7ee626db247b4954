package chart

import (
	"strconv"
	"strings"
	"testing"
	"time"
)

// TestPhaseLabelsKeepNamesClear: for orbits of minutes the phase labels
// along a track come every few pixels; none may cover a target's name.
func TestPhaseLabelsKeepNamesClear(t *testing.T) {
	night := sampleNight(3, time.Minute)
	for k := range night.Tracks {
		tr := &night.Tracks[k]
		for j := range tr.Points {
			tr.Points[j].Phase = float64(tr.Points[j].T.Sub(night.Start)%(18*time.Minute)) / float64(18*time.Minute)
		}
	}
	els := parseSVG(t, night.SVG())
	num := func(e element, k string) float64 {
		v, err := strconv.ParseFloat(e.attrs[k], 64)
		if err != nil {
			t.Fatalf("text %q: %s=%q", e.text, k, e.attrs[k])
		}
		return v
	}
	var names, phases []box
	for _, e := range els {
		if e.name != "text" {
			continue
		}
		x, y := num(e, "x"), num(e, "y")
		n := float64(len([]rune(e.text)))
		switch {
		case hasClass(e, "lbl"):
			names = append(names, box{x - n*3.4 - 2, y - 10, x + n*3.4 + 2, y + 2})
		case strings.HasPrefix(e.text, "φ") && !hasClass(e, "onblock"):
			phases = append(phases, box{x, y - 9, x + n*5, y + 2})
		}
	}
	if len(names) != 3 || len(phases) == 0 {
		t.Fatalf("%d names and %d phase labels drawn", len(names), len(phases))
	}
	for _, p := range phases {
		for _, nm := range names {
			if p.overlaps(nm) {
				t.Errorf("phase label at (%.0f, %.0f) covers a target name at (%.0f, %.0f)", p.x0, p.y1, nm.x0, nm.y1)
			}
		}
	}
}
