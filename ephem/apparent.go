package ephem

import (
	"math"
	"time"

	"github.com/soniakeys/meeus/v3/apparent"
	"github.com/soniakeys/meeus/v3/coord"
	"github.com/soniakeys/meeus/v3/nutation"
	"github.com/soniakeys/meeus/v3/precess"
	"github.com/soniakeys/unit"
)

// Apparent place of a star: the direction in which a geocentric observer
// sees it, referred to the true equator and equinox of date.
//
// The reduction, in the order of Meeus ch. 23 (the Ron–Vondrák variant):
//
//  1. proper motion from J2000.0 to the date, along the great circle
//     (the star moved on the tangent plane, then renormalised);
//  2. annual aberration from the Earth's barycentric velocity (Ron & Vondrák
//     1986, Meeus ch. 23, via meeus apparent.AberrationRonVondrak), J2000
//     frame, applied with the special-relativistic formula;
//  3. precession J2000.0 → date (Meeus (21.2)–(21.4), IAU 1976 angles, via
//     meeus precess.Precessor, which stays accurate next to the poles);
//  4. nutation (Meeus ch. 22), applied rigorously: ecliptic coordinates on
//     the mean obliquity, Δψ added to the longitude, back to equatorial
//     coordinates on the true obliquity (Meeus ch. 23, "rigorous method";
//     meeus coord.EqToEcl and coord.EclToEq).
//
// Neglected, each below 0.05″ for stars more than a few degrees from the
// Sun (from memory): the ICRS–FK5 frame bias (≈ 0.02″), light deflection by
// the Sun (0.004″ at 90° elongation), annual parallax and radial velocity
// (not held in Star), the IAU 1976/1980 models' departures from IAU 2006/2000A.
// Diurnal aberration depends on the site and is applied in Site.Horizontal.

// ApparentPlace returns the geocentric apparent right ascension and
// declination of st at instant t (UTC; converted to TT inside), in degrees,
// referred to the true equator and equinox of date: 0 ≤ ra < 360,
// −90 ≤ dec ≤ 90. st must be valid (Star.Validate).
func ApparentPlace(st Star, t time.Time) (raDeg, decDeg float64) {
	r := newPlaceReducer(JDTT(t).Float())
	v := r.apparent(st)
	ra, dec := v.radec()
	return ra * radToDeg, dec * radToDeg
}

// placeReducer holds what the apparent-place reduction needs at one instant
// and shares between stars.
type placeReducer struct {
	years        float64 // Julian years of TT since J2000.0
	prec         *precess.Precessor
	beta         vec3 // Earth's barycentric velocity / c, J2000 mean equator and equinox
	dPsi         unit.Angle
	sEps0, cEps0 float64 // mean obliquity of date
	sEps, cEps   float64 // true obliquity of date
}

func newPlaceReducer(jdTT float64) *placeReducer {
	years := (jdTT - J2000) / 365.25
	r := &placeReducer{
		years: years,
		prec:  precess.NewPrecessor(2000, 2000+years),
	}
	r.beta = earthVelocityOverC(jdTT)
	dPsi, dEps := nutation.Nutation(jdTT)
	eps0 := nutation.MeanObliquity(jdTT)
	r.dPsi = dPsi
	r.sEps0, r.cEps0 = eps0.Sincos()
	r.sEps, r.cEps = (eps0 + dEps).Sincos()
	return r
}

// earthVelocityOverC returns the Earth's velocity relative to the solar
// system barycentre divided by the speed of light, on the mean equator and
// equinox of J2000.0, at TT Julian date jdTT, by the Ron & Vondrák (1986)
// series of Meeus ch. 23 (table 23.A).
//
// meeus exposes that velocity only through the first-order corrections
// (Δα, Δδ) of apparent.AberrationRonVondrak, which lose accuracy near the
// celestial poles. Those corrections are linear in the velocity (X′, Y′, Z′):
// at α = 0, δ = 0 they are Δα = Y′/c, Δδ = Z′/c, and at α = 90°, δ = 0,
// Δα = −X′/c; evaluating them there recovers the vector exactly, so that the
// aberration can be applied as a rotation of the unit vector at any
// declination.
func earthVelocityOverC(jdTT float64) vec3 {
	dA0, dD0 := apparent.AberrationRonVondrak(0, 0, jdTT)
	dA90, _ := apparent.AberrationRonVondrak(unit.RA(math.Pi/2), 0, jdTT)
	return vec3{-dA90.Rad(), dA0.Rad(), dD0.Rad()}
}

