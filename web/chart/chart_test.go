package chart

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"
)

// element is one parsed SVG element with its attributes.
type element struct {
	name  string
	attrs map[string]string
	text  string
}

// parseSVG checks that doc is well-formed XML with an <svg> root and
// returns its elements in document order.
func parseSVG(tb testing.TB, doc string) []element {
	tb.Helper()
	dec := xml.NewDecoder(strings.NewReader(doc))
	var els []element
	var stack []int
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			tb.Fatalf("SVG is not well-formed XML: %v\n%s", err, head(doc))
		}
		switch t := tok.(type) {
		case xml.StartElement:
			e := element{name: t.Name.Local, attrs: map[string]string{}}
			for _, a := range t.Attr {
				e.attrs[a.Name.Local] = a.Value
			}
			els = append(els, e)
			stack = append(stack, len(els)-1)
		case xml.EndElement:
			stack = stack[:len(stack)-1]
		case xml.CharData:
			if len(stack) > 0 {
				els[stack[len(stack)-1]].text += string(t)
			}
		}
	}
	if len(els) == 0 || els[0].name != "svg" {
		tb.Fatalf("root element is not <svg>:\n%s", head(doc))
	}
	return els
}

func head(s string) string {
	if len(s) > 400 {
		return s[:400] + "…"
	}
	return s
}

// viewBox returns the width and height of the root's viewBox.
func viewBox(tb testing.TB, root element) (w, h float64) {
	tb.Helper()
	f := strings.Fields(root.attrs["viewBox"])
	if len(f) != 4 {
		tb.Fatalf("viewBox = %q", root.attrs["viewBox"])
	}
	w, _ = strconv.ParseFloat(f[2], 64)
	h, _ = strconv.ParseFloat(f[3], 64)
	return w, h
}

// checkCoordinates fails when a coordinate attribute is not a number or lies
// far outside the drawing (a few pixels of slack for strokes and labels).
func checkCoordinates(tb testing.TB, els []element) {
	tb.Helper()
	w, h := viewBox(tb, els[0])
	xs := []string{"x", "x1", "x2", "cx"}
	ys := []string{"y", "y1", "y2", "cy"}
	check := func(e element, name string, lim float64) {
		v, ok := e.attrs[name]
		if !ok {
			return
		}
		f, err := strconv.ParseFloat(v, 64)
		if err != nil || math.IsNaN(f) || f < -20 || f > lim+20 {
			tb.Errorf("<%s %s=%q>: not a coordinate within 0..%g", e.name, name, v, lim)
		}
	}
	for _, e := range els {
		if e.name == "pattern" || e.name == "clipPath" {
			continue
		}
		for _, a := range xs {
			check(e, a, w)
		}
		for _, a := range ys {
			check(e, a, h)
		}
		if d, ok := e.attrs["d"]; ok {
			for _, f := range strings.FieldsFunc(d, func(r rune) bool { return strings.ContainsRune("MLAZ ,", r) }) {
				v, err := strconv.ParseFloat(f, 64)
				if err != nil || math.IsNaN(v) || v < -20 || v > math.Max(w, h)+20 {
					tb.Errorf("<%s d=…%s…>: bad path number", e.name, f)
					break
				}
			}
		}
	}
}

func count(els []element, pred func(element) bool) int {
	n := 0
	for _, e := range els {
		if pred(e) {
			n++
		}
	}
	return n
}

func hasClass(e element, c string) bool {
	for _, f := range strings.Fields(e.attrs["class"]) {
		if f == c {
			return true
		}
	}
	return false
}

func texts(els []element) string {
	var b strings.Builder
	for _, e := range els {
		if e.name == "text" {
			b.WriteString(e.text)
			b.WriteByte('\n')
		}
	}
	return b.String()
}

