package ephem

import (
	"math"
	"time"
)

// Rise, set and twilight events, found by sampling an altitude curve on a
// grid and refining every bracketed crossing with Brent's method. Unlike the
// book's one-day interpolation (Meeus ch. 15), this works at any latitude:
// at high latitudes an event that does not happen is simply not found.

// Altitudes of the Sun's centre (airless, topocentric), degrees, that define
// the events of a night.
const (
	// SunriseAltDeg is the Sun's centre at sunrise and sunset: −50′, i.e. the
	// upper limb (semidiameter 16′) on the horizon with 34′ of refraction
	// (Meeus ch. 15, h0 = −0°50′).
	SunriseAltDeg = -50.0 / 60
	// CivilTwilightAltDeg, NauticalTwilightAltDeg and AstronomicalTwilightAltDeg
	// are the Sun's centre at the end of evening (start of morning) civil,
	// nautical and astronomical twilight (common practice).
	CivilTwilightAltDeg        = -6.0
	NauticalTwilightAltDeg     = -12.0
	AstronomicalTwilightAltDeg = -18.0
	// HorizonRefractionDeg is the refraction assumed at the horizon for rise
	// and set, 34′ (Meeus ch. 15: h0 = −0°34′ = −0.5667° for stars and
	// planets).
	HorizonRefractionDeg = 34.0 / 60
)

// DefaultCrossingStep is the grid step FindCrossings uses when given a step
// of zero or less, and the step of the Sun and Moon event searches.
// A dip of the curve across the level that lasts less than one step may be
// missed (in practice only grazing twilight at the edge of the season where
// it stops happening).
const DefaultCrossingStep = 10 * time.Minute

// crossingTolSec is the bracket width at which Brent's method stops, seconds:
// every refined crossing is within 0.05 s of the root of the curve.
const crossingTolSec = 0.05

// Crossing is an instant when a function of time crosses a level.
type Crossing struct {
	T      time.Time // instant, UTC, within 0.1 s of the crossing
	Rising bool      // true when the function goes from below the level to above it
}

// FindCrossings returns, in time order, the instants in [from, to] at which
// f crosses level. f is sampled every step from `from` (and at `to`); every
// grid interval whose ends lie on opposite sides of the level (a value equal
// to the level counts as above) is refined by Brent's method to within
// 0.1 s. A step of zero or less means DefaultCrossingStep. Grid intervals in
// which f returns NaN or ±Inf at an end are skipped. It returns nil when
// to is not after from.
func FindCrossings(f func(time.Time) float64, level float64, from, to time.Time, step time.Duration) []Crossing {
	return sampleCurve(f, from, to, step).crossings(level)
}

// SunCrossings returns the instants in [from, to] at which the altitude of
// the Sun's centre (airless, topocentric; Site.SunAltDeg) crosses altDeg,
// on a DefaultCrossingStep grid.
func (s Site) SunCrossings(altDeg float64, from, to time.Time) []Crossing {
	return FindCrossings(s.SunAltDeg, altDeg, from, to, DefaultCrossingStep)
}

// MoonCrossings returns the moonrises (Rising) and moonsets in [from, to]
// seen from the site: the instants when the Moon's upper limb is on the
// refracted horizon, i.e. when the topocentric airless altitude of its centre
// plus its topocentric semidiameter plus HorizonRefractionDeg is zero.
func (s Site) MoonCrossings(from, to time.Time) []Crossing {
	return FindCrossings(s.moonUpperLimbDeg, 0, from, to, DefaultCrossingStep)
}

// moonUpperLimbDeg is the airless topocentric altitude of the Moon's upper
// limb plus the horizon refraction, degrees: zero when the limb touches the
// refracted horizon.
func (s Site) moonUpperLimbDeg(t time.Time) float64 {
	lst := s.lastRad(t)
	geo := moonGeocentricPlace(t)
	topo := s.topocentric(geo.raAngle(), geo.decAngle(), geo.distKm, t, lst)
	alt := s.horizontalAt(topo.ra*radToDeg, topo.dec*radToDeg, lst).AltDeg
	return alt + s.moonSemidiameter(geo, lst) + HorizonRefractionDeg
}

