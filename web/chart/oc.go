package chart

import (
	"io"
	"math"
	"strconv"
)

// OC is an O−C diagram: the residuals of observed event times against an
// ephemeris (observed minus computed), in seconds, against cycle number,
// with 1σ error bars and optional fitted lines.
type OC struct {
	Title  string
	Points []OCPoint
	// Lines are fitted models drawn over the points (e.g. the refined
	// ephemeris relative to the one the residuals are computed from).
	Lines  []OCLine
	Width  int // pixels; 0 means 640
	Height int // pixels; 0 means 300
}

// OCPoint is one timing: cycle number E, O−C and its 1σ error in seconds.
type OCPoint struct {
	Cycle    float64
	OCSec    float64
	ErrSec   float64
	Label    string // e.g. the date and observer, shown as a tooltip
	Excluded bool   // left out of the fit (drawn hollow)
}

// OCLine is a fitted model: O−C in seconds at cycle numbers.
type OCLine struct {
	Label  string
	Cycles []float64
	OCSec  []float64
}

// WriteSVG draws the diagram to w.
func (o OC) WriteSVG(w io.Writer) error {
	var s svg
	o.draw(&s)
	return s.writeTo(w)
}

// SVG returns the diagram as a string.
func (o OC) SVG() string {
	var s svg
	o.draw(&s)
	return string(s.b)
}

func (o OC) draw(s *svg) {
	w, h := float64(o.Width), float64(o.Height)
	if o.Width < 200 {
		w = 640
	}
	if o.Height < 150 {
		h = 300
	}
	s.open(w, h, "chart oc", o.Title, "Observed minus computed event times against cycle number, with 1-sigma error bars.")
	xlo, xhi, ylo, yhi := math.Inf(1), math.Inf(-1), 0.0, 0.0
	n := 0
	for _, p := range o.Points {
		if !finite(p.Cycle) || !finite(p.OCSec) {
			continue
		}
		e := math.Abs(p.ErrSec)
		if !finite(e) {
			e = 0
		}
		xlo, xhi = math.Min(xlo, p.Cycle), math.Max(xhi, p.Cycle)
		ylo, yhi = math.Min(ylo, p.OCSec-e), math.Max(yhi, p.OCSec+e)
		n++
	}
	for _, l := range o.Lines {
		for _, c := range l.Cycles {
			if finite(c) && n > 0 {
				xlo, xhi = math.Min(xlo, c), math.Max(xhi, c)
			}
		}
	}
	if n == 0 {
		s.text(w/2, h/2, "No timings yet.", "text-anchor", "middle")
		s.close()
		return
	}
	// Seconds, or minutes when residuals are large.
	scale, unit := 1.0, "s"
	if math.Max(-ylo, yhi) >= 600 {
		scale, unit = 60, "min"
	}
	xt, xlo, xhi := niceTicks(xlo, xhi, 6)
	yt, ylo, yhi := niceTicks(ylo/scale, yhi/scale, 5)
	x := linear{xlo, xhi, 70, w - 16}
	y := linear{ylo, yhi, h - 46, 14}
	xs, ys := tickStep(xt), tickStep(yt)
	s.frame(x, y, xt, yt, "cycle E", "O−C ("+unit+")",
		func(v float64) string { return fmtTick(v, xs) }, func(v float64) string { return fmtTick(v, ys) })
	if ylo < 0 && yhi > 0 {
		s.line(x.p0, y.at(0), x.p1, y.at(0), "stroke", "#59636e", "stroke-width", "1")
	}
	for i, l := range o.Lines {
		colour, dash, cls := seriesStyle(i + 1)
		var p path
		for j := range min(len(l.Cycles), len(l.OCSec)) {
			if finite(l.Cycles[j]) && finite(l.OCSec[j]) {
				p.lineTo(x.at(l.Cycles[j]), y.at(clamp(l.OCSec[j]/scale, ylo, yhi)))
			}
		}
		if dash == "" {
			dash = "6 3"
		}
		s.pathEl(&p, "class", "fit s"+strconv.Itoa(cls), "fill", "none", "stroke", colour, "stroke-width", "1.5", "stroke-dasharray", dash)
		s.text(x.p1-4, y.p1+14+float64(i)*13, l.Label, "text-anchor", "end", "font-size", "10", "fill", colour)
	}
	s.raw(`<g class="points">`)
	for _, p := range o.Points {
		if !finite(p.Cycle) || !finite(p.OCSec) {
			continue
		}
		px, py := x.at(p.Cycle), y.at(p.OCSec/scale)
		if e := math.Abs(p.ErrSec) / scale; finite(e) && e > 0 {
			s.line(px, y.at(p.OCSec/scale-e), px, y.at(p.OCSec/scale+e), "stroke", "#1b1f24", "stroke-width", "1")
		}
		s.raw("<g>")
		if p.Label != "" {
			s.raw("<title>")
			s.esc(p.Label)
			s.raw("</title>")
		}
		if p.Excluded {
			s.circle(px, py, 3.5, "fill", "#ffffff", "stroke", "#1b1f24", "class", "excluded")
		} else {
			s.circle(px, py, 3.5, "fill", "#0072B2", "class", "f0")
		}
		s.raw("</g>")
	}
	s.raw("</g>")
	s.close()
}