// sampleNight builds an invented night: n targets whose altitude follows a
// smooth arch (a test pattern, not a sky computation) and whose phase
// advances with a period of 1.5 + i/4 hours.
func sampleNight(n int, step time.Duration) Night {
	start := time.Date(2026, 3, 14, 18, 0, 0, 0, time.UTC)
	end := start.Add(12 * time.Hour)
	zone := time.FixedZone("XST", -3*3600)
	night := Night{
		Title: "Night of 2026-03-14", Start: start, End: end, Zone: zone,
		Bands: []Band{
			{start, start.Add(30 * time.Minute), "day"},
			{start.Add(30 * time.Minute), start.Add(60 * time.Minute), "civil"},
			{start.Add(60 * time.Minute), start.Add(90 * time.Minute), "nautical"},
			{start.Add(90 * time.Minute), start.Add(2 * time.Hour), "astronomical"},
			{start.Add(2 * time.Hour), end.Add(-2 * time.Hour), "night"},
			{end.Add(-2 * time.Hour), end, "nautical"},
		},
		MoonLabel:   "Moon 40% lit",
		Airmass:     []Tick{{90, "1.0"}, {41.8, "1.5"}, {30, "2.0"}, {19.5, "3.0"}},
		LimitAltDeg: 30, LimitLabel: "airmass 2.0",
		Now: start.Add(5 * time.Hour),
	}
	for t := start; !t.After(end); t = t.Add(10 * time.Minute) {
		night.Sun = append(night.Sun, AltPoint{t, 20 - 60*math.Sin(float64(t.Sub(start))/float64(12*time.Hour)*math.Pi)})
		night.Moon = append(night.Moon, AltPoint{t, 50*math.Sin(float64(t.Sub(start))/float64(12*time.Hour)*math.Pi) - 10})
	}
	for i := range n {
		period := time.Duration((1.5 + float64(i)/4) * float64(time.Hour))
		peak := start.Add(time.Duration(i%12) * time.Hour)
		tr := Track{Name: fmt.Sprintf("Target %02d", i+1),
			Events: []PhaseMark{{Phase: 0, Name: "inf. conj."}, {Phase: 0.5, Name: "sup. conj."}}}
		for t := start; !t.After(end); t = t.Add(step) {
			dh := t.Sub(peak).Hours()
			alt := 75*math.Cos(dh/8*math.Pi) - 5
			ph := math.Mod(float64(t.Sub(start))/float64(period), 1)
			tr.Points = append(tr.Points, TrackPoint{t, alt, ph})
		}
		for k := 0; k < 6; k++ {
			c := start.Add(time.Duration(k)*period + period/4)
			tr.Goals = append(tr.Goals, Span{c.Add(-period / 20), c.Add(period / 20), "0.25"})
		}
		night.Tracks = append(night.Tracks, tr)
		bs := peak.Add(-20 * time.Minute)
		night.Blocks = append(night.Blocks, Block{Target: tr.Name, Start: bs, End: bs.Add(25 * time.Minute), Label: "φ0.25 ×5", Filler: i%5 == 4})
	}
	return night
}

