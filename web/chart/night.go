package chart

import (
	"io"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
	"time"
)

// Night is the data of the phase-first night chart: time runs across, one
// lane per target (sorted by the time the target stands highest), and in
// each lane the hours observable under the site's limits shaded by airmass,
// ticks at each quarter of the orbit with the named events labelled, the
// goal windows as outlined spans and the planned blocks as filled spans. A
// thin strip on top draws the Sun's and the Moon's altitude over the
// twilight limits. Every value is computed by the caller; the chart only
// draws.
type Night struct {
	Title string         // accessible title, e.g. "Night of 2026-03-14 at Hill station"
	Start time.Time      // left edge of the chart (UTC instant)
	End   time.Time      // right edge; must be after Start
	Zone  *time.Location // zone of the local-time axis; nil means UTC
	// Bands colour the background by the Sun's altitude; Kind is one of
	// "day", "civil", "nautical", "astronomical", "night".
	Bands []Band
	Sun   []AltPoint // the Sun's altitude, degrees, in time order
	Moon  []AltPoint // the Moon's altitude, degrees, in time order
	// MoonLabel annotates the Moon's curve, e.g. "Moon 64% lit".
	MoonLabel string
	Tracks    []Track
	Blocks    []Block
	// Airmass gives the altitudes (computed by the caller) at which the
	// lanes' shading steps from one airmass class to the next, e.g.
	// {AltDeg: 30.0, Label: "2.0"}; the legend names them.
	Airmass []Tick
	// LimitAltDeg is the lowest altitude at which a target counts as
	// observable (e.g. the maximum airmass), degrees; the lanes shade only
	// above it, and only while the Sun is below the horizon. NaN or ≤ 0
	// means the horizon. LimitLabel names it in the legend.
	LimitAltDeg float64
	LimitLabel  string
	// Unallocated shades spans of the chart that are not the caller's to
	// plan (the other half of a half night), greyed over the plot with
	// their Label ("not allocated").
	Unallocated []Span
	// Now draws a "now" marker when it lies within Start..End.
	Now time.Time
	// Width of the drawing in pixels; 0 means 1000.
	Width int
	// ID prefixes the element ids (patterns), so that several charts can
	// share a page; "" means "n".
	ID string
}

// Band is a stretch of time with the Sun in one altitude range.
type Band struct {
	Start, End time.Time
	Kind       string // "day", "civil", "nautical", "astronomical" or "night"
}

// AltPoint is an altitude (degrees) at an instant.
type AltPoint struct {
	T      time.Time
	AltDeg float64
}

// Track is one target over the night.
type Track struct {
	Name   string
	Points []TrackPoint // samples in time order (one a minute or finer)
	// Goals are the stretches of time in which the orbital phase lies in one
	// of the target's goal windows; they are highlighted along the track.
	Goals []Span
	// Events are the named orbital events to label along the lane
	// (conjunctions, quadratures, eclipse ingress and egress) at their
	// phases; the chart finds where the samples' phase passes through them.
	// Quarter-orbit ticks are drawn whether or not events are given.
	Events []PhaseMark
}

// TrackPoint is a target's altitude (degrees) and orbital phase (0 ≤ φ < 1)
// at an instant.
type TrackPoint struct {
	T      time.Time
	AltDeg float64
	Phase  float64
}

// PhaseMark is a phase worth marking (0 ≤ Phase < 1) with its name, e.g.
// {0.25, "max. recession"}; T is filled in by the chart where the track
// passes it.
type PhaseMark struct {
	T     time.Time
	Phase float64
	Name  string
}

// Span is a labelled stretch of time.
type Span struct {
	Start, End time.Time
	Label      string
}

// Block is a planned block of exposures of one target.
type Block struct {
	Target     string // name of the track it belongs to
	Start, End time.Time
	Label      string // short text drawn on the block, e.g. "φ0.25 ×12"
	Filler     bool   // idle time filled with a lower-value target
	State      string // "", "done" or "lost"
	// Detail lists the block's figures, one per line (times in UT and
	// local time, LST, airmass, phases, parallactic angle, Moon distance);
	// shown when the block has keyboard or pointer focus.
	Detail string
}

// Tick is a labelled value on an axis.
type Tick struct {
	AltDeg float64
	Label  string
}

