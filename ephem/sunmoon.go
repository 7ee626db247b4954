package ephem

import (
	"math"
	"time"

	"github.com/soniakeys/meeus/v3/base"
	"github.com/soniakeys/meeus/v3/coord"
	"github.com/soniakeys/meeus/v3/globe"
	"github.com/soniakeys/meeus/v3/moonillum"
	"github.com/soniakeys/meeus/v3/moonposition"
	"github.com/soniakeys/meeus/v3/nutation"
	"github.com/soniakeys/meeus/v3/parallax"
	"github.com/soniakeys/meeus/v3/semidiameter"
	"github.com/soniakeys/meeus/v3/solar"
	"github.com/soniakeys/unit"
)

// The Sun and the Moon, to the accuracy the book's short series give: the
// Sun to about 0.01° (Meeus ch. 25, "low accuracy"), the Moon to about 10″ in
// longitude and 4″ in latitude (Meeus ch. 47, from memory). Enough for twilight, rise and
// set times to a few seconds and for Moon distances; not for eclipse or
// occultation work.

// auKm is the astronomical unit in km as meeus uses it (meeus base.AU).
const auKm = base.AU

// earthRadiusKm is the Earth's equatorial radius a of the IAU 1976
// ellipsoid that the site's ρ sin φ′, ρ cos φ′ refer to (meeus
// globe.Earth76.Er).
var earthRadiusKm = globe.Earth76.Er

// SunApparent returns the geocentric apparent right ascension and declination
// of the Sun at instant t (UTC), degrees, true equator and equinox of date,
// and its distance in AU. Meeus ch. 25 (25.8, low accuracy, about 0.01°),
// via meeus solar.ApparentEquatorial and solar.Radius, at TT.
func SunApparent(t time.Time) (raDeg, decDeg, distAU float64) {
	jde := JDTT(t).Float()
	a, d := solar.ApparentEquatorial(jde)
	return a.Deg(), d.Deg(), solar.Radius(base.J2000Century(jde))
}

// MoonGeocentric returns the geocentric apparent right ascension and
// declination of the Moon at instant t (UTC), degrees, true equator and
// equinox of date, and the distance between the centres of the Earth and the
// Moon in km. Meeus ch. 47 (meeus moonposition.Position, at TT), with the
// nutation in longitude added and the true obliquity used (Meeus ch. 22 and
// Example 47.a).
func MoonGeocentric(t time.Time) (raDeg, decDeg, distKm float64) {
	a, d, dist := moonGeocentric(JDTT(t).Float())
	return a.Deg(), d.Deg(), dist
}

func moonGeocentric(jde float64) (unit.RA, unit.Angle, float64) {
	lon, lat, dist := moonposition.Position(jde)
	dPsi, dEps := nutation.Nutation(jde)
	sEps, cEps := (nutation.MeanObliquity(jde) + dEps).Sincos()
	a, d := coord.EclToEq(lon+dPsi, lat, sEps, cEps)
	return a, d, dist
}

// bodyPlace is a body's apparent right ascension and declination, radians,
// and distance in km, seen from the Earth's centre or from a site.
type bodyPlace struct {
	ra, dec, distKm float64
}

func (b bodyPlace) raAngle() unit.RA     { return unit.RA(b.ra) }
func (b bodyPlace) decAngle() unit.Angle { return unit.Angle(b.dec) }

// topocentric moves a geocentric place (α, δ, distance in km) to the site at
// instant t: Meeus (40.2), (40.3), via meeus parallax.Topocentric. meeus
// computes the hour angle from its jde argument with sidereal.Apparent, so it
// is given the UT (= UTC) Julian date here; the place itself is for TT.
// meeus takes the horizontal parallax as π = 8.794″/Δ (Δ in AU), which for
// the Moon is 0.16″ short of the exact sin π = a/Δ; it is therefore given the
// distance for which its π equals arcsin(a/Δ). The distance from the site is
// Δ·q, with q from Meeus (40.6), (40.7). lst is the local apparent sidereal
// time at t, radians (Site.lastRad).
func (s Site) topocentric(a unit.RA, d unit.Angle, distKm float64, t time.Time, lst float64) bodyPlace {
	rhoSin, rhoCos := s.geocentric()
	g := s.globe()
	jdUT := JDUTC(t).Float()
	sinPi := earthRadiusKm / distKm
	meeusDist := parallax.Horizontal(1).Rad() / math.Asin(sinPi) // AU, so that 8.794″/Δ = arcsin(a/Δ)
	at, dt := parallax.Topocentric(a, d, meeusDist, rhoSin, rhoCos, g.Lon, jdUT)

	ha := lst - a.Rad()
	sh, ch := math.Sincos(ha)
	sd, cd := d.Sincos()
	A := cd * sh
	B := cd*ch - rhoCos*sinPi
	C := sd - rhoSin*sinPi
	q := math.Sqrt(A*A + B*B + C*C)
	return bodyPlace{ra: at.Rad(), dec: dt.Rad(), distKm: distKm * q}
}