// apparent returns the unit vector of st's apparent place (true equator and
// equinox of date).
func (r *placeReducer) apparent(st Star) vec3 {
	p := properMotion(st, r.years-(st.Epoch()-2000)) // from the coordinate epoch
	p = aberrate(p, r.beta)
	ra, dec := p.radec()
	eq := coord.Equatorial{RA: unit.RA(ra), Dec: unit.Angle(dec)}
	r.prec.Precess(&eq, &eq)
	lon, lat := coord.EqToEcl(eq.RA, eq.Dec, r.sEps0, r.cEps0)
	a, d := coord.EclToEq(lon+r.dPsi, lat, r.sEps, r.cEps)
	return unitVec(a.Rad(), d.Rad())
}

// properMotion returns the unit vector of st at years Julian years after its
// coordinate epoch: the star moves on the tangent plane at that epoch with its proper
// motion (μα·cos δ, μδ) and the result is renormalised. Without parallax and
// radial velocity this is the usual space-motion model; it is well defined at
// the poles, where a right-ascension rate is not.
func properMotion(st Star, years float64) vec3 {
	a, d := st.RADeg*degToRad, st.DecDeg*degToRad
	p := unitVec(a, d)
	if st.PMRAmasyr == 0 && st.PMDecmasyr == 0 {
		return p
	}
	sa, ca := math.Sincos(a)
	sd, cd := math.Sincos(d)
	ua := st.PMRAmasyr * masToRad * years // along e_α = (−sin α, cos α, 0)
	ud := st.PMDecmasyr * masToRad * years
	// e_δ = (−sin δ cos α, −sin δ sin α, cos δ)
	p = vec3{
		p[0] - ua*sa - ud*sd*ca,
		p[1] + ua*ca - ud*sd*sa,
		p[2] + ud*cd,
	}
	return p.unit()
}

// aberrate returns the direction p seen by an observer moving with velocity
// beta (in units of c): the special-relativistic aberration formula, as in
// the Explanatory Supplement to the Astronomical Almanac (1992), eq. 3.252-3
// (from memory; also ERFA's eraAb without light deflection):
//
//	p′ = (p/γ + (1 + p·β/(1 + 1/γ)) β) / (1 + p·β)
func aberrate(p, beta vec3) vec3 {
	pdv := p.dot(beta)
	invGamma := math.Sqrt(1 - beta.dot(beta))
	w := 1 + pdv/(1+invGamma)
	q := vec3{
		invGamma*p[0] + w*beta[0],
		invGamma*p[1] + w*beta[1],
		invGamma*p[2] + w*beta[2],
	}
	return q.unit()
}

// vec3 is a Cartesian 3-vector.
type vec3 [3]float64

func unitVec(ra, dec float64) vec3 {
	sa, ca := math.Sincos(ra)
	sd, cd := math.Sincos(dec)
	return vec3{cd * ca, cd * sa, sd}
}

func (v vec3) dot(w vec3) float64 { return v[0]*w[0] + v[1]*w[1] + v[2]*w[2] }

func (v vec3) unit() vec3 {
	n := math.Sqrt(v.dot(v))
	return vec3{v[0] / n, v[1] / n, v[2] / n}
}

// radec returns right ascension in [0, 2π) and declination in [−π/2, π/2],
// radians, of v (which need not be a unit vector).
func (v vec3) radec() (ra, dec float64) {
	ra = math.Atan2(v[1], v[0])
	if ra < 0 {
		ra += 2 * math.Pi
	}
	if ra >= 2*math.Pi {
		ra = 0
	}
	return ra, math.Atan2(v[2], math.Hypot(v[0], v[1]))
}
