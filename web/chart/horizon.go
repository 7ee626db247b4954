package chart

import (
	"io"
	"math"
	"sort"
	"strconv"
)

// Horizon is a polar preview of a site's horizon mask, seen from above like
// a map: north at the top, east to the right, the zenith at the centre and
// the horizon (altitude 0°) on the outer circle. The blocked sky between the
// horizon and the mask is shaded.
type Horizon struct {
	Title  string
	Points []HorizonPoint
	// MinAltDeg draws the site's altitude floor as a dashed circle (0: none).
	MinAltDeg float64
	Size      int // pixels; 0 means 280
}

// HorizonPoint is the lowest usable altitude (degrees) at an azimuth
// (degrees from north through east).
type HorizonPoint struct {
	AzDeg, AltDeg float64
}

// WriteSVG draws the preview to w.
func (h Horizon) WriteSVG(w io.Writer) error {
	var s svg
	h.draw(&s)
	return s.writeTo(w)
}

// SVG returns the preview as a string.
func (h Horizon) SVG() string {
	var s svg
	h.draw(&s)
	return string(s.b)
}

// polar maps (azimuth, altitude) to pixels: radius grows from the zenith
// (centre) to the horizon (rad).
func polar(c, rad, azDeg, altDeg float64) (x, y float64) {
	r := rad * (90 - clamp(altDeg, 0, 90)) / 90
	a := azDeg * math.Pi / 180
	return c + r*math.Sin(a), c - r*math.Cos(a)
}

// maskAt interpolates the mask linearly in azimuth between the points
// (sorted by azimuth), wrapping through north.
func maskAt(pts []HorizonPoint, az float64) float64 {
	n := len(pts)
	if n == 0 {
		return 0
	}
	if n == 1 {
		return pts[0].AltDeg
	}
	i := sort.Search(n, func(i int) bool { return pts[i].AzDeg >= az })
	var a, b HorizonPoint
	switch {
	case i < n && pts[i].AzDeg == az:
		return pts[i].AltDeg
	case i == 0 || i == n:
		a, b = pts[n-1], pts[0]
		b.AzDeg += 360
		if az < a.AzDeg {
			az += 360
		}
	default:
		a, b = pts[i-1], pts[i]
	}
	if b.AzDeg == a.AzDeg {
		return a.AltDeg
	}
	return a.AltDeg + (b.AltDeg-a.AltDeg)*(az-a.AzDeg)/(b.AzDeg-a.AzDeg)
}

func (h Horizon) draw(s *svg) {
	size := float64(h.Size)
	if h.Size < 120 {
		size = 280
	}
	c := size / 2
	rad := size/2 - 24
	s.open(size, size, "chart horizon", h.Title, "Horizon mask seen from above: north at the top, east to the right, "+
		"zenith at the centre, horizon on the outer circle; the shaded area is blocked.")
	for _, alt := range []float64{0, 30, 60} {
		s.circle(c, c, rad*(90-alt)/90, "fill", "none", "stroke", "#d0d7de", "class", "grid")
		if alt > 0 {
			s.text(c+3, c-rad*(90-alt)/90+11, strconv.Itoa(int(alt))+"°", "font-size", "9", "class", "tick")
		}
	}
	for az := 0.0; az < 360; az += 45 {
		x, y := polar(c, rad, az, 0)
		s.line(c, c, x, y, "stroke", "#d0d7de", "stroke-width", "0.6", "class", "grid")
	}
	for _, d := range []struct {
		az    float64
		label string
	}{{0, "N"}, {90, "E"}, {180, "S"}, {270, "W"}} {
		x, y := polar(c, rad+12, d.az, 0)
		s.text(x, y+4, d.label, "text-anchor", "middle", "font-weight", "600")
	}
	pts := make([]HorizonPoint, 0, len(h.Points))
	for _, p := range h.Points {
		if finite(p.AzDeg) && finite(p.AltDeg) {
			pts = append(pts, HorizonPoint{wrapDeg(p.AzDeg), clamp(p.AltDeg, 0, 90)})
		}
	}
	sort.Slice(pts, func(i, j int) bool { return pts[i].AzDeg < pts[j].AzDeg })
	if len(pts) > 0 {
		// The blocked region: the mask line, then back along the horizon.
		var p path
		for az := 0.0; az <= 360; az += 2 {
			x, y := polar(c, rad, az, maskAt(pts, math.Mod(az, 360)))
			p.lineTo(x, y)
		}
		p.b = append(p.b, 'Z')
		s.raw(`<path fill-rule="evenodd" d="`)
		s.b = append(s.b, p.b...)
		s.raw("M")
		s.b = appendXY(s.b, c, c-rad)
		// The horizon circle as two half circles: a single arc back to its
		// own start point has identical endpoints, which SVG drops (SVG 1.1,
		// F.6.2), leaving only the mask polygon filled.
		for _, endY := range []float64{c + rad, c - rad} {
			s.raw("A")
			s.b = appendXY(s.b, rad, rad)
			s.raw(" 0 0 1 ")
			s.b = appendXY(s.b, c, endY)
		}
		s.raw(`Z" fill="#59636e" fill-opacity="0.35" stroke="#1b1f24" stroke-width="1.2" class="mask"/>`)
		for _, q := range pts {
			x, y := polar(c, rad, q.AzDeg, q.AltDeg)
			s.circle(x, y, 2.5, "fill", "#D55E00", "class", "f1 vertex")
		}
	}
	if finite(h.MinAltDeg) && h.MinAltDeg > 0 && h.MinAltDeg < 90 {
		s.circle(c, c, rad*(90-h.MinAltDeg)/90, "fill", "none", "stroke", "#D55E00", "stroke-dasharray", "5 4", "class", "limit")
	}
	s.close()
}

func wrapDeg(a float64) float64 {
	a = math.Mod(a, 360)
	if a < 0 {
		a += 360
	}
	return a
}