// The chart's own palette. One ink colour carries all text; the lanes'
// airmass shading is one hue stepping in lightness (darker is lower
// airmass), so it reads without colour vision and in grey print; targets
// are told apart by lane and label, never by colour. Every text colour is
// checked against the fills it sits on for WCAG 2.1 contrast (the tests).
const (
	inkText   = "#1d2433" // all text and outlines
	mutedText = "#4a5466" // secondary text (UT hours, best time)
	paperFill = "#ffffff" // the chart's ground and the legend's
	laneAlt   = "#eef1f5" // every other lane
	blockFill = "#23395d" // planned blocks
	fillerFil = "#5a4a78" // filler blocks
	onBlock   = "#ffffff" // text on a block
	nowStroke = "#a3231a" // the "now" marker and its label
	sunStroke = "#9a4d00"
	moonStrk  = "#1d2433"
)

// airmassRamp shades the observable hours, from the airmass limit (first)
// to the zenith (last).
var airmassRamp = []string{"#d3e6e2", "#a9cfc8", "#7db3aa", "#52958a", "#2f766b", "#1c5a50"}

// skyFill shades the top strip by the Sun's altitude range.
var skyFill = map[string]string{
	"day": "#f4ecd4", "civil": "#dbe1ea", "nautical": "#b7c3d6", "astronomical": "#8d9cb8", "night": "#5f6e8c",
}

// night chart geometry, pixels.
const (
	nLeft     = 150.0 // lane names
	nRight    = 14.0
	nStripTop = 6.0
	nStripH   = 40.0 // Sun and Moon strip
	nMarksH   = 16.0 // twilight-limit labels under the strip
	nAxisH    = 28.0 // local hours, UT hours beneath
	nLegendH  = 30.0
	nMinWidth = 400
	// the lanes share about nLanesH pixels, each between nLaneMin and
	// nLaneMax high: many targets make a taller chart that the page
	// scrolls inside its box.
	nLanesH  = 480.0
	nLaneMin = 18.0
	nLaneMax = 34.0
)

// nightGeom maps times to pixels.
type nightGeom struct {
	x0, x1 float64
	t0     time.Time
	span   float64 // seconds
}

func (g nightGeom) x(t time.Time) float64 {
	return g.x0 + t.Sub(g.t0).Seconds()/g.span*(g.x1-g.x0)
}

// cx is x(t) clamped to the plot.
func (g nightGeom) cx(t time.Time) float64 { return clamp(g.x(t), g.x0, g.x1) }

// WriteSVG draws the chart to w.
func (n Night) WriteSVG(w io.Writer) error {
	var s svg
	s.b = make([]byte, 0, 64<<10)
	n.draw(&s)
	return s.writeTo(w)
}

// SVG returns the chart as a string.
func (n Night) SVG() string {
	var s svg
	n.draw(&s)
	return string(s.b)
}

// LaneHeight is the height of one lane, pixels, for a chart of n lanes.
func LaneHeight(n int) float64 {
	if n <= 0 {
		return nLaneMax
	}
	return clamp(math.Floor(nLanesH/float64(n)), nLaneMin, nLaneMax)
}

// lane is one target's row, in drawing order.
type lane struct {
	Track
	best time.Time // when the target stands highest
}

// lanes sorts the tracks by the time each stands highest within the
// chart (ties by name), so the lanes read as the night's order.
func (n Night) lanes() []lane {
	out := make([]lane, len(n.Tracks))
	for i, tr := range n.Tracks {
		out[i] = lane{Track: tr}
		hi := math.Inf(-1)
		for _, p := range tr.Points {
			if finite(p.AltDeg) && p.AltDeg > hi {
				hi, out[i].best = p.AltDeg, p.T
			}
		}
	}
	sort.SliceStable(out, func(a, b int) bool {
		if !out[a].best.Equal(out[b].best) {
			return out[a].best.Before(out[b].best)
		}
		return out[a].Name < out[b].Name
	})
	return out
}

