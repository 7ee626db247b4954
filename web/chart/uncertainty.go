package chart

import (
	"io"
	"strconv"
	"time"
)

// Uncertainty shows how the 1σ uncertainty of a target's predicted orbital
// phase grows with time away from the ephemeris epoch, against the goal
// windows' half-widths.
type Uncertainty struct {
	Title  string
	Points []UncertaintyPoint // in time order
	// Limits are horizontal reference lines in phase units, e.g. the
	// half-width of each goal window.
	Limits []Limit
	// PeriodDays, when > 0, adds a right axis in minutes (σ·P).
	PeriodDays float64
	Now        time.Time // drawn as a marker when within the range
	Width      int       // 0 means 640
	Height     int       // 0 means 260
}

// UncertaintyPoint is the 1σ phase uncertainty (in orbital cycles) at T.
type UncertaintyPoint struct {
	T          time.Time
	SigmaPhase float64
}

// Limit is a labelled horizontal line.
type Limit struct {
	Value float64
	Label string
}

// WriteSVG draws the chart to w.
func (u Uncertainty) WriteSVG(w io.Writer) error {
	var s svg
	u.draw(&s)
	return s.writeTo(w)
}

// SVG returns the chart as a string.
func (u Uncertainty) SVG() string {
	var s svg
	u.draw(&s)
	return string(s.b)
}

func (u Uncertainty) draw(s *svg) {
	w, h := float64(u.Width), float64(u.Height)
	if u.Width < 200 {
		w = 640
	}
	if u.Height < 150 {
		h = 260
	}
	s.open(w, h, "chart uncertainty", u.Title, "One-sigma uncertainty of the predicted orbital phase against date, "+
		"with the half-widths of the goal windows for comparison.")
	var pts []UncertaintyPoint
	for _, p := range u.Points {
		if finite(p.SigmaPhase) && p.SigmaPhase >= 0 {
			pts = append(pts, p)
		}
	}
	if len(pts) < 2 || !pts[len(pts)-1].T.After(pts[0].T) {
		s.text(w/2, h/2, "Not enough data to draw.", "text-anchor", "middle")
		s.close()
		return
	}
	t0, t1 := pts[0].T, pts[len(pts)-1].T
	ymax := 0.0
	for _, p := range pts {
		ymax = max(ymax, p.SigmaPhase)
	}
	for _, l := range u.Limits {
		if finite(l.Value) {
			ymax = max(ymax, l.Value)
		}
	}
	yt, ylo, yhi := niceTicks(0, ymax*1.05, 5)
	right := 16.0
	if u.PeriodDays > 0 {
		right = 60
	}
	days := t1.Sub(t0).Hours() / 24
	x := linear{0, days, 70, w - right}
	y := linear{ylo, yhi, h - 46, 14}
	ys := tickStep(yt)
	xt, _, _ := niceTicks(0, days, 5)
	var xticks []float64
	for _, v := range xt {
		if v >= 0 && v <= days {
			xticks = append(xticks, v)
		}
	}
	s.frame(x, y, xticks, yt, "date (UTC)", "σ phase (cycles)",
		func(v float64) string {
			return t0.Add(time.Duration(v * 24 * float64(time.Hour))).UTC().Format("2006-01-02")
		},
		func(v float64) string { return fmtTick(v, ys) })
	if u.PeriodDays > 0 {
		for _, v := range yt {
			s.text(x.p1+5, y.at(v)+4, strconv.FormatFloat(v*u.PeriodDays*1440, 'g', 3, 64))
		}
		my := (y.p0 + y.p1) / 2
		s.text(w-8, my, "σ time (min)", "text-anchor", "middle", "transform", "rotate(90 "+fmtf(w-8)+" "+fmtf(my)+")")
	}
	for i, l := range u.Limits {
		if !finite(l.Value) || l.Value < ylo || l.Value > yhi {
			continue
		}
		colour, _, cls := seriesStyle(i + 1)
		py := y.at(l.Value)
		s.line(x.p0, py, x.p1, py, "class", "limit s"+strconv.Itoa(cls), "stroke", colour, "stroke-dasharray", "6 4")
		s.text(x.p0+4, py-3, l.Label, "font-size", "10", "fill", colour)
	}
	var p path
	for _, q := range pts {
		p.lineTo(x.at(q.T.Sub(t0).Hours()/24), y.at(q.SigmaPhase))
	}
	s.pathEl(&p, "class", "sigma s0", "fill", "none", "stroke", "#0072B2", "stroke-width", "2")
	if !u.Now.IsZero() && !u.Now.Before(t0) && !u.Now.After(t1) {
		px := x.at(u.Now.Sub(t0).Hours() / 24)
		s.line(px, y.p0, px, y.p1, "class", "now", "stroke", "#CC79A7", "stroke-width", "1.5")
		s.text(px+3, y.p1+12, "today", "font-size", "10")
	}
	s.close()
}