func TestNightChart(t *testing.T) {
	night := sampleNight(4, time.Minute)
	night.Blocks[1].State = "done"
	night.Blocks[2].State = "lost"
	night.Blocks[0].Detail = "21:03–21:28 UT\nLST 07:12"
	els := parseSVG(t, night.SVG())
	checkCoordinates(t, els)
	t.Run("Lanes", func(t *testing.T) {
		if got := count(els, func(e element) bool { return e.name == "g" && hasClass(e, "lane") }); got != 4 {
			t.Errorf("lanes = %d, want 4", got)
		}
	})
	t.Run("LaneOrder", func(t *testing.T) {
		// sampleNight puts target i highest at start + i h: the lanes follow.
		var order []string
		for _, e := range els {
			if e.name == "g" && hasClass(e, "lane") {
				order = append(order, e.attrs["data-target"])
			}
		}
		want := []string{"Target 01", "Target 02", "Target 03", "Target 04"}
		if !slices.Equal(order, want) {
			t.Errorf("lane order = %v, want %v", order, want)
		}
	})
	t.Run("GoalWindows", func(t *testing.T) {
		if got := count(els, func(e element) bool { return e.name == "rect" && hasClass(e, "goalwin") }); got == 0 {
			t.Error("no goal windows in the lanes")
		}
	})
	t.Run("AirmassShading", func(t *testing.T) {
		for _, c := range []string{"am0", "am1"} {
			if count(els, func(e element) bool { return e.name == "rect" && hasClass(e, c) && e.attrs["height"] != "10" }) == 0 {
				t.Errorf("no observable stretch shaded %s", c)
			}
		}
	})
	t.Run("Blocks", func(t *testing.T) {
		got := map[string]int{}
		for _, e := range els {
			if e.name == "g" && hasClass(e, "block") {
				got[e.attrs["data-state"]]++
				if e.attrs["tabindex"] != "0" {
					t.Errorf("block of %s takes no keyboard focus", e.attrs["data-target"])
				}
			}
		}
		if got["planned"] != 2 || got["done"] != 1 || got["lost"] != 1 {
			t.Errorf("blocks by state = %v, want planned 2, done 1, lost 1", got)
		}
		if !strings.Contains(night.SVG(), "LST 07:12") {
			t.Error("the block's figures are not in its title")
		}
	})
	t.Run("SkyStrip", func(t *testing.T) {
		for _, k := range []string{"day", "civil", "nautical", "astronomical", "night"} {
			if count(els, func(e element) bool { return e.name == "rect" && hasClass(e, "sky-"+k) }) == 0 {
				t.Errorf("no %s stretch in the sky strip", k)
			}
		}
		for _, c := range []string{"sun", "moon"} {
			if count(els, func(e element) bool { return e.name == "path" && hasClass(e, c) }) != 1 {
				t.Errorf("no %s curve", c)
			}
		}
	})
	t.Run("Text", func(t *testing.T) {
		txt := texts(els)
		for _, want := range []string{"XST", "UT", "Moon 40% lit", "now", "Target 01", "15:00", "18:00", "dark 17:00", "sunset 15:30", "airmass 2.0", "goal window", "inf. conj."} {
			if !strings.Contains(txt, want) {
				t.Errorf("chart text lacks %q", want)
			}
		}
		for _, gone := range []string{"altitude", "local XST"} {
			if strings.Contains(txt, gone) {
				t.Errorf("chart text still has the altitude chart's %q", gone)
			}
		}
	})
	t.Run("QuarterTicks", func(t *testing.T) {
		// Target 01 has a 1.5 h period: 12 h hold 8 orbits, 32 quarter
		// ticks; the four targets together at least 4·(12/2.25)·4.
		if got := count(els, func(e element) bool { return e.name == "line" && hasClass(e, "qtick") }); got < 80 {
			t.Errorf("quarter-orbit ticks = %d, want ≥ 80 over 4 targets", got)
		}
	})
}

// TestLaneHeight: few targets get roomy lanes, many get the minimum and a
// taller chart (which the page scrolls in its box).
func TestLaneHeight(t *testing.T) {
	for _, tt := range []struct {
		n    int
		want float64
	}{{1, nLaneMax}, {10, 34}, {20, 24}, {30, 18}, {60, 18}} {
		if got := LaneHeight(tt.n); got != tt.want {
			t.Errorf("LaneHeight(%d) = %g, want %g", tt.n, got, tt.want)
		}
	}
	n := sampleNight(40, 10*time.Minute)
	_, h := viewBox(t, parseSVG(t, n.SVG())[0])
	if min := 40 * nLaneMin; h < min {
		t.Errorf("40 lanes in %g px, want ≥ %g", h, min)
	}
}

func TestNightChartEscapesNames(t *testing.T) {
	night := sampleNight(1, 5*time.Minute)
	evil := `<script>alert("x")</script>&`
	night.Tracks[0].Name = evil
	night.Blocks[0].Target = evil
	night.Blocks[0].Label = `"><b>`
	doc := night.SVG()
	if strings.Contains(doc, "<script") || strings.Contains(doc, "<b>") {
		t.Fatal("user text written unescaped")
	}
	els := parseSVG(t, doc)
	if !strings.Contains(texts(els), `<script>alert("x")</script>&`[:10]) {
		t.Error("escaped name not shown as text")
	}
}

