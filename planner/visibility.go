package planner

import (
	"math"
	"math/bits"
	"strings"

	"phasecast/ephem"
)

// Reason names an observing constraint that excluded some time.
type Reason string

// Reasons a time is not observable, one per constraint.
const (
	ReasonDaylight     Reason = "sun"           // the Sun's centre above the twilight altitude
	ReasonBelowHorizon Reason = "below_horizon" // target below the (refracted) horizon
	ReasonAirmass      Reason = "airmass"       // airmass above the maximum
	ReasonMinAlt       Reason = "min_alt"       // below the minimum altitude
	ReasonHorizonMask  Reason = "horizon_mask"  // behind the horizon mask
	ReasonZenith       Reason = "zenith"        // inside the zenith exclusion
	ReasonHourAngle    Reason = "hour_angle"    // outside the hour-angle limits
	ReasonMoonSep      Reason = "moon_sep"      // closer to the Moon than allowed, the Moon up
	ReasonMoonIllum    Reason = "moon_illum"    // the Moon up and brighter than allowed
	ReasonSunAvoid     Reason = "sun_avoid"     // closer to the Sun than the avoidance angle
)

// reasonBits is a set of Reasons.
type reasonBits uint16

const (
	bitDaylight reasonBits = 1 << iota
	bitBelowHorizon
	bitAirmass
	bitMinAlt
	bitHorizonMask
	bitZenith
	bitHourAngle
	bitMoonSep
	bitMoonIllum
	bitSunAvoid
)

var reasonOrder = []Reason{ReasonDaylight, ReasonBelowHorizon, ReasonAirmass, ReasonMinAlt, ReasonHorizonMask,
	ReasonZenith, ReasonHourAngle, ReasonMoonSep, ReasonMoonIllum, ReasonSunAvoid}

// reasons lists the set in a fixed order.
func (b reasonBits) reasons() []Reason {
	out := make([]Reason, 0, bits.OnesCount16(uint16(b)))
	for i, r := range reasonOrder {
		if b&(1<<i) != 0 {
			out = append(out, r)
		}
	}
	return out
}

// Describe returns a short phrase for the reason that reads after "the
// target is", for night sheets.
func (r Reason) Describe(c Constraints) string {
	switch r {
	case ReasonDaylight:
		return "in daylight or twilight (Sun above " + fmtNum(c.SunAltMaxDeg) + "°, " + string(c.Twilight) + ")"
	case ReasonBelowHorizon:
		return "below the horizon"
	case ReasonAirmass:
		return "too low for the airmass limit (airmass over " + fmtNum(c.MaxAirmass) + ")"
	case ReasonMinAlt:
		return "below " + fmtNum(c.MinAltDeg) + "° altitude"
	case ReasonHorizonMask:
		return "behind the horizon mask"
	case ReasonZenith:
		return "within " + fmtNum(c.ZenithExclDeg) + "° of the zenith"
	case ReasonHourAngle:
		return "outside hour angles " + fmtNum(c.HAMinHours) + ".." + fmtNum(c.HAMaxHours) + " h"
	case ReasonMoonSep:
		return "within " + fmtNum(c.MinMoonSepDeg) + "° of the Moon"
	case ReasonMoonIllum:
		return "under a Moon more than " + fmtNum(c.MaxMoonIllum*100) + "% illuminated"
	case ReasonSunAvoid:
		return "within " + fmtNum(c.SunAvoidDeg) + "° of the Sun"
	}
	return string(r)
}

func describeReasons(rs []Reason, c Constraints) string {
	parts := make([]string, len(rs))
	for i, r := range rs {
		parts[i] = r.Describe(c)
	}
	return strings.Join(parts, "; ")
}

// Gap is a span of the night in which a target cannot be observed, with every
// constraint that excluded some of it.
type Gap struct {
	Interval
	Reasons []Reason
}

// Visibility is when one target can be observed in one night: the observable
// intervals (every constraint met; edges to about a millisecond of the fast
// path, within a second of the full computation) and the gaps between them,
// covering the whole planning window, each with its reasons.
type Visibility struct {
	Target    string
	Intervals []Interval
	Gaps      []Gap
}

// badSpan is an excluded span with its reasons.
type badSpan struct {
	span
	why reasonBits
}

