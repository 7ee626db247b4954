package planner

import (
	"math"
	"time"

	"phasecast/ephem"
)

// The Sun and the Moon over one night.
//
// Their places cost a few microseconds each through ephem's full path, so
// the planner computes them at nodes every nodeStepS seconds and reads them
// between nodes by 4-point Lagrange interpolation (exact for cubics; the
// error is of order h⁴·f⁗/128 — for a diurnal motion, (ωh)⁴/128 rad with
// ω = 7.29e-5 rad/s and h = 600 s, below 0.01″ for the Sun; the Moon's own
// motion adds a factor of order one). The test TestNightSkyInterpolation
// checks the interpolated altitudes against the full path.

const (
	nodeStepS = 600.0
	// moonUpAltDeg is the altitude of the Moon's centre (airless,
	// topocentric) above which the Moon counts as up: its upper limb on the
	// refracted horizon, with the mean semidiameter 15.5′ and the standard
	// horizontal refraction 34′ (common practice, as for moonrise).
	moonUpAltDeg = -(34.0 + 15.5) / 60
	degToRad     = math.Pi / 180
	radToDeg     = 180 / math.Pi
)

// vec3 is a unit vector in the horizon frame: x north, y east, z zenith.
type vec3 [3]float64

// horizonVec returns the unit vector of altitude altDeg and azimuth azDeg
// (from north through east).
func horizonVec(altDeg, azDeg float64) vec3 {
	sa, ca := math.Sincos(altDeg * degToRad)
	sz, cz := math.Sincos(azDeg * degToRad)
	return vec3{ca * cz, ca * sz, sa}
}

// sepDeg returns the angle between two unit vectors, degrees, 0..180, in
// the atan2 form that stays accurate near 0 and 180°.
func sepDeg(a, b vec3) float64 {
	cx := a[1]*b[2] - a[2]*b[1]
	cy := a[2]*b[0] - a[0]*b[2]
	cz := a[0]*b[1] - a[1]*b[0]
	return math.Atan2(math.Sqrt(cx*cx+cy*cy+cz*cz), a[0]*b[0]+a[1]*b[1]+a[2]*b[2]) * radToDeg
}

// series holds samples of up to 5 quantities at nodes t0 + k·h (Unix
// seconds) and interpolates them with 4-point Lagrange polynomials.
type series struct {
	t0, h float64
	v     [][5]float64
}

func newSeries(from, to, h float64, f func(u float64) [5]float64) series {
	n := int(math.Ceil((to-from)/h)) + 1
	s := series{t0: from, h: h, v: make([][5]float64, n)}
	for k := range s.v {
		s.v[k] = f(from + float64(k)*h)
	}
	return s
}

// at interpolates the quantities at u (clamped to the nodes' span).
func (s *series) at(u float64) [5]float64 {
	n := len(s.v)
	if n == 1 {
		return s.v[0]
	}
	x := (u - s.t0) / s.h
	if n < 4 {
		k := min(max(int(math.Floor(x)), 0), n-2)
		f := x - float64(k)
		var out [5]float64
		for j := range out {
			out[j] = s.v[k][j] + f*(s.v[k+1][j]-s.v[k][j])
		}
		return out
	}
	k := min(max(int(math.Floor(x))-1, 0), n-4) // nodes k..k+3
	p := x - float64(k)                         // position, 0..3 inside
	// Lagrange weights for nodes 0, 1, 2, 3 at p.
	w0 := -(p - 1) * (p - 2) * (p - 3) / 6
	w1 := p * (p - 2) * (p - 3) / 2
	w2 := -p * (p - 1) * (p - 3) / 2
	w3 := p * (p - 1) * (p - 2) / 6
	var out [5]float64
	for j := range out {
		out[j] = w0*s.v[k][j] + w1*s.v[k+1][j] + w2*s.v[k+2][j] + w3*s.v[k+3][j]
	}
	return out
}