func TestNightChartDegenerate(t *testing.T) {
	tests := []struct {
		name  string
		night Night
	}{
		{"Empty", Night{}},
		{"EndBeforeStart", Night{Start: time.Date(2026, 1, 2, 0, 0, 0, 0, time.UTC), End: time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)}},
		{"NaNAltitudes", func() Night {
			n := sampleNight(2, 10*time.Minute)
			n.Tracks[0].Points[3].AltDeg = math.NaN()
			n.Tracks[1].Points[5].Phase = math.Inf(1)
			n.LimitAltDeg = math.NaN()
			n.Moon[2].AltDeg = math.NaN()
			return n
		}()},
		{"NoTracks", func() Night { n := sampleNight(0, time.Minute); return n }()},
		{"InvalidUTF8", func() Night { n := sampleNight(1, 10*time.Minute); n.Tracks[0].Name = "bad\xff\x01name"; return n }()},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			doc := tt.night.SVG()
			if strings.Contains(doc, "NaN") || strings.Contains(doc, "Inf") {
				t.Error("NaN or Inf in the output")
			}
			els := parseSVG(t, doc)
			checkCoordinates(t, els)
		})
	}
}

func TestPhaseCrossings(t *testing.T) {
	t0 := time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	tests := []struct {
		name   string
		phases []float64
		want   []float64
	}{
		{"Wrap", []float64{0.8, 0.9, 0.05, 0.2}, []float64{0}},
		{"Half", []float64{0.3, 0.45, 0.6}, []float64{0.5}},
		{"Quarters", []float64{0.4, 0.6, 0.8, 0.95, 0.1, 0.3}, []float64{0.5, 0.75, 0, 0.25}},
		{"TooCoarse", []float64{0.1, 0.7, 0.2}, nil},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var pts []TrackPoint
			for i, p := range tt.phases {
				pts = append(pts, TrackPoint{t0.Add(time.Duration(i) * time.Minute), 45, p})
			}
			got := crossings(pts, quarters)
			if len(got) != len(tt.want) {
				t.Fatalf("crossings = %v, want phases %v", got, tt.want)
			}
			for i := range got {
				if got[i].Phase != tt.want[i] {
					t.Errorf("crossing %d phase = %g, want %g", i, got[i].Phase, tt.want[i])
				}
			}
		})
	}
}

func TestRing(t *testing.T) {
	r := Ring{
		Title:    "T1 phase coverage",
		Goals:    []Arc{{0.2, 0.3, "Q1", true}, {0.95, 0.05, "conj.", false}},
		Planned:  []float64{0.21, 0.25, 0.29},
		Observed: []float64{0.22, 0.98, math.NaN()},
		Bins:     []Bin{{0, 0.1, 2}, {0.2, 0.3, 5}},
	}
	els := parseSVG(t, r.SVG())
	checkCoordinates(t, els)
	if got := count(els, func(e element) bool { return e.name == "path" && hasClass(e, "goal") }); got != 2 {
		t.Errorf("goal arcs = %d, want 2", got)
	}
	if got := count(els, func(e element) bool { return e.name == "line" && hasClass(e, "planned") }); got != 3 {
		t.Errorf("planned ticks = %d, want 3", got)
	}
	if got := count(els, func(e element) bool { return e.name == "circle" && hasClass(e, "observed") }); got != 2 {
		t.Errorf("observed dots = %d, want 2 (NaN skipped)", got)
	}
	if txt := texts(els); !strings.Contains(txt, "Q1 ✓") || !strings.Contains(txt, "conj.") {
		t.Errorf("goal labels missing from %q", txt)
	}
}

func TestRingPoint(t *testing.T) {
	tests := []struct {
		name   string
		phase  float64
		wx, wy float64
	}{
		{"ZeroAtTop", 0, 100, 0},
		{"QuarterRight", 0.25, 200, 100},
		{"HalfBottom", 0.5, 100, 200},
		{"ThreeQuartersLeft", 0.75, 0, 100},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			x, y := ringPoint(100, 100, tt.phase)
			if math.Abs(x-tt.wx) > 1e-9 || math.Abs(y-tt.wy) > 1e-9 {
				t.Errorf("ringPoint(%g) = (%g, %g), want (%g, %g)", tt.phase, x, y, tt.wx, tt.wy)
			}
		})
	}
}

