package chart

import (
	"io"
	"math"
	"slices"
	"strconv"
)

// Ring is a phase ring: a circle whose angle is orbital phase (phase 0 at
// the top, increasing clockwise), with the target's goal windows as arcs,
// planned exposures as ticks outside the circle and observed exposures as
// dots inside it.
type Ring struct {
	Title    string
	Goals    []Arc
	Planned  []float64 // mid-exposure phases of planned exposures, 0 ≤ φ < 1
	Observed []float64 // mid-exposure phases of exposures actually taken
	// Bins, when given, draws coverage counts per phase bin as a thin band
	// of radial bars inside the circle.
	Bins []Bin
	Size int    // pixels; 0 means 240
	ID   string // element id prefix; "" means "r"
}

// Arc is a goal window from From to To in phase (wrapping through 0 when
// From > To), with a label and whether its requirement is met.
type Arc struct {
	From, To float64
	Label    string
	Met      bool
}

// Bin is the count of exposures in a phase bin [From, To).
type Bin struct {
	From, To float64
	Count    int
}

// WriteSVG draws the ring to w.
func (r Ring) WriteSVG(w io.Writer) error {
	var s svg
	r.draw(&s)
	return s.writeTo(w)
}

// SVG returns the ring as a string.
func (r Ring) SVG() string {
	var s svg
	r.draw(&s)
	return string(s.b)
}

// ringPoint returns the pixel position of phase p at radius rad around
// (c, c): phase 0 at the top, clockwise.
func ringPoint(c, rad, p float64) (x, y float64) {
	a := 2 * math.Pi * p
	return c + rad*math.Sin(a), c - rad*math.Cos(a)
}

func (r Ring) draw(s *svg) {
	size := float64(r.Size)
	if r.Size < 120 {
		size = 240
	}
	height := size + 34
	hasBins := slices.ContainsFunc(r.Bins, func(b Bin) bool { return b.Count > 0 && finite(b.From) && finite(b.To) })
	if hasBins {
		height += 14
	}
	c := size / 2
	rad := size/2 - 30
	s.open(size, height, "chart ring", r.Title, "Orbital phase as angle, phase 0 at the top and increasing clockwise; "+
		"goal windows as thick arcs, planned exposures as ticks outside the circle, observed exposures as dots inside.")
	s.circle(c, c, rad, "fill", "none", "stroke", "#59636e", "stroke-width", "1", "class", "frame")
	for _, q := range []float64{0, 0.25, 0.5, 0.75} {
		x0, y0 := ringPoint(c, rad-4, q)
		x1, y1 := ringPoint(c, rad+4, q)
		s.line(x0, y0, x1, y1, "stroke", "#59636e")
		lx, ly := ringPoint(c, rad+16, q)
		s.text(lx, ly+4, fmtPhase(q), "text-anchor", "middle", "font-size", "10", "class", "tick")
	}
	r.drawBins(s, c, rad)
	var placed []box
	for i, a := range r.Goals {
		if !finite(a.From) || !finite(a.To) {
			continue
		}
		colour, dash, cls := seriesStyle(i)
		width := "7"
		if !a.Met {
			width = "5"
		}
		s.raw(`<path class="goal s` + strconv.Itoa(cls) + `" d="`)
		s.b = appendArc(s.b, c, rad, a.From, a.To)
		s.raw(`" fill="none" stroke="` + colour + `" stroke-width="` + width + `" stroke-opacity="0.55"`)
		if !a.Met {
			s.attr("stroke-dasharray", "9 3")
		} else if dash != "" {
			s.attr("stroke-dasharray", dash)
		}
		s.raw("/>")
		mid := a.From + arcLen(a.From, a.To)/2
		label := a.Label
		if a.Met {
			label += " ✓"
		}
		placeLabel(s, &placed, c, rad-12, math.Mod(mid, 1), label)
	}
	for _, p := range r.Planned {
		if !finite(p) {
			continue
		}
		p = wrap01(p)
		x0, y0 := ringPoint(c, rad+3, p)
		x1, y1 := ringPoint(c, rad+11, p)
		s.line(x0, y0, x1, y1, "class", "planned", "stroke", "#1b1f24", "stroke-width", "1.5")
	}
	for _, p := range r.Observed {
		if !finite(p) {
			continue
		}
		x, y := ringPoint(c, rad-8, wrap01(p))
		s.circle(x, y, 2.6, "class", "observed", "fill", "#1b1f24")
	}
	ly := size + 12
	s.line(12, ly-9, 12, ly+1, "stroke", "#1b1f24", "stroke-width", "1.5")
	s.text(20, ly, "planned ("+strconv.Itoa(len(r.Planned))+")", "font-size", "10")
	s.circle(120, ly-4, 2.6, "fill", "#1b1f24")
	s.text(126, ly, "observed ("+strconv.Itoa(len(r.Observed))+")", "font-size", "10")
	s.text(8, ly+16, "arcs: goals (✓ met; dashed: not yet)", "font-size", "10")
	if hasBins {
		s.line(8, ly+26, 18, ly+26, "stroke", "#59636e", "stroke-opacity", "0.45", "stroke-width", "6", "class", "bin-key")
		s.text(22, ly+30, "grey inner bars: exposures per phase bin", "font-size", "10")
	}
	s.close()
}