// scan finds where the margin function m(u) ≥ 0 (its reason set empty) on
// [a, b]: sampled at a, every multiple of step inside and b; each change of
// state between two samples is refined by bisection to 1 ms (keeping the
// edge on the observable side); and at every interior local minimum of the
// margin between observable samples, the minimum is found by golden-section
// search, so that a dip shorter than a step is not missed. It returns the
// observable spans and the excluded ones with their reasons.
func scan(a, b, step float64, f func(u float64) (float64, reasonBits)) (ok []span, bad []badSpan) {
	if b < a {
		return nil, nil
	}
	us := samplePoints(a, b, step)
	ms := make([]float64, len(us))
	ws := make([]reasonBits, len(us))
	for i, u := range us {
		ms[i], ws[i] = f(u)
	}
	// Dips between observable samples.
	type dip struct {
		at  int // index of the middle sample
		lo  float64
		hi  float64
		why reasonBits
	}
	var dips []dip
	for i := 1; i+1 < len(us); i++ {
		if ws[i-1] != 0 || ws[i] != 0 || ws[i+1] != 0 || ms[i] > ms[i-1] || ms[i] > ms[i+1] {
			continue
		}
		um := goldenMin(func(u float64) float64 { m, _ := f(u); return m }, us[i-1], us[i+1])
		mm, why := f(um)
		if mm >= 0 || why == 0 {
			continue
		}
		lo := bisectEdge(f, us[i-1], um)
		hi := bisectEdge(f, us[i+1], um)
		dips = append(dips, dip{i, lo, hi, why})
	}
	start := math.NaN()
	if ws[0] == 0 {
		start = us[0]
	}
	badStart := math.NaN()
	var badWhy reasonBits
	if ws[0] != 0 {
		badStart, badWhy = us[0], ws[0]
	}
	for i := 1; i < len(us); i++ {
		prevOK, curOK := ws[i-1] == 0, ws[i] == 0
		badWhy |= ws[i]
		switch {
		case prevOK && !curOK:
			e := bisectEdge(f, us[i-1], us[i])
			ok = append(ok, span{start, e})
			badStart, badWhy = e, ws[i]
		case !prevOK && curOK:
			e := bisectEdge(f, us[i], us[i-1])
			bad = append(bad, badSpan{span{badStart, e}, badWhy | midWhy(f, us[i-1], us[i])})
			start = e
		}
	}
	if ws[len(ws)-1] == 0 {
		ok = append(ok, span{start, us[len(us)-1]})
	} else {
		bad = append(bad, badSpan{span{badStart, us[len(us)-1]}, badWhy})
	}
	// Cut the dips out of the observable spans.
	for _, d := range dips {
		for k := range ok {
			if ok[k].lo <= d.lo && d.hi <= ok[k].hi {
				left, right := span{ok[k].lo, d.lo}, span{d.hi, ok[k].hi}
				ok = append(ok[:k], append([]span{left, right}, ok[k+1:]...)...)
				bad = append(bad, badSpan{span{d.lo, d.hi}, d.why})
				break
			}
		}
	}
	sortBad(bad)
	return ok, bad
}

// midWhy returns the reasons at the middle of a bracket (a state change can
// bring a new reason between samples).
func midWhy(f func(u float64) (float64, reasonBits), a, b float64) reasonBits {
	_, w := f(0.5 * (a + b))
	return w
}

func sortBad(bad []badSpan) {
	for i := 1; i < len(bad); i++ {
		for j := i; j > 0 && bad[j].lo < bad[j-1].lo; j-- {
			bad[j], bad[j-1] = bad[j-1], bad[j]
		}
	}
}

// samplePoints returns a, every multiple of step strictly inside (a, b), and b.
func samplePoints(a, b, step float64) []float64 {
	us := make([]float64, 1, int((b-a)/step)+3)
	us[0] = a
	for k := math.Floor(a/step) + 1; k*step < b; k++ {
		if u := k * step; u > a {
			us = append(us, u)
		}
	}
	if b > a {
		us = append(us, b)
	}
	return us
}

// bisectEdge returns the edge between good (observable) and bad, to 1 ms,
// on the good side.
func bisectEdge(f func(u float64) (float64, reasonBits), good, bad float64) float64 {
	for range 40 {
		if math.Abs(bad-good) <= 1e-3 {
			break
		}
		mid := 0.5 * (good + bad)
		if _, w := f(mid); w == 0 {
			good = mid
		} else {
			bad = mid
		}
	}
	return good
}

// goldenMin returns the minimiser of g on [a, b] by golden-section search,
// to 0.05 s.
func goldenMin(g func(float64) float64, a, b float64) float64 {
	const r = 0.6180339887498949
	c, d := b-r*(b-a), a+r*(b-a)
	gc, gd := g(c), g(d)
	for b-a > 0.05 {
		if gc < gd {
			b, d, gd = d, c, gc
			c = b - r*(b-a)
			gc = g(c)
		} else {
			a, c, gc = c, d, gd
			d = a + r*(b-a)
			gd = g(d)
		}
	}
	return 0.5 * (a + b)
}

// altForAirmass returns the refracted altitude, degrees, at which
// ephem.Airmass equals x (x ≥ 1), by bisection (the airmass falls
// monotonically with altitude); 90 if x is below the formula's zenith value.
func altForAirmass(x float64) float64 {
	if z, _ := ephem.Airmass(90); x <= z {
		return 90
	}
	lo, hi := 0.0, 90.0
	for range 60 {
		mid := 0.5 * (lo + hi)
		if am, _ := ephem.Airmass(mid); am > x {
			lo = mid
		} else {
			hi = mid
		}
	}
	return hi
}

