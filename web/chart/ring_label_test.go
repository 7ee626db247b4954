package chart

import (
	"strconv"
	"strings"
	"testing"
)

// labelSpan returns the horizontal extent of a text element as drawn with
// its text-anchor, at the 5.2 px per character the ring's labels assume.
func labelSpan(tb testing.TB, e element) (x0, x1 float64) {
	tb.Helper()
	x, err := strconv.ParseFloat(e.attrs["x"], 64)
	if err != nil {
		tb.Fatalf("text %q has no x", e.text)
	}
	w := float64(len([]rune(e.text))) * 5.2
	switch e.attrs["text-anchor"] {
	case "end":
		return x - w, x
	case "middle":
		return x - w/2, x + w/2
	}
	return x, x + w
}

// TestRingEclipseLabels: an eclipse's ingress comes before phase 0 (left
// of the top), its egress after (right of it); each label must stay on its
// own arc's side, not over the other contact.
func TestRingEclipseLabels(t *testing.T) {
	r := Ring{Title: "eclipsing", Goals: []Arc{
		{0.97, 0.99, "eclipse ingress", false},
		{0.99, 0.01, "eclipse", false},
		{0.01, 0.03, "eclipse egress", false},
		{0.48, 0.50, "secondary ingress", false},
		{0.50, 0.52, "secondary egress", false},
	}}
	els := parseSVG(t, r.SVG())
	c := 120.0
	for _, e := range els {
		if e.name != "text" || !strings.Contains(e.text, "ingress") && !strings.Contains(e.text, "egress") {
			continue
		}
		x0, x1 := labelSpan(t, e)
		top := !strings.HasPrefix(e.text, "secondary")
		// At the top the ingress (phase < 1) is left of the centre line; at
		// the bottom (phase < 0.5) it is right of it, the ring running
		// clockwise.
		wantLeft := strings.Contains(e.text, "ingress") == top
		if wantLeft && x1 > c {
			t.Errorf("%q spans x %.0f–%.0f, crossing to the right of %g where the other contact is", e.text, x0, x1, c)
		}
		if !wantLeft && x0 < c {
			t.Errorf("%q spans x %.0f–%.0f, crossing to the left of %g where the other contact is", e.text, x0, x1, c)
		}
	}
}

// TestRingLegendBins: the inner grey band of coverage counts has its own
// legend entry when drawn, none when it is not.
func TestRingLegendBins(t *testing.T) {
	with := Ring{Title: "t", Goals: []Arc{{0.2, 0.3, "Q1", true}}, Bins: []Bin{{0.2, 0.3, 4}}}
	els := parseSVG(t, with.SVG())
	checkCoordinates(t, els)
	if !strings.Contains(texts(els), "grey inner bars: exposures per phase bin") {
		t.Errorf("legend lacks the inner bars: %q", texts(els))
	}
	if count(els, func(e element) bool { return hasClass(e, "bin-key") }) != 1 {
		t.Error("no grey swatch for the inner bars")
	}
	without := Ring{Title: "t", Goals: []Arc{{0.2, 0.3, "Q1", true}}}
	if strings.Contains(texts(parseSVG(t, without.SVG())), "inner bars") {
		t.Error("legend names inner bars that are not drawn")
	}
}