func (r Ring) drawBins(s *svg, c, rad float64) {
	maxCount := 0
	for _, b := range r.Bins {
		maxCount = max(maxCount, b.Count)
	}
	if maxCount == 0 {
		return
	}
	s.raw(`<g class="bins">`)
	for _, b := range r.Bins {
		if b.Count <= 0 || !finite(b.From) || !finite(b.To) {
			continue
		}
		depth := 3 + 10*float64(b.Count)/float64(maxCount)
		s.raw(`<path d="`)
		s.b = appendArc(s.b, c, rad*0.45-depth/2, b.From, b.To)
		s.raw(`" fill="none" stroke="#59636e" stroke-opacity="0.45" class="bin"`)
		s.nattr("stroke-width", depth)
		s.raw("><title>")
		s.esc(fmtPhase(b.From) + "–" + fmtPhase(b.To) + ": " + strconv.Itoa(b.Count) + " exposures")
		s.raw("</title></path>")
	}
	s.raw("</g>")
}

// arcLen is the phase length from a to b going forward (wrapping at 1).
func arcLen(a, b float64) float64 {
	d := b - a
	if d <= 0 {
		d++
	}
	return d
}

func wrap01(p float64) float64 {
	p = math.Mod(p, 1)
	if p < 0 {
		p++
	}
	return p
}

// appendArc appends an SVG arc path from phase a to b (forward) at radius
// rad around (c, c). A full circle is drawn as two half arcs.
func appendArc(b []byte, c, rad, from, to float64) []byte {
	from = wrap01(from)
	l := arcLen(from, wrap01(to))
	if l >= 1 {
		l = 0.9999
	}
	x0, y0 := ringPoint(c, rad, from)
	x1, y1 := ringPoint(c, rad, from+l)
	large := "0"
	if l > 0.5 {
		large = "1"
	}
	b = append(b, 'M')
	b = appendXY(b, x0, y0)
	b = append(b, 'A')
	b = appendXY(b, rad, rad)
	b = append(b, " 0 "+large+" 1 "...)
	b = appendXY(b, x1, y1)
	return b
}

// placeLabel writes a goal label just inside the ring at phase p and moves
// it up or down while it would cover a label already placed. On the left
// and right of the ring a label runs towards the centre; near the top and
// the bottom it runs away from the vertical through the centre, so that it
// stays beside its own arc: an eclipse's ingress (just before phase 0, left
// of the top) and egress (right of it) do not swap sides.
func placeLabel(s *svg, placed *[]box, c, rad, p float64, label string) {
	w := float64(len([]rune(label)))*5.2 + 2
	shifts := []float64{0, 12, -12, 24, -24}
	px, py := ringPoint(c, rad, p)
	vertical := math.Abs(px-c) < math.Abs(py-c)
	if vertical {
		rad -= 10 // more room across the ring
	}
	for try, dy := range shifts {
		x, y := ringPoint(c, rad, p)
		y += dy
		anchor, x0 := "middle", x-w/2
		switch {
		case vertical && x < c-0.5:
			anchor, x0 = "end", x-w
		case vertical && x > c+0.5:
			anchor, x0 = "start", x
		case vertical:
		case x > c+8:
			anchor, x0 = "end", x-w
		case x < c-8:
			anchor, x0 = "start", x
		}
		b := box{x0, y - 6, x0 + w, y + 6}
		free := true
		for _, o := range *placed {
			if b.overlaps(o) {
				free = false
				break
			}
		}
		if free || try == len(shifts)-1 {
			*placed = append(*placed, b)
			s.text(x, y+3, label, "text-anchor", anchor, "font-size", "9", "class", "halo", "stroke", "#ffffff",
				"stroke-width", "2.5", "paint-order", "stroke")
			return
		}
	}
}