func (n Night) draw(s *svg) {
	width := float64(n.Width)
	if n.Width < nMinWidth {
		width = 1000
	}
	zone := n.Zone
	if zone == nil {
		zone = time.UTC
	}
	ls := n.lanes()
	lh := LaneHeight(len(ls))
	lanesTop := nStripTop + nStripH + nMarksH + nAxisH
	height := lanesTop + float64(len(ls))*lh + nLegendH
	s.open(width, height, "chart night lanes", n.Title, "One lane per target in the order they stand highest: "+
		"observable hours shaded by airmass (darker is lower), ticks at each quarter orbit with the orbital events named, "+
		"goal windows outlined, planned blocks filled; the strip on top shows the Sun's and the Moon's altitude over the twilight limits.")
	s.rect(0, 0, width, height, "class", "ground", "fill", paperFill)
	if !n.End.After(n.Start) {
		s.text(width/2, lanesTop, "No night to draw.", "text-anchor", "middle", "fill", inkText)
		s.close()
		return
	}
	g := nightGeom{x0: nLeft, x1: width - nRight, t0: n.Start, span: n.End.Sub(n.Start).Seconds()}
	n.drawStrip(s, g)
	n.drawLimits(s, g, zone)
	n.drawHours(s, g, zone, lanesTop, lanesTop+float64(len(ls))*lh)
	for i, l := range ls {
		n.drawLane(s, g, i, l, lanesTop+float64(i)*lh, lh, zone)
	}
	n.drawUnallocated(s, g, lanesTop, lanesTop+float64(len(ls))*lh)
	n.drawNow(s, g, nStripTop, lanesTop+float64(len(ls))*lh)
	n.drawLegend(s, g, height-nLegendH/2+4)
	s.close()
}

// stripY maps an altitude to the top strip: −20° at its foot, 90° at its
// top (the Sun below −20° lies on the foot).
func stripY(altDeg float64) float64 {
	return nStripTop + nStripH - (clamp(altDeg, -20, 90)+20)/110*nStripH
}

func (n Night) drawStrip(s *svg, g nightGeom) {
	s.raw(`<g class="sky">`)
	s.rect(g.x0, nStripTop, g.x1-g.x0, nStripH, "class", "sky-day", "fill", skyFill["day"])
	for _, b := range n.Bands {
		fill, ok := skyFill[b.Kind]
		xa, xb := g.cx(b.Start), g.cx(b.End)
		if !ok || xb-xa <= 0 {
			continue
		}
		s.rect(xa, nStripTop, xb-xa, nStripH, "class", "sky-"+b.Kind, "fill", fill)
	}
	y0 := stripY(0)
	s.line(g.x0, y0, g.x1, y0, "stroke", inkText, "stroke-width", "0.6", "stroke-dasharray", "2 2", "class", "horizon")
	altCurve(s, g, n.Sun, "sun", sunStroke, "")
	altCurve(s, g, n.Moon, "moon", moonStrk, "5 2")
	s.text(g.x0-6, nStripTop+14, "Sun", "text-anchor", "end", "fill", sunStroke, "font-weight", "600")
	moon := "Moon"
	if n.MoonLabel != "" {
		moon = n.MoonLabel
	}
	s.text(g.x0-6, nStripTop+30, truncate(moon, 22), "text-anchor", "end", "fill", inkText, "font-size", "10")
	s.raw("</g>")
}

// altCurve draws an altitude curve in the top strip.
func altCurve(s *svg, g nightGeom, pts []AltPoint, class, colour, dash string) {
	var p path
	for _, a := range pts {
		if !finite(a.AltDeg) || a.T.Before(g.t0) || g.x(a.T) > g.x1 {
			p.lift()
			continue
		}
		p.lineTo(g.x(a.T), stripY(a.AltDeg))
	}
	extra := []string{"class", class, "fill", "none", "stroke", colour, "stroke-width", "1.8"}
	if dash != "" {
		extra = append(extra, "stroke-dasharray", dash)
	}
	s.pathEl(&p, extra...)
}

// limitName names the edge between two sky bands going into the night
// (later) or out of it.
var limitName = map[string]string{
	"day|civil": "sunset", "civil|nautical": "−6°", "nautical|astronomical": "−12°", "astronomical|night": "dark",
	"night|astronomical": "dark ends", "astronomical|nautical": "−12°", "nautical|civil": "−6°", "civil|day": "sunrise",
}