// targetSample is what the constraints see of a target at an instant.
type targetSample struct {
	altAirless, altRefr float64
	dir                 vec3
}

// azDeg returns the sample's azimuth, degrees from north through east,
// [0, 360).
func (s targetSample) azDeg() float64 {
	az := math.Atan2(s.dir[1], s.dir[0]) * radToDeg
	if az < 0 {
		az += 360
	}
	return az
}

// sample returns the target's place at u on the fast path, refracted by the
// site's table (ephem.AirTable: Site.RefractedAltDeg to 1e-9°).
func (en *engine) sample(ts *targetState, u float64) targetSample {
	alt, dir := ts.track.HorizonUnix(u)
	return targetSample{altAirless: alt, altRefr: en.air.RefractedAltDeg(alt), dir: dir}
}

// margin returns the smallest margin, degrees, by which the target meets the
// night-time constraints at u (negative: violated) and the set of violated
// ones. The Sun's altitude is handled by the dark spans, not here.
func (en *engine) margin(ts *targetState, u float64) (float64, reasonBits) {
	return en.marginAt(ts, u, en.envAt(u))
}

// envAt returns the Sun and the Moon at u: from the grid cache when u is a
// multiple of StepS inside it (filled once by fillEnvCache, read-only after),
// else interpolated.
func (en *engine) envAt(u float64) env {
	if len(en.envGrid) > 0 {
		k := math.Round(u / en.opt.StepS)
		if i := int(k) - en.envK0; k*en.opt.StepS == u && i >= 0 && i < len(en.envGrid) {
			return en.envGrid[i]
		}
	}
	return en.sky.at(u)
}

// fillEnvCache computes the Sun and the Moon at every multiple of StepS in
// the dark spans, which every target's scan samples.
func (en *engine) fillEnvCache() {
	if len(en.dark) == 0 {
		return
	}
	step := en.opt.StepS
	k0 := math.Ceil(en.dark[0].lo / step)
	k1 := math.Floor(en.dark[len(en.dark)-1].hi / step)
	en.envK0 = int(k0)
	en.envGrid = make([]env, 0, int(k1-k0)+1)
	for k := k0; k <= k1; k++ {
		en.envGrid = append(en.envGrid, en.sky.at(k*step))
	}
}

func (en *engine) marginAt(ts *targetState, u float64, ev env) (float64, reasonBits) {
	s := en.sample(ts, u)
	c := &en.c
	m := math.Inf(1)
	var why reasonBits
	add := func(v float64, b reasonBits) {
		if v < m {
			m = v
		}
		if v < 0 {
			why |= b
		}
	}
	add(s.altRefr, bitBelowHorizon)
	if en.altAirmass > 0 {
		add(s.altRefr-en.altAirmass, bitAirmass)
	}
	if c.MinAltDeg != 0 {
		add(s.altRefr-c.MinAltDeg, bitMinAlt)
	}
	if en.mask != nil {
		add(s.altRefr-en.mask.minAltDeg(s.azDeg()), bitHorizonMask)
	}
	if c.ZenithExclDeg > 0 {
		add(90-s.altRefr-c.ZenithExclDeg, bitZenith)
	}
	if c.haApplied() {
		ha := ts.track.HourAngleHours(timeOf(u))
		add(15*math.Min(ha-c.HAMinHours, c.HAMaxHours-ha), bitHourAngle)
	}
	// The angle between two directions is at least the difference of their
	// altitudes, so a separation margin is at least lb = |h − h_body| − limit.
	// When lb is at least the smallest margin so far and not negative, the
	// separation can set neither the minimum nor a reason: it is skipped,
	// and the result is the same (1e-9° spares the rounding of sepDeg).
	sepNeeded := func(bodyAlt, limit float64) bool {
		lb := math.Abs(s.altAirless-bodyAlt) - limit - 1e-9
		return lb < m || lb < 0
	}
	if ev.moonUp() {
		if c.MinMoonSepDeg > 0 && sepNeeded(ev.moonAlt, c.MinMoonSepDeg) {
			add(sepDeg(s.dir, ev.moon)-c.MinMoonSepDeg, bitMoonSep)
		}
		if c.MaxMoonIllum > 0 {
			add(100*(c.MaxMoonIllum-ev.illum), bitMoonIllum)
		}
	}
	if c.SunAvoidDeg > 0 && sepNeeded(ev.sunAlt, c.SunAvoidDeg) {
		add(sepDeg(s.dir, ev.sun)-c.SunAvoidDeg, bitSunAvoid)
	}
	if why&bitBelowHorizon != 0 {
		// Below the horizon says it all; the altitude limits add nothing.
		why &^= bitAirmass | bitMinAlt | bitHorizonMask
	}
	return m, why
}
