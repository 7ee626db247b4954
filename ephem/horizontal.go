package ephem

import (
	"math"
	"time"

	"github.com/soniakeys/meeus/v3/coord"
	"github.com/soniakeys/meeus/v3/globe"
	"github.com/soniakeys/meeus/v3/parallactic"
	"github.com/soniakeys/unit"
)

// Horizontal is a direction seen from a site, without refraction ("airless").
type Horizontal struct {
	AltDeg         float64 // altitude above the horizon, degrees, −90..90
	AzDeg          float64 // azimuth from north through east, degrees, [0, 360): 0 = N, 90 = E
	HourAngleHours float64 // local hour angle, hours, [−12, 12); positive west of the meridian
	ParallacticDeg float64 // parallactic angle q, degrees, (−180, 180]; Meeus (14.1)
}

// speedOfLightKmS is c in km/s (exact by definition of the metre).
const speedOfLightKmS = 299792.458

// diurnalAberrationRad is the constant of diurnal aberration, ω·a/c in
// radians (≈ 0.320″): the speed of a point on the equator due to the Earth's
// rotation (ω = meeus globe.RotationRate1996_5, a = meeus globe.Earth76.Er)
// over the speed of light. A site at geocentric distance ρ cos φ′ from the
// axis sees it scaled by ρ cos φ′.
var diurnalAberrationRad = globe.RotationRate1996_5 * globe.Earth76.Er / speedOfLightKmS

// Horizontal returns the airless horizontal coordinates, hour angle and
// parallactic angle at the site, at instant t (UTC), of a direction given by
// its apparent right ascension and declination (degrees, true equator and
// equinox of date, as from ApparentPlace, or topocentric for the Sun and
// Moon).
//
// The hour angle uses the local apparent sidereal time (LASTHours). Diurnal
// aberration (the site's velocity from the Earth's rotation, up to 0.32″,
// displacing toward the east point) is applied first; all four outputs refer
// to that diurnally aberrated direction. Then Meeus (13.5), (13.6) via meeus
// coord.EqToHz, with its azimuth turned from south-based to north-based
// (+180°), and Meeus (14.1) via meeus parallactic.ParallacticAngle. Latitude
// is geodetic. Polar motion is neglected (≤ 0.5″, from memory).
func (s Site) Horizontal(raAppDeg, decAppDeg float64, t time.Time) Horizontal {
	return s.horizontalAt(raAppDeg, decAppDeg, s.lastRad(t))
}

// horizontalAt is Horizontal at local apparent sidereal time lst (radians).
func (s Site) horizontalAt(raAppDeg, decAppDeg, lst float64) Horizontal {
	ha := lst - raAppDeg*degToRad
	dec := decAppDeg * degToRad
	sh, ch := math.Sincos(ha)
	sd, cd := math.Sincos(dec)
	x, y, z := diurnalAberration(cd*ch, cd*sh, sd, s.diurnalK())
	ha = math.Atan2(y, x)
	dec = math.Atan2(z, math.Hypot(x, y))

	g := s.globe()
	// meeus takes Greenwich sidereal time and west longitude; passing the
	// local sidereal time with longitude 0 gives the same hour angle.
	A, h := coord.EqToHz(unit.RA(lst-ha), unit.Angle(dec), g.Lat, 0, unit.TimeFromRad(lst))
	q := parallactic.ParallacticAngle(g.Lat, unit.Angle(dec), unit.HourAngle(ha))
	return Horizontal{
		AltDeg:         h.Deg(),
		AzDeg:          wrapDeg360(A.Deg() + 180),
		HourAngleHours: wrapPi(ha) * 12 / math.Pi,
		ParallacticDeg: q.Deg(),
	}
}

// diurnalK returns the diurnal aberration at the site, radians:
// diurnalAberrationRad · ρ cos φ′.
func (s Site) diurnalK() float64 {
	_, rhoCos := s.geocentric()
	return diurnalAberrationRad * rhoCos
}

// diurnalAberration displaces the unit vector (x, y, z) = (cos δ cos H,
// cos δ sin H, sin δ), in the hour-angle frame (H positive west), by the
// first-order aberration of an observer moving with speed k (units of c)
// toward the east point (H = −90°, δ = 0), i.e. along (0, −1, 0):
// p′ = p + k(e − (p·e)p). The neglected second-order terms are k² ≈ 1e-12 rad.
func diurnalAberration(x, y, z, k float64) (float64, float64, float64) {
	f := 1 + k*y // 1 − k(p·e), p·e = −y
	return x * f, y*f - k, z * f
}