func TestOC(t *testing.T) {
	o := OC{
		Title: "O−C of T1",
		Points: []OCPoint{
			{0, 0, 5, "2024-01-01", false}, {1200, 12, 6, "", false}, {2500, 31, 4, "", true}, {3100, math.NaN(), 1, "", false},
		},
		Lines: []OCLine{{"refined", []float64{0, 3000}, []float64{-1, 35}}},
	}
	els := parseSVG(t, o.SVG())
	checkCoordinates(t, els)
	if got := count(els, func(e element) bool { return e.name == "circle" }); got != 3 {
		t.Errorf("points = %d, want 3 (NaN skipped)", got)
	}
	if got := count(els, func(e element) bool { return e.name == "circle" && hasClass(e, "excluded") }); got != 1 {
		t.Errorf("excluded points = %d, want 1", got)
	}
	if got := count(els, func(e element) bool { return e.name == "path" && hasClass(e, "fit") }); got != 1 {
		t.Errorf("fit lines = %d, want 1", got)
	}
	if !strings.Contains(texts(els), "O−C (s)") {
		t.Error("y axis not in seconds")
	}
	big := OC{Points: []OCPoint{{0, 0, 10, "", false}, {10, 1800, 30, "", false}}}
	if !strings.Contains(texts(parseSVG(t, big.SVG())), "O−C (min)") {
		t.Error("large residuals not shown in minutes")
	}
	if !strings.Contains(OC{}.SVG(), "No timings yet.") {
		t.Error("empty diagram lacks its message")
	}
}

func TestUncertainty(t *testing.T) {
	t0 := time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC)
	u := Uncertainty{Title: "σφ", PeriodDays: 0.1, Now: t0.Add(400 * 24 * time.Hour), Limits: []Limit{{0.05, "half-width 0.05"}}}
	for d := 0; d <= 1000; d += 50 {
		u.Points = append(u.Points, UncertaintyPoint{t0.Add(time.Duration(d) * 24 * time.Hour), 0.001 + 0.0001*float64(d)})
	}
	els := parseSVG(t, u.SVG())
	checkCoordinates(t, els)
	if count(els, func(e element) bool { return e.name == "path" && hasClass(e, "sigma") }) != 1 {
		t.Error("no σ curve")
	}
	txt := texts(els)
	for _, want := range []string{"half-width 0.05", "today", "σ time (min)", "2020-01-01"} {
		if !strings.Contains(txt, want) {
			t.Errorf("chart text lacks %q", want)
		}
	}
}

func TestHorizon(t *testing.T) {
	h := Horizon{Title: "mask", MinAltDeg: 15, Points: []HorizonPoint{{0, 10}, {90, 25}, {180, 5}, {300, 30}}}
	els := parseSVG(t, h.SVG())
	checkCoordinates(t, els)
	if got := count(els, func(e element) bool { return e.name == "circle" && hasClass(e, "vertex") }); got != 4 {
		t.Errorf("vertices = %d, want 4", got)
	}
	if count(els, func(e element) bool { return e.name == "path" && hasClass(e, "mask") }) != 1 {
		t.Error("no mask outline")
	}
}

func TestMaskAt(t *testing.T) {
	pts := []HorizonPoint{{30, 10}, {90, 40}, {300, 20}}
	tests := []struct {
		name string
		az   float64
		want float64
	}{
		{"AtVertex", 90, 40},
		{"Between", 60, 25},
		{"WrapAfterLast", 330, 20 + (10-20)*(30.0/90)},
		{"WrapBeforeFirst", 0, 20 + (10-20)*(60.0/90)},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := maskAt(pts, tt.az); math.Abs(got-tt.want) > 1e-9 {
				t.Errorf("maskAt(%g) = %g, want %g", tt.az, got, tt.want)
			}
		})
	}
}

