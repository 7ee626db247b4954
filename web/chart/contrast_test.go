package chart

import (
	"math"
	"strconv"
	"strings"
	"testing"
	"time"
)

// relLuminance is the relative luminance of an sRGB colour "#rrggbb", WCAG
// 2.1 §1.4.3 (definition "relative luminance").
func relLuminance(tb testing.TB, hex string) float64 {
	tb.Helper()
	if len(hex) != 7 || hex[0] != '#' {
		tb.Fatalf("colour %q is not #rrggbb", hex)
	}
	var c [3]float64
	for i := range 3 {
		v, err := strconv.ParseUint(hex[1+2*i:3+2*i], 16, 8)
		if err != nil {
			tb.Fatalf("colour %q: %v", hex, err)
		}
		s := float64(v) / 255
		if s <= 0.03928 {
			c[i] = s / 12.92
		} else {
			c[i] = math.Pow((s+0.055)/1.055, 2.4)
		}
	}
	return 0.2126*c[0] + 0.7152*c[1] + 0.0722*c[2]
}

// contrast is the WCAG 2.1 contrast ratio (L1 + 0.05) / (L2 + 0.05).
func contrast(tb testing.TB, a, b string) float64 {
	tb.Helper()
	la, lb := relLuminance(tb, a), relLuminance(tb, b)
	return (math.Max(la, lb) + 0.05) / (math.Min(la, lb) + 0.05)
}

func TestContrastFormula(t *testing.T) {
	// WCAG 2.1: black on white is 21:1, a colour on itself 1:1.
	if got := contrast(t, "#000000", "#ffffff"); math.Abs(got-21) > 1e-9 {
		t.Errorf("black on white = %g, want 21", got)
	}
	if got := contrast(t, "#777777", "#777777"); got != 1 {
		t.Errorf("grey on grey = %g, want 1", got)
	}
}

// TestChartTextContrast reads every <text> of a night chart with the fill
// the code gave it and the opaque rectangle painted last under its middle,
// and requires WCAG 2.1's 4.5:1 for text (success criterion 1.4.3).
func TestChartTextContrast(t *testing.T) {
	night := sampleNight(6, 2*time.Minute)
	night.Blocks[1].State = "done"
	night.Blocks[2].State = "lost"
	night.Unallocated = []Span{{Start: night.Start, End: night.Start.Add(3 * time.Hour), Label: "not allocated"}}
	t.Run("Lanes", func(t *testing.T) {
		if n := checkTextContrast(t, night.SVG()); n < 40 {
			t.Errorf("only %d texts checked", n)
		}
	})
	t.Run("AltitudePanels", func(t *testing.T) {
		n := 0
		for _, p := range night.Panels() {
			n += checkTextContrast(t, p.SVG())
		}
		if n < 6*4 {
			t.Errorf("only %d texts checked", n)
		}
	})
}

// checkTextContrast checks every text of doc against the ground under it
// and returns how many it checked.
func checkTextContrast(t *testing.T, doc string) int {
	t.Helper()
	els := parseSVG(t, doc)
	type rect struct {
		x0, y0, x1, y1 float64
		fill           string
	}
	num := func(e element, k string) float64 {
		v, _ := strconv.ParseFloat(e.attrs[k], 64)
		return v
	}
	var under []rect
	checked := 0
	for _, e := range els {
		switch e.name {
		case "rect":
			f := e.attrs["fill"]
			if !strings.HasPrefix(f, "#") || e.attrs["fill-opacity"] != "" {
				continue
			}
			x, y := num(e, "x"), num(e, "y")
			under = append(under, rect{x, y, x + num(e, "width"), y + num(e, "height"), f})
		case "text":
			fill := e.attrs["fill"]
			if fill == "" {
				t.Errorf("text %q has no fill of its own", e.text)
				continue
			}
			fs := 11.0
			if v := num(e, "font-size"); v > 0 {
				fs = v
			}
			x, y := num(e, "x"), num(e, "y")-fs*0.35
			bg := ""
			for i := len(under) - 1; i >= 0; i-- {
				r := under[i]
				if x >= r.x0 && x <= r.x1 && y >= r.y0 && y <= r.y1 {
					bg = r.fill
					break
				}
			}
			if bg == "" {
				t.Errorf("text %q at (%.0f, %.0f) has no ground under it", e.text, x, y)
				continue
			}
			checked++
			if c := contrast(t, fill, bg); c < 4.5 {
				t.Errorf("text %q: %s on %s has contrast %.2f, want ≥ 4.5", e.text, fill, bg, c)
			}
		}
	}
	t.Logf("%d text/ground pairs checked", checked)
	return checked
}
