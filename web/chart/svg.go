// Package chart draws phasecast's charts as SVG on the server: the night
// chart (altitude against time), the phase ring, the O−C diagram, the
// phase-uncertainty chart and the horizon-mask preview.
//
// Each chart takes a plain struct of already-computed values (times,
// altitudes, phases) and does only geometry: it has no astronomy and does not
// depend on the planner's types. The output is a standalone <svg> element
// that reads without JavaScript and without the stylesheet: colours are set
// as presentation attributes (the page's CSS may override them through the
// class names, e.g. for night-vision mode). Colour never carries meaning
// alone: series also differ in dash pattern and carry text labels.
//
// All text is XML-escaped; nothing from the input is written unescaped.
package chart

import (
	"bytes"
	"io"
	"math"
	"strconv"
	"unicode/utf8"
)

// Palette is the Okabe & Ito (2008) colour-blind-safe set ("Color Universal
// Design"), without its yellow, which is unreadable on white paper.
var Palette = []string{"#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#000000"}

// Dashes are the stroke-dasharray patterns that, with Palette, tell series
// apart without colour. The index of a series picks both, so the pair
// (colour, dash) repeats only after len(Palette)·len(Dashes) series.
var Dashes = []string{"", "8 3", "2 3", "10 3 2 3", "5 5"}

// seriesStyle returns the colour, dash pattern and class of series i.
func seriesStyle(i int) (colour, dash string, class int) {
	return Palette[i%len(Palette)], Dashes[(i/len(Palette)+i)%len(Dashes)], i % len(Palette)
}

// svg is a small writer of SVG elements into a buffer. Attribute values and
// text are escaped; numbers are written with one decimal.
type svg struct {
	b []byte
}

func (s *svg) raw(str string) { s.b = append(s.b, str...) }

// num appends x with one decimal (pixel coordinates), never NaN or Inf.
func (s *svg) num(x float64) {
	s.b = appendNum(s.b, x)
}

func appendNum(b []byte, x float64) []byte {
	if math.IsNaN(x) || math.IsInf(x, 0) || math.Abs(x) > 1e12 {
		x = 0
	}
	t := int64(math.Round(x * 10))
	if t < 0 {
		b = append(b, '-')
		t = -t
	}
	b = strconv.AppendInt(b, t/10, 10)
	if d := t % 10; d != 0 {
		b = append(b, '.', byte('0'+d))
	}
	return b
}

// esc appends str escaped for XML text and attribute values, replacing
// invalid UTF-8 and control characters.
func (s *svg) esc(str string) {
	for i := 0; i < len(str); {
		r, size := utf8.DecodeRuneInString(str[i:])
		i += size
		switch {
		case r == '<':
			s.b = append(s.b, "&lt;"...)
		case r == '>':
			s.b = append(s.b, "&gt;"...)
		case r == '&':
			s.b = append(s.b, "&amp;"...)
		case r == '"':
			s.b = append(s.b, "&quot;"...)
		case r == '\'':
			s.b = append(s.b, "&#39;"...)
		case r == utf8.RuneError && size == 1, r < 0x20 && r != '\t' && r != '\n', r == 0xFFFE, r == 0xFFFF:
			s.b = append(s.b, "\uFFFD"...)
		default:
			s.b = utf8.AppendRune(s.b, r)
		}
	}
}

// attr appends ` name="value"` with value escaped.
func (s *svg) attr(name, value string) {
	s.b = append(s.b, ' ')
	s.b = append(s.b, name...)
	s.b = append(s.b, '=', '"')
	s.esc(value)
	s.b = append(s.b, '"')
}

// nattr appends ` name="x"` for a number.
func (s *svg) nattr(name string, x float64) {
	s.b = append(s.b, ' ')
	s.b = append(s.b, name...)
	s.b = append(s.b, '=', '"')
	s.num(x)
	s.b = append(s.b, '"')
}

// line draws a line from (x1, y1) to (x2, y2); extra are name/value pairs.
func (s *svg) line(x1, y1, x2, y2 float64, extra ...string) {
	s.raw("<line")
	s.nattr("x1", x1)
	s.nattr("y1", y1)
	s.nattr("x2", x2)
	s.nattr("y2", y2)
	s.attrs(extra)
	s.raw("/>")
}