// drawLimits marks the twilight limits under the strip: a tick at each
// edge between sky bands, labelled with its name and local time where
// there is room (the dark ones first).
func (n Night) drawLimits(s *svg, g nightGeom, zone *time.Location) {
	type mark struct {
		x    float64
		text string
		rank int
	}
	var marks []mark
	for i := 1; i < len(n.Bands); i++ {
		name, ok := limitName[n.Bands[i-1].Kind+"|"+n.Bands[i].Kind]
		t := n.Bands[i].Start
		if !ok || t.Before(n.Start) || t.After(n.End) {
			continue
		}
		x := g.x(t)
		s.line(x, nStripTop, x, nStripTop+nStripH+3, "stroke", inkText, "stroke-width", "0.8", "class", "twl")
		rank := 2
		switch name {
		case "dark", "dark ends":
			rank = 0
		case "sunset", "sunrise":
			rank = 1
		}
		marks = append(marks, mark{x, name + " " + t.In(zone).Format("15:04"), rank})
	}
	sort.SliceStable(marks, func(a, b int) bool { return marks[a].rank < marks[b].rank })
	var placed []box
	y := nStripTop + nStripH + 12
	for _, m := range marks {
		w := float64(utf8Len(m.text))*5.2 + 4
		b := box{m.x - w/2, y - 9, m.x + w/2, y}
		if b.x0 < g.x0 || b.x1 > g.x1+nRight {
			continue
		}
		if slices.ContainsFunc(placed, b.overlaps) {
			continue
		}
		placed = append(placed, b)
		s.text(m.x, y, m.text, "text-anchor", "middle", "font-size", "9", "fill", inkText, "class", "limit-label")
	}
}

// hourStep picks the spacing of time ticks for the chart's span and width.
func hourStep(spanH, widthPx float64) time.Duration {
	switch perHour := widthPx / spanH; {
	case perHour >= 45:
		return time.Hour
	case perHour >= 22:
		return 2 * time.Hour
	default:
		return 3 * time.Hour
	}
}

// drawHours writes one time scale above the lanes: whole local hours, and
// under each the UT hour in smaller type; faint rules run down the lanes.
func (n Night) drawHours(s *svg, g nightGeom, zone *time.Location, top, bottom float64) {
	step := hourStep(g.span/3600, g.x1-g.x0)
	name, _ := n.Start.In(zone).Zone()
	lt := n.Start.In(zone)
	first := time.Date(lt.Year(), lt.Month(), lt.Day(), lt.Hour(), 0, 0, 0, zone)
	y := top - nAxisH + 12
	s.raw(`<g class="axis time">`)
	s.text(g.x0-6, y, name, "text-anchor", "end", "font-weight", "600", "fill", inkText)
	s.text(g.x0-6, y+11, "UT", "text-anchor", "end", "font-size", "9", "fill", mutedText)
	for t := first; !t.After(n.End); t = t.Add(time.Hour) {
		if t.Before(n.Start) || t.In(zone).Hour()%int(step.Hours()) != 0 {
			continue
		}
		x := g.x(t)
		s.line(x, top-3, x, bottom, "stroke", "#c9d0da", "stroke-width", "0.6", "class", "grid")
		if x < g.x0+16 || x > g.x1-14 {
			continue // its label would run into the zone's name or off the edge
		}
		s.text(x, y, t.In(zone).Format("15:04"), "text-anchor", "middle", "fill", inkText)
		s.text(x, y+11, t.UTC().Format("15:04"), "text-anchor", "middle", "font-size", "9", "fill", mutedText)
	}
	s.raw("</g>")
}

// airmassClass is the shading class of altitude alt (−1: not observable).
func (n Night) airmassClass(alt float64, limits []float64) int {
	floor := 0.0
	if finite(n.LimitAltDeg) && n.LimitAltDeg > 0 {
		floor = n.LimitAltDeg
	}
	if !finite(alt) || alt < floor {
		return -1
	}
	c := 0
	for _, l := range limits {
		if alt >= l {
			c++
		}
	}
	return min(c, len(airmassRamp)-1)
}

// shadeLimits are the altitudes of the airmass steps above the limit.
func (n Night) shadeLimits() []float64 {
	var out []float64
	for _, t := range n.Airmass {
		if finite(t.AltDeg) && t.AltDeg > n.LimitAltDeg && t.AltDeg < 89.9 {
			out = append(out, t.AltDeg)
		}
	}
	slices.Sort(out)
	return out
}

