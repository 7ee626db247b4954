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

// Night is the data of a night chart: altitude against time for one night at
// one site, with the twilight bands, the Moon, each target's track with its
// orbital phase and goal windows, and the planned blocks. Every value is
// computed by the caller; the chart only draws.
type Night struct {
	Title string         // accessible title, e.g. "Night of 2026-03-14 at Hill station"
	Start time.Time      // left edge of the chart (UTC instant)
	End   time.Time      // right edge; must be after Start
	Zone  *time.Location // zone of the local-time axis; nil means UTC
	// Bands colour the background by the Sun's altitude; Kind is one of
	// "day", "civil", "nautical", "astronomical", "night".
	Bands []Band
	Moon  []AltPoint // the Moon's altitude, degrees, in time order
	// MoonLabel annotates the Moon's curve, e.g. "Moon 64% lit".
	MoonLabel string
	Tracks    []Track
	Blocks    []Block
	// Airmass puts airmass labels on the right axis at the altitudes the
	// caller computed for them (e.g. {AltDeg: 30.0, Label: "2.0"}).
	Airmass []Tick
	// LimitAltDeg draws the altitude limit (e.g. the maximum airmass) as a
	// dashed line, labelled LimitLabel; NaN or ≤ 0 means none.
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
	// PhaseMarks, when given, are the instants to mark along the track;
	// otherwise the chart marks phases 0 and 0.5 where the samples' phase
	// passes through them.
	PhaseMarks []PhaseMark
}

// TrackPoint is a target's altitude (degrees) and orbital phase (0 ≤ φ < 1)
// at an instant.
type TrackPoint struct {
	T      time.Time
	AltDeg float64
	Phase  float64
}

// PhaseMark is an instant at which a target passes a phase worth marking.
type PhaseMark struct {
	T     time.Time
	Phase float64
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
}

// Tick is a labelled value on an axis.
type Tick struct {
	AltDeg float64
	Label  string
}

// night chart geometry, pixels.
const (
	nLeft     = 128.0 // room for altitude labels and lane names
	nRight    = 56.0  // room for airmass labels
	nTop      = 40.0  // UTC axis and band labels
	nPlotH    = 300.0 // altitude plot
	nAxisGap  = 34.0  // local-time axis below the plot
	nLaneH    = 15.0  // one lane per target
	nLegendH  = 30.0
	nMinWidth = 400
)

// nightGeom maps times and altitudes to pixels.
type nightGeom struct {
	x0, x1, y0, y1 float64
	t0             time.Time
	span           float64 // seconds
}

func (g nightGeom) x(t time.Time) float64 {
	return g.x0 + t.Sub(g.t0).Seconds()/g.span*(g.x1-g.x0)
}

func (g nightGeom) y(altDeg float64) float64 {
	return g.y0 + (90-clamp(altDeg, 0, 90))/90*(g.y1-g.y0)
}

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

