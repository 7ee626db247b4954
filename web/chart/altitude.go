package chart

import (
	"io"
	"math"
	"strconv"
	"time"
)

// Altitude is a small panel of one target's altitude over the night: the
// curve as a filled area above the horizon, the observable altitude limit
// as one rule, the dark time as a bar along the foot, the planned blocks
// as marks on the curve and the highest point named. Time runs across in
// local hours only (one scale). Every value is computed by the caller.
type Altitude struct {
	Title       string
	Start, End  time.Time      // UTC instants; End after Start
	Zone        *time.Location // local time of the hour labels; nil means UTC
	Dark        []Span         // the night's dark stretches (Sun below −18°)
	Points      []AltPoint     // the target's altitude, degrees, in time order
	LimitAltDeg float64        // the observable limit, degrees; NaN or ≤ 0 means none
	Blocks      []Span         // planned blocks of this target
	Width       int            // pixels; 0 means 320
}

// panel geometry, pixels.
const (
	aTop    = 16.0
	aPlotH  = 72.0
	aFoot   = 26.0
	aLeft   = 8.0
	aRight  = 8.0
	aHeight = aTop + aPlotH + aFoot
)

// WriteSVG draws the panel to w.
func (a Altitude) WriteSVG(w io.Writer) error {
	var s svg
	a.draw(&s)
	return s.writeTo(w)
}

// SVG returns the panel as a string.
func (a Altitude) SVG() string {
	var s svg
	a.draw(&s)
	return string(s.b)
}

func (a Altitude) draw(s *svg) {
	width := float64(a.Width)
	if a.Width < 160 {
		width = 320
	}
	zone := a.Zone
	if zone == nil {
		zone = time.UTC
	}
	s.open(width, aHeight, "chart altitude", a.Title, "Altitude of the target over the night in local time, the observable limit as a rule, dark time along the foot, planned blocks marked.")
	s.rect(0, 0, width, aHeight, "class", "ground", "fill", paperFill)
	s.text(aLeft, 11, truncate(a.Title, 40), "font-size", "10", "font-weight", "600", "fill", inkText)
	if !a.End.After(a.Start) {
		s.close()
		return
	}
	g := nightGeom{x0: aLeft, x1: width - aRight, t0: a.Start, span: a.End.Sub(a.Start).Seconds()}
	y := func(alt float64) float64 { return aTop + (90-clamp(alt, 0, 90))/90*aPlotH }
	foot := aTop + aPlotH
	for _, d := range a.Dark {
		xa, xb := g.cx(d.Start), g.cx(d.End)
		if xb > xa {
			s.rect(xa, foot+1, xb-xa, 4, "class", "dark", "fill", skyFill["night"])
		}
	}
	// the area under the curve, above the horizon
	var p path
	hi, hiT := math.Inf(-1), time.Time{}
	open := false
	lastX := g.x0
	for _, pt := range a.Points {
		x := g.x(pt.T)
		if !finite(pt.AltDeg) || x < g.x0 || x > g.x1 {
			continue
		}
		if !open {
			p.moveTo(x, foot)
			open = true
		}
		p.lineTo(x, y(pt.AltDeg))
		lastX = x
		if pt.AltDeg > hi {
			hi, hiT = pt.AltDeg, pt.T
		}
	}
	if open {
		p.lineTo(lastX, foot)
		s.pathEl(&p, "class", "altarea", "fill", airmassRamp[1], "stroke", inkText, "stroke-width", "1.2")
	}
	s.line(g.x0, foot, g.x1, foot, "stroke", inkText, "stroke-width", "0.8")
	if finite(a.LimitAltDeg) && a.LimitAltDeg > 0 {
		ly := y(a.LimitAltDeg)
		s.line(g.x0, ly, g.x1, ly, "stroke", inkText, "stroke-width", "0.7", "stroke-dasharray", "3 3", "class", "altlimit")
		s.rect(g.x1-58, ly-10, 58, 9, "fill", paperFill)
		s.text(g.x1, ly-2, "limit "+strconv.FormatFloat(a.LimitAltDeg, 'f', 0, 64)+"°", "text-anchor", "end", "font-size", "8", "fill", inkText)
	}
	for _, b := range a.Blocks {
		xa, xb := g.cx(b.Start), g.cx(b.End)
		if xb > xa {
			s.rect(xa, foot-4, math.Max(xb-xa, 2), 4, "class", "altblock", "fill", blockFill)
		}
	}
	if hi > 0 {
		label := "highest " + strconv.FormatFloat(hi, 'f', 0, 64) + "° at " + hiT.In(zone).Format("15:04")
		s.text(width-aRight, 11, label, "text-anchor", "end", "font-size", "9", "fill", mutedText)
	} else {
		s.text(width/2, foot-20, "below the horizon all night", "text-anchor", "middle", "font-size", "9", "fill", inkText)
	}
	step := 3 * time.Hour
	lt := a.Start.In(zone)
	for t := time.Date(lt.Year(), lt.Month(), lt.Day(), lt.Hour(), 0, 0, 0, zone); !t.After(a.End); t = t.Add(time.Hour) {
		x := g.x(t)
		if t.Before(a.Start) || t.In(zone).Hour()%int(step.Hours()) != 0 || x < g.x0+12 || x > g.x1-12 {
			continue
		}
		s.line(x, foot, x, foot+8, "stroke", inkText, "stroke-width", "0.7")
		s.text(x, foot+18, t.In(zone).Format("15:04"), "text-anchor", "middle", "font-size", "9", "fill", inkText)
	}
	s.close()
}

// Panels returns one small altitude panel per lane of the night chart, in
// the lanes' order: the altitude view offered beside the lanes.
func (n Night) Panels() []Altitude {
	var dark []Span
	for _, b := range n.Bands {
		if b.Kind == "night" {
			dark = append(dark, Span{Start: b.Start, End: b.End})
		}
	}
	var out []Altitude
	for _, l := range n.lanes() {
		a := Altitude{Title: l.Name, Start: n.Start, End: n.End, Zone: n.Zone, Dark: dark, LimitAltDeg: n.LimitAltDeg}
		for _, p := range l.Points {
			a.Points = append(a.Points, AltPoint{T: p.T, AltDeg: p.AltDeg})
		}
		for _, b := range n.Blocks {
			if b.Target == l.Name {
				a.Blocks = append(a.Blocks, Span{Start: b.Start, End: b.End})
			}
		}
		out = append(out, a)
	}
	return out
}