// sunUp reports whether t lies in a "day" band.
func (n Night) sunUp(t time.Time) bool {
	for _, b := range n.Bands {
		if b.Kind == "day" && !t.Before(b.Start) && t.Before(b.End) {
			return true
		}
	}
	return false
}

func (n Night) drawLane(s *svg, g nightGeom, i int, l lane, top, h float64, zone *time.Location) {
	s.raw(`<g class="lane" data-target="`)
	s.esc(l.Name)
	s.raw(`">`)
	bg := paperFill
	if i%2 == 1 {
		bg = laneAlt
	}
	s.rect(0, top, g.x1+nRight, h, "class", "lanebg", "fill", bg)
	fs := clamp(h*0.5, 9, 12)
	s.text(g.x0-6, top+h/2+fs*0.35, truncate(l.Name, 22), "text-anchor", "end", "font-size", fmtf(fs), "fill", inkText, "class", "lanename")
	if !l.best.IsZero() && h >= 26 {
		s.text(g.x0-6, top+h-2, "highest "+l.best.In(zone).Format("15:04"), "text-anchor", "end", "font-size", "8", "fill", mutedText)
	}
	// observable hours, shaded by airmass
	limits := n.shadeLimits()
	barY, barH := top+h*0.42, h*0.4
	runStart, runClass := -1, -1
	flush := func(end int) {
		if runClass >= 0 && runStart >= 0 && end > runStart {
			xa, xb := g.cx(l.Points[runStart].T), g.cx(l.Points[end].T)
			if xb > xa {
				s.rect(xa, barY, xb-xa, barH, "class", "am"+strconv.Itoa(runClass), "fill", airmassRamp[runClass])
			}
		}
	}
	for j, p := range l.Points {
		c := -1
		if !n.sunUp(p.T) {
			c = n.airmassClass(p.AltDeg, limits)
		}
		if c != runClass {
			flush(j)
			runStart, runClass = j, c
		}
	}
	if len(l.Points) > 0 {
		flush(len(l.Points) - 1)
	}
	// goal windows
	for _, w := range l.Goals {
		xa, xb := g.cx(w.Start), g.cx(w.End)
		if xb-xa <= 0 {
			continue
		}
		s.rect(xa, top+1.5, xb-xa, h-3, "class", "goalwin", "fill", "none", "stroke", inkText, "stroke-width", "1.2", "stroke-dasharray", "4 2")
	}
	var blocked []box
	for _, b := range n.Blocks {
		if b.Target == l.Name {
			if bx, ok := n.drawBlock(s, g, b, top, h); ok {
				blocked = append(blocked, bx)
			}
		}
	}
	n.drawPhase(s, g, l.Track, top, h, blocked)
	s.raw("</g>")
}

// crossings returns the instants at which the samples' phase passes each
// of the phases in marks (a wrap from 1 to 0 is one step forward).
func crossings(pts []TrackPoint, marks []PhaseMark) []PhaseMark {
	var out []PhaseMark
	for i := 1; i < len(pts); i++ {
		a, b := pts[i-1], pts[i]
		if !finite(a.Phase) || !finite(b.Phase) {
			continue
		}
		d := b.Phase - a.Phase
		if d < 0 {
			d++
		}
		if d <= 0 || d >= 0.5 {
			continue
		}
		for _, m := range marks {
			for _, v := range []float64{m.Phase, m.Phase + 1} {
				if v > a.Phase && v <= a.Phase+d {
					f := (v - a.Phase) / d
					out = append(out, PhaseMark{T: a.T.Add(time.Duration(f * float64(b.T.Sub(a.T)))), Phase: m.Phase, Name: m.Name})
				}
			}
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].T.Before(out[j].T) })
	return out
}

var quarters = []PhaseMark{{Phase: 0, Name: "φ0"}, {Phase: 0.25, Name: "φ0.25"}, {Phase: 0.5, Name: "φ0.5"}, {Phase: 0.75, Name: "φ0.75"}}

