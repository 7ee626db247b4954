package chart

import (
	"io"
	"strconv"
)

// Precision shows, for each target, the predicted relative error of what
// its exposures measure (σK/K, in per cent) against the nights of a run:
// before the run's remaining nights ("now", index 0) and after each night
// in turn, with the wanted precision as a dashed line. The axis ends at
// 100 % at most; larger values are drawn on its top edge.
type Precision struct {
	Title  string
	Nights []string // the run's nights, labels of the x positions 1..len
	Series []PrecisionSeries
	Width  int // 0 means 640
	Height int // 0 means 260
}

// PrecisionSeries is one target's predicted relative error, per cent, at
// x = 0 (now) and after each night; OK[i] false where it is not determined
// yet (drawn as a gap). Want, when > 0, is the wanted value in per cent.
type PrecisionSeries struct {
	Label  string
	Values []float64
	OK     []bool
	Want   float64
}

// WriteSVG draws the chart to w.
func (c Precision) WriteSVG(w io.Writer) error {
	var s svg
	c.draw(&s)
	return s.writeTo(w)
}

// SVG returns the chart as a string.
func (c Precision) SVG() string {
	var s svg
	c.draw(&s)
	return string(s.b)
}

func (c Precision) draw(s *svg) {
	w, h := float64(c.Width), float64(c.Height)
	if c.Width < 200 {
		w = 640
	}
	if c.Height < 150 {
		h = 260
	}
	s.open(w, h, "chart precision", c.Title, "Predicted relative error of each target's measurement, per cent, "+
		"now and after each night of the run, with the wanted precision as a dashed line.")
	n := len(c.Nights)
	ymax := 0.0
	any := false
	for _, sr := range c.Series {
		for i, v := range sr.Values {
			if i < len(sr.OK) && sr.OK[i] && finite(v) && v >= 0 {
				ymax, any = max(ymax, v), true
			}
		}
		if finite(sr.Want) && sr.Want > 0 {
			ymax = max(ymax, sr.Want)
		}
	}
	if n == 0 || !any {
		s.text(w/2, h/2, "Nothing measurable yet to draw.", "text-anchor", "middle")
		s.close()
		return
	}
	// A relative error above 100 % means "not measured yet": the axis stops
	// there and such points sit on its top edge.
	yt, ylo, yhi := niceTicks(0, min(ymax*1.05, 100), 5)
	ys := tickStep(yt)
	right := 130.0
	x := linear{0, float64(n), 70, w - right}
	y := linear{ylo, yhi, h - 46, 14}
	var xt []float64
	step := max(1, n/10)
	for k := 0; k <= n; k += step {
		xt = append(xt, float64(k))
	}
	s.frame(x, y, xt, yt, "nights of the run (0 = now)", "predicted error (%)",
		func(v float64) string {
			k := int(v)
			if k == 0 {
				return "now"
			}
			return strconv.Itoa(k)
		},
		func(v float64) string { return fmtTick(v, ys) })
	for i, sr := range c.Series {
		colour, dash, cls := seriesStyle(i)
		class := "series s" + strconv.Itoa(cls)
		var p path
		lastX, lastY, have := 0.0, 0.0, false
		for k, v := range sr.Values {
			if k > n {
				break
			}
			if k >= len(sr.OK) || !sr.OK[k] || !finite(v) || v < 0 {
				p.lift()
				continue
			}
			px, py := x.at(float64(k)), y.at(clamp(v, ylo, yhi))
			p.lineTo(px, py)
			s.circle(px, py, 2.5, "fill", colour, "class", class)
			lastX, lastY, have = px, py, true
		}
		s.pathEl(&p, "class", class, "fill", "none", "stroke", colour, "stroke-width", "2", "stroke-dasharray", dash)
		if have {
			s.text(lastX+6, lastY+4, truncate(sr.Label, 20), "fill", colour, "class", class)
		}
		if finite(sr.Want) && sr.Want > 0 && sr.Want <= yhi {
			py := y.at(sr.Want)
			s.line(x.p0, py, x.p1, py, "class", "limit "+class, "stroke", colour, "stroke-dasharray", "6 4", "stroke-width", "1")
			s.text(x.p1+6, py-3, truncate(sr.Label, 14)+" wanted "+strconv.FormatFloat(sr.Want, 'g', 3, 64)+" %", "font-size", "10", "fill", colour)
		}
	}
	s.close()
}
