package chart

import (
	"math"
	"strconv"
	"strings"
	"testing"
	"unicode"
)

// flattenPath turns an SVG path's d attribute (the commands M, L, A and Z
// that this package writes, absolute only) into closed polygons. Circular
// arcs are converted from endpoint to centre form (SVG 1.1, appendix F.6.5)
// and sampled every 2°. An arc whose endpoints coincide is dropped, as the
// SVG specification requires (F.6.2), which is what a browser draws.
func flattenPath(tb testing.TB, d string) [][][2]float64 {
	tb.Helper()
	toks := tokenizePath(d)
	var polys [][][2]float64
	var cur [][2]float64
	num := func(i int) float64 {
		if i >= len(toks) {
			tb.Fatalf("path %q ends early", d)
		}
		v, err := strconv.ParseFloat(toks[i], 64)
		if err != nil {
			tb.Fatalf("path %q: %q is not a number", d, toks[i])
		}
		return v
	}
	closeSub := func() {
		if len(cur) > 2 {
			polys = append(polys, cur)
		}
		cur = nil
	}
	var cmd string
	for i := 0; i < len(toks); {
		if t := toks[i]; len(t) == 1 && unicode.IsLetter(rune(t[0])) {
			cmd = t
			i++
		}
		switch cmd {
		case "M":
			closeSub()
			cur = append(cur, [2]float64{num(i), num(i + 1)})
			i += 2
			cmd = "L"
		case "L":
			cur = append(cur, [2]float64{num(i), num(i + 1)})
			i += 2
		case "A":
			rx, ry := num(i), num(i+1)
			large, sweep := num(i+3) != 0, num(i+4) != 0
			x2, y2 := num(i+5), num(i+6)
			i += 7
			if rx != ry {
				tb.Fatalf("path %q: elliptical arc not expected", d)
			}
			p0 := cur[len(cur)-1]
			cur = append(cur, arcPoints(p0[0], p0[1], rx, large, sweep, x2, y2)...)
		case "Z":
			closeSub()
		default:
			tb.Fatalf("path %q: command %q not handled", d, cmd)
		}
	}
	closeSub()
	return polys
}

func tokenizePath(d string) []string {
	var toks []string
	var b strings.Builder
	flush := func() {
		if b.Len() > 0 {
			toks = append(toks, b.String())
			b.Reset()
		}
	}
	for _, r := range d {
		switch {
		case unicode.IsLetter(r):
			flush()
			toks = append(toks, string(r))
		case r == ',' || unicode.IsSpace(r):
			flush()
		case r == '-' && b.Len() > 0:
			flush()
			b.WriteRune(r)
		default:
			b.WriteRune(r)
		}
	}
	flush()
	return toks
}

// arcPoints samples a circular arc of radius r from (x1, y1) to (x2, y2),
// SVG 1.1 F.6.5, excluding the start point.
func arcPoints(x1, y1, r float64, large, sweep bool, x2, y2 float64) [][2]float64 {
	if x1 == x2 && y1 == y2 {
		return nil
	}
	dx, dy := (x1-x2)/2, (y1-y2)/2
	d2 := dx*dx + dy*dy
	if d2 > r*r {
		r = math.Sqrt(d2)
	}
	k := math.Sqrt(math.Max(0, (r*r-d2)/d2))
	if large == sweep {
		k = -k
	}
	cx := k*dy + (x1+x2)/2
	cy := -k*dx + (y1+y2)/2
	t1 := math.Atan2(y1-cy, x1-cx)
	t2 := math.Atan2(y2-cy, x2-cx)
	dt := t2 - t1
	if sweep && dt < 0 {
		dt += 2 * math.Pi
	}
	if !sweep && dt > 0 {
		dt -= 2 * math.Pi
	}
	n := int(math.Ceil(math.Abs(dt) / (2 * math.Pi / 180)))
	out := make([][2]float64, 0, n)
	for j := 1; j <= n; j++ {
		t := t1 + dt*float64(j)/float64(n)
		out = append(out, [2]float64{cx + r*math.Cos(t), cy + r*math.Sin(t)})
	}
	return out
}

// insideEvenOdd reports whether (x, y) is filled under the even-odd rule:
// a ray crosses the polygons' edges an odd number of times.
func insideEvenOdd(polys [][][2]float64, x, y float64) bool {
	in := false
	for _, p := range polys {
		for i, j := 0, len(p)-1; i < len(p); j, i = i, i+1 {
			a, b := p[i], p[j]
			if (a[1] > y) != (b[1] > y) && x < (b[0]-a[0])*(y-a[1])/(b[1]-a[1])+a[0] {
				in = !in
			}
		}
	}
	return in
}

// TestHorizonShadesBlockedSky checks the emitted geometry, not just its
// presence: a point between the horizon and the mask is filled, the zenith
// and a point above the mask are not.
func TestHorizonShadesBlockedSky(t *testing.T) {
	h := Horizon{Title: "mask", Points: []HorizonPoint{{0, 20}, {90, 30}, {180, 20}, {270, 40}}}
	els := parseSVG(t, h.SVG())
	var d string
	for _, e := range els {
		if e.name == "path" && hasClass(e, "mask") {
			d = e.attrs["d"]
			if e.attrs["fill-rule"] != "evenodd" {
				t.Fatalf("mask fill-rule = %q, want evenodd", e.attrs["fill-rule"])
			}
		}
	}
	if d == "" {
		t.Fatal("no mask path")
	}
	polys := flattenPath(t, d)
	c, rad := 140.0, 140.0-24
	tests := []struct {
		name       string
		az, alt    float64
		wantFilled bool
	}{
		{"Zenith", 0, 90, false},
		{"AboveMaskNorth", 0, 45, false},
		{"AboveMaskWest", 270, 60, false},
		{"BelowMaskNorth", 0, 10, true},
		{"BelowMaskEast", 90, 15, true},
		{"BelowMaskWest", 270, 20, true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			x, y := polar(c, rad, tt.az, tt.alt)
			if tt.alt == 90 {
				x, y = c+0.3, c+0.3 // beside the exact centre, off every grid line
			}
			if got := insideEvenOdd(polys, x, y); got != tt.wantFilled {
				t.Errorf("az %g° alt %g° (%.1f, %.1f): filled = %v, want %v", tt.az, tt.alt, x, y, got, tt.wantFilled)
			}
		})
	}
}