// rect draws a rectangle; negative sizes are normalised.
func (s *svg) rect(x, y, w, h float64, extra ...string) {
	if w < 0 {
		x, w = x+w, -w
	}
	if h < 0 {
		y, h = y+h, -h
	}
	s.raw("<rect")
	s.nattr("x", x)
	s.nattr("y", y)
	s.nattr("width", w)
	s.nattr("height", h)
	s.attrs(extra)
	s.raw("/>")
}

// circle draws a circle of radius r at (cx, cy).
func (s *svg) circle(cx, cy, r float64, extra ...string) {
	s.raw("<circle")
	s.nattr("cx", cx)
	s.nattr("cy", cy)
	s.nattr("r", r)
	s.attrs(extra)
	s.raw("/>")
}

// text writes an escaped text element at (x, y).
func (s *svg) text(x, y float64, content string, extra ...string) {
	s.raw("<text")
	s.nattr("x", x)
	s.nattr("y", y)
	s.attrs(extra)
	s.raw(">")
	s.esc(content)
	s.raw("</text>")
}

func (s *svg) attrs(pairs []string) {
	for i := 0; i+1 < len(pairs); i += 2 {
		if pairs[i+1] == "" {
			continue
		}
		s.attr(pairs[i], pairs[i+1])
	}
}

// path is a polyline's "d" attribute under construction. Points closer
// than half a pixel to the previous one are dropped: they cannot be seen and
// only swell the document.
type path struct {
	b          []byte
	open       bool
	lx, ly     float64 // last point written
	px, py     float64 // last point dropped
	hasPending bool
}

func (p *path) moveTo(x, y float64) {
	p.flush()
	p.b = append(p.b, 'M')
	p.b = appendXY(p.b, x, y)
	p.open = true
	p.lx, p.ly = x, y
}

func (p *path) lineTo(x, y float64) {
	if !p.open {
		p.moveTo(x, y)
		return
	}
	if math.Abs(x-p.lx) < 0.5 && math.Abs(y-p.ly) < 0.5 {
		p.px, p.py, p.hasPending = x, y, true
		return
	}
	p.hasPending = false
	p.b = append(p.b, 'L')
	p.b = appendXY(p.b, x, y)
	p.lx, p.ly = x, y
}

// flush writes a dropped last point, so that every run ends where it should.
func (p *path) flush() {
	if p.hasPending && p.open {
		p.b = append(p.b, 'L')
		p.b = appendXY(p.b, p.px, p.py)
	}
	p.hasPending = false
}

// lift ends the current run: the next point starts a new subpath.
func (p *path) lift() {
	p.flush()
	p.open = false
}

func appendXY(b []byte, x, y float64) []byte {
	b = appendNum(b, x)
	b = append(b, ',')
	return appendNum(b, y)
}

// pathEl writes a <path> with d from p (nothing when p is empty).
func (s *svg) pathEl(p *path, extra ...string) {
	p.flush()
	if len(p.b) == 0 {
		return
	}
	s.raw(`<path d="`)
	s.b = append(s.b, p.b...)
	s.raw(`"`)
	s.attrs(extra)
	s.raw("/>")
}

// open starts an <svg> root with a viewBox of w × h and an accessible title
// and description.
func (s *svg) open(w, h float64, class, title, desc string) {
	s.raw(`<svg xmlns="http://www.w3.org/2000/svg"`)
	s.raw(` viewBox="0 0 `)
	s.num(w)
	s.raw(" ")
	s.num(h)
	s.raw(`"`)
	s.nattr("width", w)
	s.nattr("height", h)
	s.attr("class", class)
	s.raw(` role="img" font-family="system-ui, sans-serif" font-size="11">`)
	s.raw("<title>")
	s.esc(title)
	s.raw("</title>")
	if desc != "" {
		s.raw("<desc>")
		s.esc(desc)
		s.raw("</desc>")
	}
}

func (s *svg) close() { s.raw("</svg>") }

// writeTo copies the buffer to w.
func (s *svg) writeTo(w io.Writer) error {
	_, err := io.Copy(w, bytes.NewReader(s.b))
	return err
}

// clamp limits x to [lo, hi].
func clamp(x, lo, hi float64) float64 {
	return math.Max(lo, math.Min(hi, x))
}

// finite reports whether x is a usable number.
func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// truncate shortens s to at most n runes, ending in "…" when cut.
func truncate(s string, n int) string {
	if utf8.RuneCountInString(s) <= n {
		return s
	}
	r := []rune(s)
	return string(r[:n-1]) + "…"
}