// NightEvents are the Sun and Moon events of one night at a site.
// A nil event does not happen in the window [Start, End].
type NightEvents struct {
	Start, End time.Time // local noon of the date and of the next day, as UTC instants

	// Sun events, UTC. Dusk events are the last setting crossing of their
	// level before the Sun's lowest point in the window, dawn events the
	// first rising crossing after it; see Night.
	Sunset, CivilDusk, NauticalDusk, AstronomicalDusk  *time.Time
	AstronomicalDawn, NauticalDawn, CivilDawn, Sunrise *time.Time

	// Moonrise and Moonset are the first of each in the window, UTC.
	Moonrise, Moonset *time.Time

	// MoonIlluminated is the Moon's illuminated fraction, 0..1, at local
	// midnight (00:00 of the next day in the zone).
	MoonIlluminated float64
}

// Night returns the Sun and Moon events at the site between local noon of the
// given date and local noon of the next day, local meaning the zone loc (nil
// means UTC). Sunset and sunrise put the Sun's centre at SunriseAltDeg;
// civil, nautical and astronomical dusk and dawn at −6°, −12° and −18°
// (airless, topocentric). Moonrise and moonset are as in Site.MoonCrossings.
//
// Each curve is sampled every DefaultCrossingStep and every crossing refined
// to within 0.1 s. The evening events are the last setting crossings before
// the Sun's lowest point in the window and the morning events the first
// rising crossings after it; so a brief afternoon sunrise in polar winter
// (possible when the zone's noon comes before the Sun's) is not taken for a
// dawn. Two setting (or two rising) crossings of one level on the same side
// of the low point would need a second low point within the day, which the
// Sun does not make; the rule matters only for such early crossings. When a
// level is not crossed on its side (polar day, white nights, polar night)
// the event is nil. The site must be valid (Site.Validate).
func Night(site Site, year int, month time.Month, day int, loc *time.Location) NightEvents {
	if loc == nil {
		loc = time.UTC
	}
	start := time.Date(year, month, day, 12, 0, 0, 0, loc)
	end := time.Date(year, month, day+1, 12, 0, 0, 0, loc)
	midnight := LocalDayStart(year, month, day+1, loc)
	ev := NightEvents{
		Start:           start.UTC(),
		End:             end.UTC(),
		MoonIlluminated: MoonIlluminated(midnight),
	}

	sun := sampleCurve(site.SunAltDeg, ev.Start, ev.End, DefaultCrossingStep)
	low := sun.lowest()
	for _, lv := range []struct {
		alt        float64
		dusk, dawn **time.Time
	}{
		{SunriseAltDeg, &ev.Sunset, &ev.Sunrise},
		{CivilTwilightAltDeg, &ev.CivilDusk, &ev.CivilDawn},
		{NauticalTwilightAltDeg, &ev.NauticalDusk, &ev.NauticalDawn},
		{AstronomicalTwilightAltDeg, &ev.AstronomicalDusk, &ev.AstronomicalDawn},
	} {
		for _, c := range sun.crossings(lv.alt) {
			switch {
			case !c.Rising && !c.T.After(low):
				*lv.dusk = timePtr(c.T) // keep the last one before the low point
			case c.Rising && !c.T.Before(low) && *lv.dawn == nil:
				*lv.dawn = timePtr(c.T)
			}
		}
	}

	for _, c := range site.MoonCrossings(ev.Start, ev.End) {
		switch {
		case c.Rising && ev.Moonrise == nil:
			ev.Moonrise = timePtr(c.T)
		case !c.Rising && ev.Moonset == nil:
			ev.Moonset = timePtr(c.T)
		}
	}
	return ev
}

func timePtr(t time.Time) *time.Time { return &t }

// sampledCurve is a function of time sampled on a grid.
type sampledCurve struct {
	f    func(time.Time) float64
	from time.Time
	secs []float64 // sample instants, seconds after from
	vals []float64
}