// env is the Sun and the Moon at one instant, as the constraints read them.
type env struct {
	sunAlt  float64 // Sun centre, airless, topocentric, degrees
	sun     vec3    // Sun direction (horizon frame)
	moonAlt float64 // Moon centre, airless, topocentric, degrees
	moon    vec3    // Moon direction (horizon frame)
	illum   float64 // Moon's illuminated fraction, 0..1
}

func (e env) moonUp() bool { return e.moonAlt > moonUpAltDeg }

// nightSky is the Sun and the Moon over [from, to] at a site.
type nightSky struct {
	site     ephem.Site
	sun      series // x, y, z of the Sun's geocentric direction; [3] = its distance, au
	moon     series // x, y, z of the Moon's direction; [3] = illuminated fraction
	from, to float64
}

// newNightSky samples the Sun and the Moon at nodes covering [from, to]
// with one spare node at each end (so that interpolation never
// extrapolates), through ephem's full path: Site.Horizontal of SunApparent
// for the Sun's direction (its parallax is added to the interpolated
// altitude, see sunAltOf); Site.Horizontal of Site.MoonTopocentric for the
// Moon; MoonIlluminated. The direction's components are smooth (sinusoids
// of the hour angle), unlike the altitude near culmination, so they are what
// is interpolated.
func newNightSky(site ephem.Site, from, to float64) *nightSky {
	ns := &nightSky{site: site, from: from, to: to}
	a, b := from-nodeStepS, to+nodeStepS
	ns.sun = newSeries(a, b, nodeStepS, func(u float64) [5]float64 {
		t := timeOf(u)
		ra, dec, dist := ephem.SunApparent(t)
		h := site.Horizontal(ra, dec, t)
		v := horizonVec(h.AltDeg, h.AzDeg)
		return [5]float64{v[0], v[1], v[2], dist}
	})
	ns.moon = newSeries(a, b, nodeStepS, func(u float64) [5]float64 {
		t := timeOf(u)
		ra, dec, _ := site.MoonTopocentric(t)
		h := site.Horizontal(ra, dec, t)
		v := horizonVec(h.AltDeg, h.AzDeg)
		return [5]float64{v[0], v[1], v[2], ephem.MoonIlluminated(t)}
	})
	return ns
}

func unitOf(x, y, z float64) vec3 {
	n := math.Sqrt(x*x + y*y + z*z)
	return vec3{x / n, y / n, z / n}
}

// sunAlt returns the Sun centre's altitude (airless, topocentric) at u.
func (ns *nightSky) sunAlt(u float64) float64 {
	s := ns.sun.at(u)
	return sunAltOf(unitOf(s[0], s[1], s[2]), s[3])
}

// sunAltOf returns the Sun's topocentric altitude, degrees, from its
// geocentric direction and distance (au): the parallax in altitude
// p = π·cos h with the horizontal parallax π = 8.794″/Δ (Meeus ch. 40;
// the altitude form is common practice), good to far below 0.01″.
func sunAltOf(geo vec3, distAU float64) float64 {
	h := math.Asin(geo[2]) * radToDeg
	return h - 8.794/3600/distAU*math.Cos(h*degToRad)
}

// at returns the Sun and the Moon at u.
func (ns *nightSky) at(u float64) env {
	s := ns.sun.at(u)
	m := ns.moon.at(u)
	mv := unitOf(m[0], m[1], m[2])
	sv := unitOf(s[0], s[1], s[2])
	return env{
		sunAlt:  sunAltOf(sv, s[3]),
		sun:     sv,
		moonAlt: math.Asin(mv[2]) * radToDeg,
		moon:    mv,
		illum:   min(max(m[3], 0), 1),
	}
}

// NightWindow returns the planning window of the night that begins on the
// evening of local date (year, month, day) in zone loc: local noon of that
// date to local noon of the next, as UTC instants (the same span as the
// `night` command's events).
func NightWindow(year int, month time.Month, day int, loc *time.Location) (from, to time.Time) {
	from = time.Date(year, month, day, 12, 0, 0, 0, loc)
	to = time.Date(year, month, day+1, 12, 0, 0, 0, loc)
	return from.UTC(), to.UTC()
}