// MoonTopocentric returns the Moon's apparent right ascension and declination
// seen from the site at instant t (UTC), degrees (geocentric apparent place
// corrected for parallax, Meeus ch. 40), and the distance from the site to
// the Moon's centre, km.
func (s Site) MoonTopocentric(t time.Time) (raDeg, decDeg, distKm float64) {
	m := s.moonTopocentric(t, s.lastRad(t))
	return m.ra * radToDeg, m.dec * radToDeg, m.distKm
}

func (s Site) moonTopocentric(t time.Time, lst float64) bodyPlace {
	geo := moonGeocentricPlace(t)
	return s.topocentric(geo.raAngle(), geo.decAngle(), geo.distKm, t, lst)
}

// MoonSemidiameterDeg returns the Moon's semidiameter seen from the site at
// instant t (UTC), degrees: Meeus ch. 55 with the topocentric correction of
// ch. 40, via meeus semidiameter.MoonTopocentric (k = 0.272481 lunar radii per
// Earth equatorial radius).
func (s Site) MoonSemidiameterDeg(t time.Time) float64 {
	return s.moonSemidiameter(moonGeocentricPlace(t), s.lastRad(t))
}

// moonGeocentricPlace returns the Moon's geocentric apparent place at t.
func moonGeocentricPlace(t time.Time) bodyPlace {
	a, d, dist := moonGeocentric(JDTT(t).Float())
	return bodyPlace{ra: a.Rad(), dec: d.Rad(), distKm: dist}
}

// moonSemidiameter returns the topocentric semidiameter, degrees, of the
// Moon whose geocentric place is geo, at local apparent sidereal time lst
// (radians).
func (s Site) moonSemidiameter(geo bodyPlace, lst float64) float64 {
	rhoSin, rhoCos := s.geocentric()
	ha := unit.HourAngle(lst - geo.ra)
	sinSD := semidiameter.MoonTopocentric(geo.distKm/auKm, geo.decAngle(), ha, rhoSin, rhoCos)
	return math.Asin(sinSD) * radToDeg
}

// MoonIlluminated returns the illuminated fraction k of the Moon's disk at
// instant t (UTC), 0..1, seen from the Earth's centre: Meeus (48.1)–(48.3),
// via meeus moonillum.PhaseAngleEq and base.Illuminated, with the positions
// of MoonGeocentric and SunApparent.
func MoonIlluminated(t time.Time) float64 {
	jde := JDTT(t).Float()
	a, d, dist := moonGeocentric(jde)
	a0, d0 := solar.ApparentEquatorial(jde)
	r := solar.Radius(base.J2000Century(jde)) * auKm
	return base.Illuminated(moonillum.PhaseAngleEq(a, d, dist, a0, d0, r))
}

// SunAltDeg returns the altitude of the Sun's centre seen from the site at
// instant t (UTC), degrees, airless (no refraction), topocentric (parallax
// ≤ 8.8″ applied).
func (s Site) SunAltDeg(t time.Time) float64 {
	return s.sunAltAt(t, s.lastRad(t))
}

// sunAltAt is SunAltDeg at local apparent sidereal time lst (radians).
func (s Site) sunAltAt(t time.Time, lst float64) float64 {
	a, d, r := SunApparent(t)
	sun := s.topocentric(unit.RAFromDeg(a), unit.AngleFromDeg(d), r*auKm, t, lst)
	return s.horizontalAt(sun.ra*radToDeg, sun.dec*radToDeg, lst).AltDeg
}

// MoonAltDeg returns the altitude of the Moon's centre seen from the site at
// instant t (UTC), degrees, airless, topocentric.
func (s Site) MoonAltDeg(t time.Time) float64 {
	lst := s.lastRad(t)
	m := s.moonTopocentric(t, lst)
	return s.horizontalAt(m.ra*radToDeg, m.dec*radToDeg, lst).AltDeg
}

// SeparationDeg returns the angular separation, degrees, 0..180, of two
// directions given by right ascension and declination in degrees. It uses
// Vincenty's formula (the atan2 form of the great-circle distance), accurate
// at all separations, including very small ones and near 180°. (meeus
// angle.Sep does not wrap the right-ascension difference in its small-angle
// branch, so it fails across RA = 0.)
func SeparationDeg(ra1, dec1, ra2, dec2 float64) float64 {
	s1, c1 := math.Sincos(dec1 * degToRad)
	s2, c2 := math.Sincos(dec2 * degToRad)
	sdr, cdr := math.Sincos((ra2 - ra1) * degToRad)
	num := math.Hypot(c2*sdr, c1*s2-s1*c2*cdr)
	den := s1*s2 + c1*c2*cdr
	return math.Atan2(num, den) * radToDeg
}