// sampleCurve samples f every step from `from` up to and including `to`.
func sampleCurve(f func(time.Time) float64, from, to time.Time, step time.Duration) sampledCurve {
	c := sampledCurve{f: f, from: from.UTC()}
	span := to.Sub(from).Seconds()
	if !(span > 0) {
		return c
	}
	if step <= 0 {
		step = DefaultCrossingStep
	}
	st := step.Seconds()
	n := int(math.Ceil(span / st))
	c.secs = make([]float64, 0, n+1)
	c.vals = make([]float64, 0, n+1)
	for i := 0; i < n; i++ {
		x := float64(i) * st
		c.secs = append(c.secs, x)
		c.vals = append(c.vals, f(c.at(x)))
	}
	c.secs = append(c.secs, span)
	c.vals = append(c.vals, f(to.UTC()))
	return c
}

// at returns the instant x seconds after the curve's start (rounded to the
// nanosecond).
func (c sampledCurve) at(x float64) time.Time {
	return c.from.Add(time.Duration(math.Round(x * 1e9)))
}

// lowest returns the sample instant with the lowest finite value (the start
// if there is none).
func (c sampledCurve) lowest() time.Time {
	best, bx := math.Inf(1), 0.0
	for i, v := range c.vals {
		if v < best {
			best, bx = v, c.secs[i]
		}
	}
	return c.at(bx)
}

// crossings brackets the crossings of level on the grid and refines each.
func (c sampledCurve) crossings(level float64) []Crossing {
	var out []Crossing
	g := func(x float64) float64 { return c.f(c.at(x)) - level }
	for i := 1; i < len(c.vals); i++ {
		v0, v1 := c.vals[i-1], c.vals[i]
		if !finite(v0) || !finite(v1) {
			continue
		}
		above0, above1 := v0 >= level, v1 >= level
		if above0 == above1 {
			continue
		}
		x := brentRoot(g, c.secs[i-1], c.secs[i], v0-level, v1-level, crossingTolSec)
		out = append(out, Crossing{T: c.at(x), Rising: above1})
	}
	return out
}

// brentRoot returns a root of g in [a, b], where g(a) = fa and g(b) = fb
// have opposite signs (or one is zero), to within tol: Brent's method
// (R. P. Brent, Algorithms for Minimization without Derivatives, 1973,
// ch. 4), which mixes bisection, the secant rule and inverse quadratic
// interpolation and never does worse than bisection. Written from the
// published algorithm (from memory of its usual form).
func brentRoot(g func(float64) float64, a, b, fa, fb, tol float64) float64 {
	if fa == 0 {
		return a
	}
	if fb == 0 {
		return b
	}
	c, fc := b, fb
	var d, e float64
	for iter := 0; iter < 100; iter++ {
		if (fb > 0 && fc > 0) || (fb < 0 && fc < 0) {
			c, fc = a, fa // keep the root bracketed between b and c
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) { // b is the best estimate
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		tol1 := 2*epsilon*math.Abs(b) + 0.5*tol
		xm := 0.5 * (c - b)
		if math.Abs(xm) <= tol1 || fb == 0 {
			return b
		}
		if math.Abs(e) >= tol1 && math.Abs(fa) > math.Abs(fb) {
			s := fb / fa
			var p, q float64
			if a == c { // secant
				p = 2 * xm * s
				q = 1 - s
			} else { // inverse quadratic interpolation
				q = fa / fc
				r := fb / fc
				p = s * (2*xm*q*(q-r) - (b-a)*(r-1))
				q = (q - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			}
			p = math.Abs(p)
			if 2*p < math.Min(3*xm*q-math.Abs(tol1*q), math.Abs(e*q)) {
				e = d // accept the interpolation
				d = p / q
			} else {
				d = xm // bisect
				e = d
			}
		} else {
			d = xm
			e = d
		}
		a, fa = b, fb
		if math.Abs(d) > tol1 {
			b += d
		} else {
			b += math.Copysign(tol1, xm)
		}
		fb = g(b)
		if !finite(fb) { // the function failed inside the bracket: give its middle
			return 0.5 * (b + c)
		}
	}
	return b
}

const epsilon = 2.220446049250313e-16 // float64 machine epsilon
