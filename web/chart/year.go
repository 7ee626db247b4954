package chart

import (
	"io"
	"math"
	"strconv"
	"time"
)

// Year is the year chart of a proposal: for each target, the hours per
// night it spends under the airmass limit in dark time, one value a night
// over a calendar year, with the candidate nights shaded and the chosen
// nights marked.
type Year struct {
	Title string
	// First is the local date of the first night (1 January); night k is
	// First + k days.
	First  time.Time
	Series []YearSeries
	// RangeFrom and RangeTo are the indices of the first and last candidate
	// night (shaded, cut at the year's end); RangeTo < RangeFrom means no
	// shading.
	RangeFrom, RangeTo int
	// Chosen are the indices of the chosen nights (ticks at the bottom).
	Chosen []int
	Width  int // pixels; 0 means 720
	Height int // pixels; 0 means 300
}

// YearSeries is one target's hours, one value a night (hours ≥ 0).
type YearSeries struct {
	Label string
	Hours []float64
}

// WriteSVG draws the chart to w.
func (y Year) WriteSVG(w io.Writer) error {
	var s svg
	y.draw(&s)
	return s.writeTo(w)
}

// SVG returns the chart as a string.
func (y Year) SVG() string {
	var s svg
	y.draw(&s)
	return string(s.b)
}

func (y Year) draw(s *svg) {
	w, h := float64(y.Width), float64(y.Height)
	if y.Width < 200 {
		w = 720
	}
	if y.Height < 150 {
		h = 300
	}
	s.open(w, h, "chart year", y.Title, "Hours per night in dark time under the airmass limit, night by night over the year, one line per target; the candidate nights are shaded and the chosen nights ticked.")
	nights, top := 0, 0.0
	for _, se := range y.Series {
		nights = max(nights, len(se.Hours))
		for _, v := range se.Hours {
			if finite(v) {
				top = math.Max(top, v)
			}
		}
	}
	if nights == 0 {
		s.text(w/2, h/2, "No targets.", "text-anchor", "middle")
		s.close()
		return
	}
	legendH := 14 * float64((len(y.Series)+3)/4)
	yt, ylo, yhi := niceTicks(0, math.Max(top, 1), 5)
	x := linear{0, float64(nights), 46, w - 12}
	ya := linear{ylo, yhi, h - 40 - legendH, 12}
	ys := tickStep(yt)
	// Month ticks: the first night of each month.
	var xt []float64
	var labels = map[float64]string{}
	for m := 0; m < 12; m++ {
		d := time.Date(y.First.Year(), y.First.Month()+time.Month(m), 1, 12, 0, 0, 0, time.UTC)
		k := math.Round(d.Sub(time.Date(y.First.Year(), y.First.Month(), y.First.Day(), 12, 0, 0, 0, time.UTC)).Hours() / 24)
		if k >= 0 && int(k) < nights {
			xt = append(xt, k)
			labels[k] = d.Month().String()[:3]
		}
	}
	if hi := min(y.RangeTo, nights-1); hi >= y.RangeFrom && y.RangeFrom >= 0 && y.RangeFrom < nights {
		s.rect(x.at(float64(y.RangeFrom)), ya.p1, x.at(float64(hi+1))-x.at(float64(y.RangeFrom)), ya.p0-ya.p1,
			"fill", "#ddf4ff", "class", "range")
	}
	s.frame(x, ya, xt, yt, "night of "+strconv.Itoa(y.First.Year())+" (local date of the evening)", "hours",
		func(v float64) string { return labels[v] }, func(v float64) string { return fmtTick(v, ys) })
	for _, k := range y.Chosen {
		if k >= 0 && k < nights {
			px := x.at(float64(k) + 0.5)
			s.line(px, ya.p0-8, px, ya.p0, "stroke", "#1b1f24", "stroke-width", "1.5", "class", "chosen")
		}
	}
	for i, se := range y.Series {
		colour, dash, cls := seriesStyle(i)
		var p path
		for k, v := range se.Hours {
			if !finite(v) {
				p.lift()
				continue
			}
			p.lineTo(x.at(float64(k)+0.5), ya.at(clamp(v, ylo, yhi)))
		}
		extra := []string{"class", "series s" + strconv.Itoa(cls), "fill", "none", "stroke", colour, "stroke-width", "1.5"}
		if dash != "" {
			extra = append(extra, "stroke-dasharray", dash)
		}
		s.pathEl(&p, extra...)
		lx := x.p0 + float64(i%4)*(x.p1-x.p0)/4
		ly := h - legendH + 4 + 14*float64(i/4)
		key := []string{"stroke", colour, "stroke-width", "2"}
		if dash != "" {
			key = append(key, "stroke-dasharray", dash)
		}
		s.line(lx, ly-4, lx+22, ly-4, key...)
		s.text(lx+26, ly, truncate(se.Label, 24), "class", "legend")
	}
	s.close()
}
