package chart

import (
	"math"
	"strconv"
)

// linear is a linear axis from data range [lo, hi] to pixels [p0, p1].
type linear struct {
	lo, hi, p0, p1 float64
}

func (a linear) at(v float64) float64 {
	if a.hi == a.lo {
		return (a.p0 + a.p1) / 2
	}
	return a.p0 + (v-a.lo)/(a.hi-a.lo)*(a.p1-a.p0)
}

// niceTicks returns about n round tick values covering [lo, hi] ("nice
// numbers": steps of 1, 2 or 5 times a power of ten; common practice) and
// the range widened to whole steps.
func niceTicks(lo, hi float64, n int) (ticks []float64, nlo, nhi float64) {
	if !finite(lo) || !finite(hi) {
		return []float64{0, 1}, 0, 1
	}
	if hi < lo {
		lo, hi = hi, lo
	}
	if hi == lo {
		d := math.Max(math.Abs(lo)*0.1, 1)
		lo, hi = lo-d, hi+d
	}
	raw := (hi - lo) / float64(max(n, 2))
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	step := mag
	for _, m := range []float64{1, 2, 5, 10} {
		if m*mag >= raw {
			step = m * mag
			break
		}
	}
	nlo = math.Floor(lo/step) * step
	nhi = math.Ceil(hi/step) * step
	for v := nlo; v <= nhi+step/2 && len(ticks) < 50; v += step {
		ticks = append(ticks, math.Round(v/step)*step)
	}
	return ticks, nlo, nhi
}

// fmtTick formats a tick value with as few decimals as its step needs.
func fmtTick(v, step float64) string {
	dec := 0
	if step > 0 && step < 1 {
		dec = int(math.Ceil(-math.Log10(step)))
	}
	if v == 0 {
		v = 0 // no "-0"
	}
	return strconv.FormatFloat(v, 'f', dec, 64)
}

// frame draws a plot frame with its y ticks, x ticks and axis titles.
func (s *svg) frame(x linear, y linear, xt, yt []float64, xTitle, yTitle string, xfmt, yfmt func(float64) string) {
	s.raw(`<g class="axis">`)
	for _, v := range yt {
		py := y.at(v)
		s.line(x.p0, py, x.p1, py, "stroke", "#d0d7de", "stroke-width", "0.6", "class", "grid")
		s.text(x.p0-5, py+4, yfmt(v), "text-anchor", "end")
	}
	for _, v := range xt {
		px := x.at(v)
		s.line(px, y.p0, px, y.p0+4, "stroke", "#59636e")
		s.text(px, y.p0+16, xfmt(v), "text-anchor", "middle")
	}
	s.rect(x.p0, y.p1, x.p1-x.p0, y.p0-y.p1, "fill", "none", "stroke", "#59636e", "class", "frame")
	s.text((x.p0+x.p1)/2, y.p0+32, xTitle, "text-anchor", "middle")
	my := (y.p0 + y.p1) / 2
	s.text(14, my, yTitle, "text-anchor", "middle", "transform", "rotate(-90 14 "+fmtf(my)+")")
	s.raw("</g>")
}

func tickStep(t []float64) float64 {
	if len(t) < 2 {
		return 1
	}
	return t[1] - t[0]
}
