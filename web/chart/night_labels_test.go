package chart

import (
	"strconv"
	"testing"
	"time"
)

// TestEventLabelsClear: for orbits of minutes the named events come every
// few pixels; a label is drawn only where it covers no block and no other
// label, and stays inside its lane.
func TestEventLabelsClear(t *testing.T) {
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
			t.Fatalf("%s %q: %s=%q", e.name, e.text, k, e.attrs[k])
		}
		return v
	}
	var blocks, labels []box
	for _, e := range els {
		switch {
		case e.name == "rect" && hasClass(e, "blk"):
			x, y := num(e, "x"), num(e, "y")
			blocks = append(blocks, box{x, y, x + num(e, "width"), y + num(e, "height")})
		case e.name == "text" && hasClass(e, "evlabel"):
			x, y := num(e, "x"), num(e, "y")
			labels = append(labels, box{x, y - 8, x + float64(len([]rune(e.text)))*4.6, y})
		}
	}
	if len(blocks) != 3 || len(labels) == 0 {
		t.Fatalf("%d blocks and %d event labels drawn", len(blocks), len(labels))
	}
	for i, l := range labels {
		for _, b := range blocks {
			if l.overlaps(b) {
				t.Errorf("event label at (%.0f, %.0f) covers a block at (%.0f, %.0f)", l.x0, l.y1, b.x0, b.y0)
			}
		}
		for _, m := range labels[:i] {
			if l.overlaps(m) {
				t.Errorf("event labels at (%.0f, %.0f) and (%.0f, %.0f) overlap", l.x0, l.y1, m.x0, m.y1)
			}
		}
	}
}