func (n Night) draw(s *svg) {
	width := float64(n.Width)
	if n.Width < nMinWidth {
		width = 1000
	}
	id := n.ID
	if id == "" {
		id = "n"
	}
	zone := n.Zone
	if zone == nil {
		zone = time.UTC
	}
	lanesTop := nTop + nPlotH + nAxisGap
	height := lanesTop + float64(len(n.Tracks))*nLaneH + nLegendH
	s.open(width, height, "chart night", n.Title, "Altitude of each target against time (UTC above, local time below), "+
		"twilight shading, the Moon, orbital phase marks along each track, goal windows and planned blocks.")
	if !n.End.After(n.Start) {
		s.text(width/2, nTop+nPlotH/2, "No night to draw.", "text-anchor", "middle")
		s.close()
		return
	}
	g := nightGeom{x0: nLeft, x1: width - nRight, y0: nTop, y1: nTop + nPlotH, t0: n.Start, span: n.End.Sub(n.Start).Seconds()}
	s.raw("<defs>")
	s.raw(`<pattern id="` + id + `-hatch" width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">`)
	s.line(0, 0, 0, 6, "stroke", "#ffffff", "stroke-width", "2.5")
	s.raw("</pattern>")
	s.raw(`<clipPath id="` + id + `-plot">`)
	s.rect(g.x0, g.y0, g.x1-g.x0, g.y1-g.y0)
	s.raw("</clipPath></defs>")

	n.drawBands(s, g)
	n.drawAltGrid(s, g, width)
	n.drawTimeAxes(s, g, zone, lanesTop)
	n.drawLimit(s, g)
	s.raw(`<g clip-path="url(#` + id + `-plot)">`)
	n.drawMoon(s, g)
	names := n.placeTrackLabels(g)
	avoid := make([]box, len(names))
	for i, l := range names {
		avoid[i] = l.at
	}
	for i, tr := range n.Tracks {
		n.drawTrack(s, g, i, tr, avoid)
	}
	s.raw("</g>")
	n.drawUnallocated(s, g)
	drawTrackLabels(s, names)
	n.drawLanes(s, g, lanesTop, id)
	n.drawNow(s, g, lanesTop)
	s.rect(g.x0, g.y0, g.x1-g.x0, g.y1-g.y0, "class", "frame", "fill", "none", "stroke", "#59636e")
	n.drawLegend(s, height-nLegendH/2+4)
	s.close()
}

var bandFill = map[string]string{
	"day": "#fffbe6", "civil": "#eef2f8", "nautical": "#dde5f0", "astronomical": "#cbd6e6", "night": "#b9c7dc",
}

var bandText = map[string]string{
	"day": "day", "civil": "civil", "nautical": "nautical", "astronomical": "astro.", "night": "dark",
}

func (n Night) drawBands(s *svg, g nightGeom) {
	s.raw(`<g class="bands">`)
	for _, b := range n.Bands {
		fill, ok := bandFill[b.Kind]
		if !ok || !b.End.After(b.Start) {
			continue
		}
		xa, xb := clamp(g.x(b.Start), g.x0, g.x1), clamp(g.x(b.End), g.x0, g.x1)
		if xb-xa <= 0 {
			continue
		}
		s.rect(xa, g.y0, xb-xa, g.y1-g.y0, "class", "band-"+b.Kind, "fill", fill)
		if xb-xa >= 34 {
			s.text((xa+xb)/2, g.y0-4, bandText[b.Kind], "text-anchor", "middle", "font-size", "9", "class", "tick")
		}
	}
	s.raw("</g>")
}