// drawPhase ticks each quarter orbit along the lane's foot and labels the
// named events at its top, where a label clears the blocks and the
// previous label.
func (n Night) drawPhase(s *svg, g nightGeom, tr Track, top, h float64, blocked []box) {
	s.raw(`<g class="phase">`)
	lastTick := math.Inf(-1)
	for _, m := range crossings(tr.Points, quarters) {
		x := g.x(m.T)
		// an orbit of minutes gives ticks closer than a few pixels: keep
		// the ones that stay apart
		if x < g.x0 || x > g.x1 || x-lastTick < 3 {
			continue
		}
		lastTick = x
		tl := 4.0
		if m.Phase == 0 || m.Phase == 0.5 {
			tl = 7
		}
		s.raw("<g>")
		s.raw("<title>")
		s.esc(tr.Name + " " + m.Name + " at " + m.T.UTC().Format("15:04") + " UT")
		s.raw("</title>")
		s.line(x, top+h-1, x, top+h-1-tl, "stroke", inkText, "stroke-width", "1.3", "class", "qtick")
		s.raw("</g>")
	}
	if h >= 22 {
		lastX := math.Inf(-1)
		for _, m := range crossings(tr.Points, tr.Events) {
			x := g.x(m.T)
			if x < g.x0 || x > g.x1 {
				continue
			}
			w := float64(utf8Len(m.Name))*4.6 + 4
			b := box{x - 1, top, x + w, top + 10}
			if b.x0 < lastX || b.x1 > g.x1 || slices.ContainsFunc(blocked, b.overlaps) {
				s.line(x, top+1, x, top+6, "stroke", inkText, "stroke-width", "1", "class", "evtick")
				continue
			}
			lastX = b.x1 + 4
			s.line(x, top+1, x, top+h-1, "stroke", inkText, "stroke-width", "0.7", "stroke-dasharray", "1 2", "class", "evtick")
			s.text(x+2, top+9, m.Name, "font-size", "8", "fill", inkText, "class", "evlabel")
		}
	}
	s.raw("</g>")
}

// drawBlock draws a planned block as a filled span that takes keyboard
// focus (tabindex) and shows its figures in a <title> (and through the
// page's script, a tooltip). It returns the block's box.
func (n Night) drawBlock(s *svg, g nightGeom, b Block, top, h float64) (box, bool) {
	xa, xb := g.cx(b.Start), g.cx(b.End)
	if xb-xa <= 0 {
		return box{}, false
	}
	w := math.Max(xb-xa, 2)
	state := "planned"
	if b.State != "" {
		state = b.State
	}
	s.raw(`<g class="block" tabindex="0" data-state="` + state + `" data-target="`)
	s.esc(b.Target)
	s.raw(`"><title>`)
	title := b.Target + " " + b.Label
	if b.Filler {
		title += " (filler)"
	}
	if b.State != "" {
		title += " (" + b.State + ")"
	}
	if b.Detail != "" {
		title += "\n" + b.Detail
	} else {
		title += "\n" + b.Start.UTC().Format("15:04") + "–" + b.End.UTC().Format("15:04") + " UT"
	}
	s.esc(title)
	s.raw("</title>")
	y, bh := top+3, h-6
	fill := blockFill
	if b.Filler {
		fill = fillerFil
	}
	switch b.State {
	case "lost":
		s.rect(xa, y, w, bh, "class", "blk lost", "fill", paperFill, "stroke", fill, "stroke-width", "1.4")
		s.line(xa, y, xa+w, y+bh, "stroke", fill, "stroke-width", "1.2")
	default:
		s.rect(xa, y, w, bh, "class", "blk", "fill", fill, "rx", "2")
		label := b.Label
		if b.State == "done" {
			label = "✓ " + label
		}
		fs := clamp(bh*0.6, 8, 11)
		if label != "" && w >= float64(utf8Len(label))*fs*0.55+6 {
			s.text(xa+w/2, y+bh/2+fs*0.35, label, "text-anchor", "middle", "font-size", fmtf(fs), "fill", onBlock, "class", "onblock")
		} else if b.State == "done" && w >= 10 {
			s.text(xa+w/2, y+bh/2+fs*0.35, "✓", "text-anchor", "middle", "font-size", fmtf(fs), "fill", onBlock, "class", "onblock")
		}
	}
	s.raw("</g>")
	return box{xa, top, xa + w, top + h}, true
}

