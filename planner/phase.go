package planner

import (
	"math"
	"sort"
	"time"

	"phasecast/ephem"
)

// phaseClock maps UTC (Unix seconds) to BJD_TDB and back for one target at
// one site over one night, piecewise linearly between anchors at every whole
// hour of UTC (and the span's two ends), each anchor computed by
// ephem.BJDTDB.
//
// BJD_TDB − UTC changes smoothly within a night: the annual Rømer term by at
// most 0.4 s per hour, the diurnal term (the observatory's light time,
// ≤ 21.3 ms) with the Earth's rotation. A chord over one hour departs from
// the diurnal sinusoid by at most (ωh)²/8 × 21.3 ms = 0.18 ms (ω the Earth's
// rotation rate, h = 1 h), and from the annual term by microseconds, so the
// clock is good to about 0.2 ms (TestPhaseClock checks < 1 ms against the
// full BJDTDB). A leap second (always at a UTC midnight, which is an anchor)
// is a step: the piece before it ends on the value just before the step.
type phaseClock struct {
	e      ephem.Ephemeris
	pieces []clockPiece
}

// clockPiece is BJD_TDB = b0 + (u − u0)·scale seconds on [u0, u1].
type clockPiece struct {
	u0, u1 float64
	b0     ephem.JD2
	scale  float64
}

func newPhaseClock(site ephem.Site, st ephem.Star, e ephem.Ephemeris, from, to float64) phaseClock {
	anchors := []float64{from}
	for h := math.Floor(from/3600)*3600 + 3600; h < to; h += 3600 {
		if h-from > 1 && to-h > 1 {
			anchors = append(anchors, h)
		}
	}
	anchors = append(anchors, to)
	c := phaseClock{e: e, pieces: make([]clockPiece, 0, len(anchors)-1)}
	b := ephem.BJDTDB(site, st, timeOf(anchors[0]))
	for k := 0; k+1 < len(anchors); k++ {
		u0, u1 := anchors[k], anchors[k+1]
		t1 := timeOf(u1)
		next := ephem.BJDTDB(site, st, t1)
		end := next
		// 1 ms before the anchor: a float64 MJD cannot tell 1 ns from 0.
		before := t1.Add(-time.Millisecond)
		if ephem.TTMinusUTC(before) != ephem.TTMinusUTC(t1) {
			end = ephem.BJDTDB(site, st, before).AddSeconds(1e-3)
		}
		c.pieces = append(c.pieces, clockPiece{u0: u0, u1: u1, b0: b, scale: end.SubDays(b) * 86400 / (u1 - u0)})
		b = next
	}
	return c
}

// bjd returns BJD_TDB at Unix seconds u (extrapolated beyond the span). An
// anchor belongs to the piece that starts there.
func (c *phaseClock) bjd(u float64) ephem.JD2 {
	k := sort.Search(len(c.pieces), func(i int) bool { return c.pieces[i].u1 > u })
	if k == len(c.pieces) {
		k--
	}
	p := &c.pieces[k]
	return p.b0.AddSeconds((u - p.u0) * p.scale)
}

// utc returns the Unix seconds at which BJD_TDB is b (the inverse of bjd).
func (c *phaseClock) utc(b ephem.JD2) float64 {
	k := sort.Search(len(c.pieces), func(i int) bool { return c.pieces[i].b0.SubDays(b) > 0 }) - 1
	if k < 0 {
		k = 0
	}
	p := &c.pieces[k]
	return p.u0 + b.SubDays(p.b0)*86400/p.scale
}

// phase returns the cycle and phase (0 ≤ φ < 1) at Unix seconds u.
func (c *phaseClock) phase(u float64) (int64, float64) { return c.e.CyclePhase(c.bjd(u)) }

// occurrence is one orbital cycle's goal window on the time axis: the
// instants (Unix seconds, UTC) at which the phase is centre − half-width and
// centre + half-width, around the centre of cycle `cycle`.
type occurrence struct {
	cycle  int64
	lo, hi float64
	mid    float64
}

// occurrences returns the goal windows of g that overlap [from, to], in time
// order, at most maxOcc of them.
func (c *phaseClock) occurrences(center, halfWidth, from, to float64, maxOcc int) []occurrence {
	first, _ := c.phase(from)
	var out []occurrence
	for k := first - 1; len(out) < maxOcc; k++ {
		lo := c.utc(c.e.TimeAt(k, center-halfWidth))
		if lo > to {
			break
		}
		hi := c.utc(c.e.TimeAt(k, center+halfWidth))
		if hi < from {
			continue
		}
		out = append(out, occurrence{cycle: k, lo: lo, hi: hi, mid: c.utc(c.e.TimeAt(k, center))})
	}
	return out
}

// inWindow reports whether phase φ lies within center ± halfWidth, wrapping
// through 0, with a tolerance of tol in phase.
func inWindow(phi, center, halfWidth, tol float64) bool {
	d := phi - center
	d -= math.Floor(d + 0.5)
	return math.Abs(d) <= halfWidth+tol
}