func (n Night) drawAltGrid(s *svg, g nightGeom, width float64) {
	s.raw(`<g class="axis alt">`)
	for alt := 0.0; alt <= 90; alt += 15 {
		y := g.y(alt)
		s.line(g.x0, y, g.x1, y, "stroke", "#d0d7de", "stroke-width", "0.6", "class", "grid")
		s.text(g.x0-5, y+4, strconv.Itoa(int(alt))+"°", "text-anchor", "end")
	}
	s.text(14, g.y0+(g.y1-g.y0)/2, "altitude", "text-anchor", "middle", "transform", "rotate(-90 14 "+fmtf(g.y0+(g.y1-g.y0)/2)+")")
	for _, t := range n.Airmass {
		if !finite(t.AltDeg) || t.AltDeg < 0 || t.AltDeg > 90 {
			continue
		}
		y := g.y(t.AltDeg)
		s.line(g.x1, y, g.x1+4, y, "stroke", "#59636e")
		s.text(g.x1+6, y+4, t.Label)
	}
	if len(n.Airmass) > 0 {
		mid := g.y0 + (g.y1-g.y0)/2
		s.text(width-8, mid, "airmass", "text-anchor", "middle", "transform", "rotate(90 "+fmtf(width-8)+" "+fmtf(mid)+")")
	}
	s.raw("</g>")
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

func (n Night) drawTimeAxes(s *svg, g nightGeom, zone *time.Location, lanesTop float64) {
	step := hourStep(g.span/3600, g.x1-g.x0)
	s.raw(`<g class="axis time">`)
	// UTC above the plot.
	for t := n.Start.UTC().Truncate(step); !t.After(n.End); t = t.Add(step) {
		if t.Before(n.Start) {
			continue
		}
		x := g.x(t)
		s.line(x, g.y0, x, g.y0-4, "stroke", "#59636e")
		s.line(x, g.y0, x, g.y1, "stroke", "#d0d7de", "stroke-width", "0.6", "class", "grid")
		s.text(x, g.y0-16, t.UTC().Format("15"), "text-anchor", "middle")
	}
	s.text(g.x0-18, g.y0-16, "UTC", "text-anchor", "end", "font-weight", "600")
	// Local time below the plot, at whole local hours (zones with half-hour
	// offsets get their own tick positions).
	name, _ := n.Start.In(zone).Zone()
	lt := n.Start.In(zone)
	first := time.Date(lt.Year(), lt.Month(), lt.Day(), lt.Hour(), 0, 0, 0, zone)
	for t := first; !t.After(n.End); t = t.Add(time.Hour) {
		if t.Before(n.Start) || t.In(zone).Hour()%int(step.Hours()) != 0 {
			continue
		}
		x := g.x(t)
		s.line(x, g.y1, x, g.y1+4, "stroke", "#59636e")
		s.text(x, g.y1+16, t.In(zone).Format("15:04"), "text-anchor", "middle")
	}
	s.text(g.x0-20, g.y1+16, "local "+name, "text-anchor", "end", "font-weight", "600")
	s.raw("</g>")
}

func (n Night) drawLimit(s *svg, g nightGeom) {
	if !finite(n.LimitAltDeg) || n.LimitAltDeg <= 0 || n.LimitAltDeg >= 90 {
		return
	}
	y := g.y(n.LimitAltDeg)
	s.line(g.x0, y, g.x1, y, "class", "limit", "stroke", "#D55E00", "stroke-width", "1.2", "stroke-dasharray", "6 4")
	if n.LimitLabel != "" {
		s.text(g.x1-4, y-4, n.LimitLabel, "text-anchor", "end", "font-size", "10")
	}
}

func (n Night) drawMoon(s *svg, g nightGeom) {
	if len(n.Moon) == 0 {
		return
	}
	var p path
	prev := AltPoint{AltDeg: math.NaN()}
	for _, m := range n.Moon {
		if !finite(m.AltDeg) {
			p.lift()
			prev = AltPoint{AltDeg: math.NaN()}
			continue
		}
		addAbove(&p, g, prev.T, prev.AltDeg, m.T, m.AltDeg)
		prev = m
	}
	s.pathEl(&p, "class", "moon", "fill", "none", "stroke", "#59636e", "stroke-width", "2", "stroke-dasharray", "1 3", "stroke-linecap", "round")
	if x, y, label, ok := n.moonLabel(g); ok {
		s.text(x, y, label, "text-anchor", "middle", "font-style", "italic", "class", "halo",
			"stroke", "#ffffff", "stroke-width", "3", "paint-order", "stroke")
	}
}

// moonLabel places the Moon's label above the highest point of its curve.
func (n Night) moonLabel(g nightGeom) (x, y float64, label string, ok bool) {
	best, bestAlt := -1, 0.0
	for i, m := range n.Moon {
		if finite(m.AltDeg) && m.AltDeg > bestAlt && !m.T.Before(n.Start) && !m.T.After(n.End) {
			best, bestAlt = i, m.AltDeg
		}
	}
	if best < 0 {
		return 0, 0, "", false
	}
	label = "Moon"
	if n.MoonLabel != "" {
		label = n.MoonLabel
	}
	m := n.Moon[best]
	half := float64(len([]rune(label)))*3.4 + 2
	return clamp(g.x(m.T), g.x0+half, g.x1-half), clamp(g.y(m.AltDeg)-6, g.y0+11, g.y1-3), label, true
}

// addAbove extends p with the segment from (ta, a) to (tb, b), keeping only
// the part above the horizon: the crossing is interpolated linearly, and the
// path is lifted while the segment is below.
func addAbove(p *path, g nightGeom, ta time.Time, a float64, tb time.Time, b float64) {
	if !finite(a) {
		if b >= 0 {
			p.moveTo(g.x(tb), g.y(b))
		}
		return
	}
	switch {
	case a >= 0 && b >= 0:
		p.lineTo(g.x(tb), g.y(b))
	case a >= 0 && b < 0:
		tc := ta.Add(time.Duration(float64(tb.Sub(ta)) * a / (a - b)))
		p.lineTo(g.x(tc), g.y(0))
		p.lift()
	case a < 0 && b >= 0:
		tc := ta.Add(time.Duration(float64(tb.Sub(ta)) * -a / (b - a)))
		p.moveTo(g.x(tc), g.y(0))
		p.lineTo(g.x(tb), g.y(b))
	default:
		p.lift()
	}
}

// trackPath draws the part of pts between from and to (all of it when both
// are zero) that is above the horizon; the ends are interpolated.
func trackPath(g nightGeom, pts []TrackPoint, from, to time.Time) *path {
	var p path
	prevT, prevA := time.Time{}, math.NaN()
	emit := func(t time.Time, a float64) {
		if !finite(a) {
			p.lift()
			prevA = math.NaN()
			return
		}
		addAbove(&p, g, prevT, prevA, t, a)
		prevT, prevA = t, a
	}
	if from.IsZero() && to.IsZero() {
		for _, q := range pts {
			emit(q.T, q.AltDeg)
		}
		return &p
	}
	if a := altAt(pts, from); finite(a) {
		emit(from, a)
	}
	i := sort.Search(len(pts), func(i int) bool { return pts[i].T.After(from) })
	for ; i < len(pts) && pts[i].T.Before(to); i++ {
		emit(pts[i].T, pts[i].AltDeg)
	}
	if a := altAt(pts, to); finite(a) {
		emit(to, a)
	}
	return &p
}

// lerp interpolates linearly between (ta, a) and (tb, b) at t.
func lerp(ta time.Time, a float64, tb time.Time, b float64, t time.Time) float64 {
	d := tb.Sub(ta).Seconds()
	if d <= 0 {
		return b
	}
	return a + (b-a)*t.Sub(ta).Seconds()/d
}

func (n Night) drawTrack(s *svg, g nightGeom, i int, tr Track, avoid []box) {
	colour, dash, cls := seriesStyle(i)
	sc := "s" + strconv.Itoa(cls)
	s.raw(`<g class="track" data-target="`)
	s.esc(tr.Name)
	s.raw(`">`)
	for _, gw := range tr.Goals {
		if !gw.End.After(gw.Start) {
			continue
		}
		s.pathEl(trackPath(g, tr.Points, gw.Start, gw.End), "class", "goal "+sc, "fill", "none", "stroke", colour,
			"stroke-width", "7", "stroke-opacity", "0.3", "stroke-linecap", "butt")
	}
	s.pathEl(trackPath(g, tr.Points, time.Time{}, time.Time{}), "class", "trk "+sc, "fill", "none", "stroke", colour,
		"stroke-width", "1.6", "stroke-dasharray", dash)
	for _, b := range n.Blocks {
		if b.Target != tr.Name || !b.End.After(b.Start) {
			continue
		}
		s.pathEl(trackPath(g, tr.Points, b.Start, b.End), "class", "blk "+sc, "fill", "none", "stroke", colour,
			"stroke-width", "3.5", "stroke-linecap", "butt")
	}
	n.drawPhaseMarks(s, g, tr, colour, sc, avoid)
	s.raw("</g>")
}

// phaseMarks returns the marks to draw for tr: the given ones, or the
// passages through phases 0 and 0.5 found between samples. When the phase
// advances by half an orbit or more between two samples its passages cannot
// be placed, and no marks are derived.
func phaseMarks(tr Track) []PhaseMark {
	if len(tr.PhaseMarks) > 0 {
		return tr.PhaseMarks
	}
	var out []PhaseMark
	for i := 1; i < len(tr.Points); i++ {
		a, b := tr.Points[i-1], tr.Points[i]
		if !finite(a.Phase) || !finite(b.Phase) {
			continue
		}
		d := b.Phase - a.Phase
		if d < 0 {
			d++
		}
		if d >= 0.5 || d <= 0 {
			if d >= 0.5 {
				return nil
			}
			continue
		}
		for _, m := range []float64{0, 0.5, 1} {
			// m lies in (a.Phase, a.Phase+d] on the unwrapped phase line.
			if m > a.Phase && m <= a.Phase+d {
				f := (m - a.Phase) / d
				t := a.T.Add(time.Duration(f * float64(b.T.Sub(a.T))))
				out = append(out, PhaseMark{T: t, Phase: math.Mod(m, 1)})
			}
		}
	}
	return out
}

// drawPhaseMarks marks phases 0 and 0.5 along a track and labels some of
// them, never over a box in avoid (the targets' names).
func (n Night) drawPhaseMarks(s *svg, g nightGeom, tr Track, colour, sc string, avoid []box) {
	lastLabel, lastMark := math.Inf(-1), math.Inf(-1)
	label := len(n.Tracks) <= 8 // more tracks: marks only, the legend explains them
	for _, m := range phaseMarks(tr) {
		alt := altAt(tr.Points, m.T)
		if !finite(alt) || alt < 0 || m.T.Before(n.Start) || m.T.After(n.End) {
			continue
		}
		x, y := g.x(m.T), g.y(alt)
		if x-lastMark < 7 {
			continue // an orbit of minutes: marks this close would merge into a line
		}
		lastMark = x
		if m.Phase < 0.25 || m.Phase >= 0.75 {
			s.circle(x, y, 3, "class", "ph0 f"+sc[1:], "fill", colour)
		} else {
			s.circle(x, y, 3, "class", "ph5 "+sc, "fill", "#ffffff", "stroke", colour, "stroke-width", "1.4")
		}
		text := "φ" + fmtPhase(m.Phase)
		at := box{x + 4, y - 14, x + 4 + float64(len([]rune(text)))*5, y - 3}
		if label && x-lastLabel >= 40 && !slices.ContainsFunc(avoid, at.overlaps) {
			s.text(x+4, y-5, text, "font-size", "9", "class", "halo", "stroke", "#ffffff",
				"stroke-width", "2.5", "paint-order", "stroke")
			lastLabel = x
		}
	}
}

// altAt interpolates the track's altitude at t (NaN outside the samples).
func altAt(pts []TrackPoint, t time.Time) float64 {
	lo, hi := 0, len(pts)
	for lo < hi {
		mid := (lo + hi) / 2
		if pts[mid].T.Before(t) {
			lo = mid + 1
		} else {
			hi = mid
		}
	}
	switch {
	case lo < len(pts) && pts[lo].T.Equal(t):
		return pts[lo].AltDeg
	case lo == 0 || lo == len(pts):
		return math.NaN()
	}
	return lerp(pts[lo-1].T, pts[lo-1].AltDeg, pts[lo].T, pts[lo].AltDeg, t)
}

// box is a label's bounding box in pixels.
type box struct{ x0, y0, x1, y1 float64 }

func (a box) overlaps(b box) bool {
	return a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1
}

// trackLabel is a track's name and where it is drawn.
type trackLabel struct {
	name  string
	x, y  float64
	at    box
	class int
}

// drawTrackLabels draws the names placed by placeTrackLabels.
func drawTrackLabels(s *svg, labels []trackLabel) {
	for _, l := range labels {
		s.text(l.x, l.y, l.name, "text-anchor", "middle", "font-weight", "600",
			"class", "halo lbl f"+strconv.Itoa(l.class), "stroke", "#ffffff", "stroke-width", "3", "paint-order", "stroke")
	}
}

// placeTrackLabels places each track's name near its highest point, moving
// a label along the track when it would cover one already placed. The
// names are placed before the phase labels, which then keep clear of them.
func (n Night) placeTrackLabels(g nightGeom) []trackLabel {
	var out []trackLabel
	var placed []box
	if x, y, label, ok := n.moonLabel(g); ok {
		half := float64(len([]rune(label)))*3.4 + 2
		placed = append(placed, box{x - half, y - 10, x + half, y + 2})
	}
	for i, tr := range n.Tracks {
		var vis []int
		best := -1
		for j, q := range tr.Points {
			if finite(q.AltDeg) && q.AltDeg >= 0 && !q.T.Before(n.Start) && !q.T.After(n.End) {
				vis = append(vis, j)
				if best < 0 || q.AltDeg > tr.Points[best].AltDeg {
					best = j
				}
			}
		}
		if best < 0 {
			continue
		}
		name := truncate(tr.Name, 18)
		half := float64(len([]rune(name)))*3.4 + 2
		candidates := []int{best}
		for _, f := range []float64{0.35, 0.65, 0.2, 0.8, 0.5, 0.1, 0.9} {
			candidates = append(candidates, vis[int(f*float64(len(vis)-1))])
		}
		var at box
		var x, y float64
		for k, c := range candidates {
			q := tr.Points[c]
			x = clamp(g.x(q.T), g.x0+half, g.x1-half)
			y = clamp(g.y(q.AltDeg)-7, g.y0+11, g.y1-3)
			at = box{x - half, y - 10, x + half, y + 2}
			free := true
			for _, p := range placed {
				if at.overlaps(p) {
					free = false
					break
				}
			}
			if free || k == len(candidates)-1 {
				break
			}
		}
		placed = append(placed, at)
		_, _, cls := seriesStyle(i)
		out = append(out, trackLabel{name: name, x: x, y: y, at: at, class: cls})
	}
	return out
}

func (n Night) drawLanes(s *svg, g nightGeom, top float64, id string) {
	if len(n.Tracks) == 0 {
		return
	}
	s.raw(`<g class="lanes">`)
	s.text(g.x0-5, top-6, "blocks", "text-anchor", "end", "font-weight", "600")
	for i, tr := range n.Tracks {
		colour, _, cls := seriesStyle(i)
		y := top + float64(i)*nLaneH
		s.line(g.x0, y+nLaneH, g.x1, y+nLaneH, "stroke", "#d0d7de", "stroke-width", "0.5", "class", "grid")
		s.text(g.x0-5, y+nLaneH-4, truncate(tr.Name, 18), "text-anchor", "end")
		for _, gw := range tr.Goals {
			xa, xb := clamp(g.x(gw.Start), g.x0, g.x1), clamp(g.x(gw.End), g.x0, g.x1)
			if xb-xa <= 0 {
				continue
			}
			s.rect(xa, y+3, xb-xa, nLaneH-6, "class", "goalwin s"+strconv.Itoa(cls), "fill", "none", "stroke", colour,
				"stroke-width", "0.8", "stroke-dasharray", "2 2")
		}
		for _, b := range n.Blocks {
			if b.Target != tr.Name {
				continue
			}
			n.drawBlock(s, g, b, y, colour, cls, id)
		}
	}
	s.raw("</g>")
}

func (n Night) drawBlock(s *svg, g nightGeom, b Block, y float64, colour string, cls int, id string) {
	xa, xb := clamp(g.x(b.Start), g.x0, g.x1), clamp(g.x(b.End), g.x0, g.x1)
	if xb-xa <= 0 {
		return
	}
	w := math.Max(xb-xa, 1.5)
	state := "planned"
	if b.State != "" {
		state = b.State
	}
	s.raw(`<g class="block" data-state="` + state + `" data-target="`)
	s.esc(b.Target)
	s.raw(`">`)
	s.raw("<title>")
	s.esc(b.Target + " " + b.Label + " " + b.Start.UTC().Format("15:04") + "–" + b.End.UTC().Format("15:04") + " UTC")
	if b.Filler {
		s.esc(" (filler)")
	}
	if b.State != "" {
		s.esc(" (" + b.State + ")")
	}
	s.raw("</title>")
	fc := "f" + strconv.Itoa(cls)
	switch b.State {
	case "lost":
		s.rect(xa, y+2, w, nLaneH-4, "class", "s"+strconv.Itoa(cls), "fill", "none", "stroke", colour, "stroke-width", "1.2")
		s.line(xa, y+2, xa+w, y+nLaneH-2, "stroke", colour)
	default:
		s.rect(xa, y+2, w, nLaneH-4, "class", fc, "fill", colour)
		if b.Filler {
			s.rect(xa, y+2, w, nLaneH-4, "fill", "url(#"+id+"-hatch)")
		}
		if b.State == "done" {
			s.text(xa+2, y+nLaneH-4, "✓", "font-size", "10", "fill", "#ffffff", "class", "onblock")
		}
	}
	if b.Label != "" && w >= float64(len([]rune(b.Label)))*5.5+8 {
		s.text(xa+w/2, y+nLaneH-4.5, b.Label, "text-anchor", "middle", "font-size", "9", "fill", "#ffffff", "class", "onblock")
	}
	s.raw("</g>")
}

func (n Night) drawNow(s *svg, g nightGeom, lanesTop float64) {
	if n.Now.IsZero() || n.Now.Before(n.Start) || n.Now.After(n.End) {
		return
	}
	x := g.x(n.Now)
	bottom := lanesTop + float64(len(n.Tracks))*nLaneH
	s.line(x, g.y0, x, bottom, "class", "now", "stroke", "#CC79A7", "stroke-width", "1.5")
	s.text(x+3, g.y0+12, "now", "font-weight", "600")
}

// drawUnallocated greys the spans outside the allocated time.
func (n Night) drawUnallocated(s *svg, g nightGeom) {
	if len(n.Unallocated) == 0 {
		return
	}
	s.raw(`<g class="unallocated">`)
	for _, u := range n.Unallocated {
		xa, xb := clamp(g.x(u.Start), g.x0, g.x1), clamp(g.x(u.End), g.x0, g.x1)
		if xb-xa <= 0 {
			continue
		}
		s.rect(xa, g.y0, xb-xa, g.y1-g.y0, "class", "unallocated", "fill", "#59636e", "fill-opacity", "0.35")
		if u.Label != "" && xb-xa >= 80 {
			s.text((xa+xb)/2, g.y0+28, u.Label, "text-anchor", "middle", "font-size", "11", "font-weight", "600")
		}
	}
	s.raw("</g>")
}

func (n Night) drawLegend(s *svg, y float64) {
	s.raw(`<g class="legend" font-size="10">`)
	x := nLeft
	s.circle(x, y-3, 3, "fill", "#1b1f24")
	s.text(x+6, y, "phase 0")
	x += 56
	s.circle(x, y-3, 3, "fill", "#ffffff", "stroke", "#1b1f24")
	s.text(x+6, y, "phase 0.5")
	x += 68
	s.line(x, y-3, x+18, y-3, "stroke", "#59636e", "stroke-width", "7", "stroke-opacity", "0.3")
	s.text(x+22, y, "in a goal window")
	x += 110
	s.line(x, y-3, x+18, y-3, "stroke", "#59636e", "stroke-width", "3.5")
	s.text(x+22, y, "planned block")
	x += 96
	s.rect(x, y-9, 16, 9, "fill", "#59636e")
	s.rect(x, y-9, 16, 9, "fill", "url(#"+n.idOr()+"-hatch)")
	s.text(x+20, y, "filler")
	x += 50
	s.line(x, y-3, x+18, y-3, "stroke", "#59636e", "stroke-width", "2", "stroke-dasharray", "1 3", "stroke-linecap", "round")
	s.text(x+22, y, "Moon")
	s.raw("</g>")
}

func (n Night) idOr() string {
	if n.ID == "" {
		return "n"
	}
	return n.ID
}

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