func (n Night) drawNow(s *svg, g nightGeom, top, bottom float64) {
	if n.Now.IsZero() || n.Now.Before(n.Start) || n.Now.After(n.End) {
		return
	}
	x := g.x(n.Now)
	s.raw(`<g class="nowmark">`)
	s.line(x, top, x, bottom, "stroke", nowStroke, "stroke-width", "2")
	s.rect(x-13, top+nStripH+nMarksH+1, 26, 12, "fill", paperFill, "class", "nowbg")
	s.text(x, top+nStripH+nMarksH+10, "now", "text-anchor", "middle", "font-weight", "700", "font-size", "10", "fill", nowStroke)
	s.raw("</g>")
}

// drawUnallocated greys the spans outside the allocated time over the
// lanes.
func (n Night) drawUnallocated(s *svg, g nightGeom, top, bottom float64) {
	if len(n.Unallocated) == 0 {
		return
	}
	s.raw(`<g class="unallocated">`)
	for _, u := range n.Unallocated {
		xa, xb := g.cx(u.Start), g.cx(u.End)
		if xb-xa <= 0 {
			continue
		}
		s.rect(xa, top, xb-xa, bottom-top, "class", "unallocated", "fill", "#8a93a3", "fill-opacity", "0.45")
		if u.Label != "" && xb-xa >= 90 {
			s.rect((xa+xb)/2-45, top+4, 90, 14, "fill", paperFill)
			s.text((xa+xb)/2, top+15, u.Label, "text-anchor", "middle", "font-size", "10", "font-weight", "600", "fill", inkText)
		}
	}
	s.raw("</g>")
}

func (n Night) drawLegend(s *svg, g nightGeom, y float64) {
	s.raw(`<g class="legend" font-size="10">`)
	x := g.x0
	limit := "limit"
	if n.LimitLabel != "" {
		limit = n.LimitLabel
	}
	s.text(x, y, "observable, by airmass: "+limit, "fill", inkText)
	x += float64(utf8Len("observable, by airmass: "+limit))*5.3 + 6
	labels := []string{""}
	for _, t := range n.Airmass {
		if finite(t.AltDeg) && t.AltDeg > n.LimitAltDeg && t.AltDeg < 89.9 {
			labels = append(labels, t.Label)
		}
	}
	slices.Reverse(labels[1:]) // the ticks come lowest airmass first
	for i := range min(len(labels), len(airmassRamp)) {
		s.rect(x, y-9, 14, 10, "fill", airmassRamp[i], "class", "am"+strconv.Itoa(i))
		x += 15
		if i+1 < len(labels) {
			s.text(x, y, labels[i+1], "fill", inkText, "font-size", "9", "text-anchor", "middle")
		}
	}
	x += 14
	s.rect(x, y-9, 18, 10, "fill", "none", "stroke", inkText, "stroke-dasharray", "4 2")
	s.text(x+22, y, "goal window", "fill", inkText)
	x += 90
	s.rect(x, y-9, 18, 10, "fill", blockFill, "rx", "2")
	s.text(x+22, y, "planned block", "fill", inkText)
	x += 96
	s.rect(x, y-9, 18, 10, "fill", fillerFil, "rx", "2")
	s.text(x+22, y, "filler", "fill", inkText)
	x += 50
	s.line(x, y-1, x, y-8, "stroke", inkText, "stroke-width", "1.3")
	s.line(x+5, y-1, x+5, y-5, "stroke", inkText, "stroke-width", "1.3")
	s.text(x+10, y, "quarter orbits", "fill", inkText)
	s.raw("</g>")
}

type box struct{ x0, y0, x1, y1 float64 }

func (a box) overlaps(b box) bool {
	return a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1
}

func utf8Len(s string) int { return len([]rune(s)) }

// fmtf formats a pixel coordinate with one decimal.
func fmtf(x float64) string {
	var s svg
	s.num(x)
	return string(s.b)
}

// fmtPhase formats a phase with up to two decimals: "0", "0.5", "0.25".
func fmtPhase(p float64) string {
	str := strconv.FormatFloat(p, 'f', 2, 64)
	str = strings.TrimRight(str, "0")
	return strings.TrimSuffix(str, ".")
}
