package chart

import (
	"math"
	"strings"
	"testing"
	"time"
)

// sampleYear is a test pattern: target i's hours follow a cosine over the
// year peaking on night 60·i (not a sky computation).
func sampleYear(n int) Year {
	y := Year{Title: "Year at <Quilla>", First: time.Date(2027, 1, 1, 0, 0, 0, 0, time.UTC), RangeFrom: 31, RangeTo: 211, Chosen: []int{40, 41, 100}}
	for i := range n {
		se := YearSeries{Label: "T" + string(rune('A'+i)) + " & co", Hours: make([]float64, 365)}
		for k := range se.Hours {
			se.Hours[k] = math.Max(0, 9*math.Cos(2*math.Pi*float64(k-60*i)/365))
		}
		y.Series = append(y.Series, se)
	}
	return y
}

func TestYearChart(t *testing.T) {
	y := sampleYear(5)
	doc := y.SVG()
	els := parseSVG(t, doc)
	checkCoordinates(t, els)
	if got := count(els, func(e element) bool { return e.name == "path" && hasClass(e, "series") }); got != 5 {
		t.Errorf("%d series paths, want 5", got)
	}
	if got := count(els, func(e element) bool { return hasClass(e, "chosen") }); got != 3 {
		t.Errorf("%d chosen ticks, want 3", got)
	}
	if got := count(els, func(e element) bool { return hasClass(e, "range") }); got != 1 {
		t.Errorf("%d range rects, want 1", got)
	}
	txt := texts(els)
	for _, want := range []string{"Jan", "Jul", "Dec", "TA & co", "TE & co", "night of 2027"} {
		if !strings.Contains(txt, want) {
			t.Errorf("chart text lacks %q", want)
		}
	}
	if strings.Contains(doc, "<Quilla>") || !strings.Contains(doc, "&lt;Quilla&gt;") {
		t.Error("title not escaped")
	}
	// The range is shaded from night 31 (1 February) to the end of night 211.
	for _, e := range els {
		if hasClass(e, "range") {
			x, wd := e.attrs["x"], e.attrs["width"]
			if x == "" || wd == "" || x == "0" {
				t.Errorf("range rect x=%q width=%q", x, wd)
			}
		}
	}
}

func TestYearChartDegenerate(t *testing.T) {
	els := parseSVG(t, Year{Title: "empty"}.SVG())
	if !strings.Contains(texts(els), "No targets.") {
		t.Error("empty chart does not say so")
	}
	y := sampleYear(1)
	y.Series[0].Hours[10] = math.NaN()
	y.RangeTo = -1
	els = parseSVG(t, y.SVG())
	checkCoordinates(t, els)
	if count(els, func(e element) bool { return hasClass(e, "range") }) != 0 {
		t.Error("range drawn although RangeTo < RangeFrom")
	}
}