func TestNiceTicks(t *testing.T) {
	tests := []struct {
		name          string
		lo, hi        float64
		wantStep      float64
		wantLo, wantH float64
	}{
		{"Unit", 0, 10, 2, 0, 10},
		{"Negative", -37, 12, 10, -40, 20},
		{"Small", 0, 0.013, 0.005, 0, 0.015},
		{"Flat", 5, 5, 0.5, 4, 6},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ticks, lo, hi := niceTicks(tt.lo, tt.hi, 5)
			if step := tickStep(ticks); math.Abs(step-tt.wantStep) > 1e-12 || math.Abs(lo-tt.wantLo) > 1e-12 || math.Abs(hi-tt.wantH) > 1e-12 {
				t.Errorf("niceTicks(%g, %g) = step %g over [%g, %g], want step %g over [%g, %g]", tt.lo, tt.hi, step, lo, hi, tt.wantStep, tt.wantLo, tt.wantH)
			}
		})
	}
}

func BenchmarkNightChartSVG(b *testing.B) {
	night := sampleNight(30, time.Minute)
	var buf bytes.Buffer
	b.ReportAllocs()
	for b.Loop() {
		buf.Reset()
		if err := night.WriteSVG(&buf); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(buf.Len())/1024, "KiB/chart")
}

// TestPrecision checks the precision chart: one curve per target, a point
// per determined value (an undetermined one leaves a gap), the wanted line
// and its label, and the "now" tick; with nothing determined it says so.
func TestPrecision(t *testing.T) {
	c := Precision{Title: "σK/K", Nights: []string{"2026-12-01", "2026-12-02", "2026-12-03"}, Series: []PrecisionSeries{
		{Label: "A", Values: []float64{0, 9, 5, 3.5}, OK: []bool{false, true, true, true}, Want: 3},
		{Label: "B", Values: []float64{12, 12, 8, 6}, OK: []bool{true, true, true, true}},
	}}
	els := parseSVG(t, c.SVG())
	checkCoordinates(t, els)
	if got := count(els, func(e element) bool { return e.name == "path" && hasClass(e, "series") }); got != 2 {
		t.Errorf("curves = %d, want 2", got)
	}
	if got := count(els, func(e element) bool { return e.name == "circle" && hasClass(e, "series") }); got != 7 {
		t.Errorf("points = %d, want 7 (A's undetermined first value left out)", got)
	}
	if got := count(els, func(e element) bool { return e.name == "line" && hasClass(e, "limit") }); got != 1 {
		t.Errorf("wanted lines = %d, want 1", got)
	}
	txt := texts(els)
	for _, want := range []string{"now", "A wanted 3 %", "predicted error (%)"} {
		if !strings.Contains(txt, want) {
			t.Errorf("chart text lacks %q", want)
		}
	}
	empty := Precision{Title: "none", Nights: []string{"x"}, Series: []PrecisionSeries{{Label: "A", Values: []float64{0, 0}, OK: []bool{false, false}}}}
	if !strings.Contains(texts(parseSVG(t, empty.SVG())), "Nothing measurable yet") {
		t.Error("an undetermined series draws something")
	}
}

func TestAltitudePanels(t *testing.T) {
	night := sampleNight(3, 5*time.Minute)
	night.Tracks[2].Points[4].AltDeg = math.NaN()
	ps := night.Panels()
	if len(ps) != 3 {
		t.Fatalf("%d panels for 3 targets", len(ps))
	}
	for _, p := range ps {
		doc := p.SVG()
		if strings.Contains(doc, "NaN") || strings.Contains(doc, "Inf") {
			t.Errorf("%s: NaN or Inf in the panel", p.Title)
		}
		els := parseSVG(t, doc)
		checkCoordinates(t, els)
		txt := texts(els)
		for _, want := range []string{p.Title, "highest", "limit 30°"} {
			if !strings.Contains(txt, want) {
				t.Errorf("%s: panel text lacks %q", p.Title, want)
			}
		}
		if strings.Contains(txt, "airmass") || strings.Contains(txt, "UT") {
			t.Errorf("%s: the panel has a second scale: %q", p.Title, txt)
		}
		if count(els, func(e element) bool { return e.name == "rect" && hasClass(e, "altblock") }) != 1 {
			t.Errorf("%s: want its one block marked", p.Title)
		}
	}
}
