package ephem

import (
	"math"
	"time"

	"github.com/soniakeys/meeus/v3/coord"
	"github.com/soniakeys/meeus/v3/globe"
	"github.com/soniakeys/meeus/v3/kepler"
	"github.com/soniakeys/meeus/v3/moonposition"
	"github.com/soniakeys/meeus/v3/nutation"
	"github.com/soniakeys/meeus/v3/planetelements"
	"github.com/soniakeys/meeus/v3/precess"
	"github.com/soniakeys/meeus/v3/sidereal"
	"github.com/soniakeys/meeus/v3/solar"
	"github.com/soniakeys/unit"
)

// Barycentric and heliocentric time.
//
// An event seen at the observatory at UTC instant t would have been seen at the
// solar-system barycentre (or the Sun's centre) earlier or later by the Rømer
// delay, the light-travel time along the target direction n̂:
//
//	BJD_TDB = JD_TDB(t) + (r_obs,bary · n̂)/c
//	HJD_UTC = JD_UTC(t) + (r_obs,helio · n̂)/c
//
// with r_obs the observatory's position relative to the barycentre (bary) or
// the Sun's centre (helio). The delay reaches ±499 s × cos β (β the target's
// ecliptic latitude) over the year. The position is built from:
//
//   - the Earth–Moon barycentre's heliocentric position: Meeus ch. 25 (25.2–25.5),
//     meeus solar.True and solar.Radius (mean equinox and ecliptic of date),
//     plus the largest periodic perturbations by Venus and Jupiter
//     (baryEarthPerturbations);
//   - the Earth's offset from the Earth–Moon barycentre, −r_Moon/(1+M⊕/M☾),
//     with the geocentric Moon of Meeus ch. 47 (meeus moonposition.Position);
//   - the Sun's offset from the barycentre, −Σ mᵢ rᵢ / (M☉ + Σ mᵢ), over the
//     planets (Mercury to Neptune, the Earth–Moon barycentre among them) on
//     unperturbed Kepler ellipses from their mean elements of date, Meeus
//     ch. 31, table 31.A (meeus planetelements.Mean, Kepler's equation by
//     meeus kepler.Kepler2). Jupiter alone moves the Sun by 0.005 au (2.5 s);
//     all four giants by up to 0.01 au (5 s);
//   - the observatory's geocentric position, Meeus (11.3) (Site.geocentric)
//     rotated by local mean sidereal time, Meeus ch. 12 (meeus sidereal.Mean,
//     with UT1 ≈ UTC): at most 21.3 ms (Earth's radius over c).
//
// Everything is summed in the mean ecliptic of date, turned to the mean equator
// of date with the mean obliquity, Meeus (22.2) (meeus nutation.MeanObliquity),
// and dotted with the target's direction precessed from ICRS/J2000 to the same
// equator, Meeus (21.2–21.4) (meeus precess.Position, with proper motion). A
// dot product does not care which frame it is taken in, so no rotation back to
// ICRS is needed. The 23 mas frame bias between ICRS and the J2000 mean
// equator, and nutation (≤ 20″) in the observatory's term, change the delay by
// less than 5 µs: neglected.
//
// Neglected on purpose: the Shapiro delay (the Sun's gravitational delay,
// (2GM☉/c³)·ln(1 − cos θ) with 2GM☉/c³ = 9.85 µs and θ the target's angle
// from the Sun, from memory: 0.11 ms at the Sun's limb, under 20 µs more than
// 30° from the Sun, where targets are observed); the Einstein
// delay is in TDB − TT (TDBMinusTT); the target's parallax (the direction is
// taken as the same from the Earth and from the barycentre: plane wave).
//
// Accuracy against astropy 5.2.1 (ERFA epv00 ephemeris), 1950–2100:
// BJD_TDB − JD_TDB within 0.032 s and HJD_UTC within 0.026 s over the 300
// cases of testdata/bary_astropy.json; the observatory's barycentric position
// is within 0.049 light-seconds of ERFA's at 3,000 dates 1950–2100 (a bound
// for any direction). What is left is the Earth's longitude (≤ 17″, rms 5″:
// the mean-element ellipse with its four largest perturbations) and the Sun's
// barycentric offset (rms 0.012 s: mean elements of the giant planets lack
// the Jupiter–Saturn great inequality).

// Physical constants for the Rømer delay.
const (
	// AUKm is the astronomical unit, km, exact by definition (IAU 2012
	// Resolution B2).
	AUKm = 149597870.7
	// LightSpeedKmS is the speed of light in vacuum, km/s, exact (SI).
	LightSpeedKmS = 299792.458
	// AULightSeconds is the light time for one astronomical unit, s
	// (AUKm/LightSpeedKmS = 499.004784 s).
	AULightSeconds = AUKm / LightSpeedKmS
	// EarthMoonMassRatio is M⊕/M☾ (IAU 2009 system of astronomical
	// constants, Luzum et al. 2011, Celest. Mech. Dyn. Astr. 110, 293,
	// table 1: 81.30056; from memory).
	EarthMoonMassRatio = 81.30056
)

// baryPlanet is one planet in the Sun's reflex motion: its meeus
// planetelements index and its mass as a fraction of the Sun's.
type baryPlanet struct {
	index int
	mass  float64 // M/M☉
}

// baryPlanets are the planets whose pull moves the Sun about the barycentre.
// Masses are the reciprocal mass ratios M☉/M of the IAU 2009 system of
// astronomical constants (Luzum et al. 2011, table 1; from memory). The
// Earth–Moon barycentre is handled separately (its orbit comes from meeus
// solar, as planetelements has no node for it).
var baryPlanets = [...]baryPlanet{
	{planetelements.Mercury, 1 / 6023597.4},
	{planetelements.Venus, 1 / 408523.719},
	{planetelements.Mars, 1 / 3098703.59},
	{planetelements.Jupiter, 1 / 1047.348644},
	{planetelements.Saturn, 1 / 3497.9018},
	{planetelements.Uranus, 1 / 22902.98},
	{planetelements.Neptune, 1 / 19412.26},
}

// baryEMBMass is the Earth–Moon barycentre's mass over the Sun's
// (M☉/(M⊕+M☾) = 328900.559617, IAU 2009, from memory).
const baryEMBMass = 1 / 328900.559617

// BaryTimes holds one instant in every standard phasecast knows, and the two
// light-travel delays that link them. Julian dates are two-part (JD2).
type BaryTimes struct {
	JDUTC  JD2 // geocentric, UTC
	JDTT   JD2 // geocentric, TT
	JDTDB  JD2 // geocentric, TDB
	HJDUTC JD2 // heliocentric, UTC
	HJDTT  JD2 // heliocentric, TT
	BJDUTC JD2 // barycentric, UTC
	BJDTDB JD2 // barycentric, TDB
	// BaryDelayS and HelioDelayS are the Rømer delays, seconds: positive
	// when the observatory is nearer the target than the barycentre (the
	// Sun's centre) is, so that BJD = JD + delay.
	BaryDelayS  float64
	HelioDelayS float64
}

// BarycentricTimes returns every time standard for an event observed from
// site at UTC instant t in the direction of st, after validating site and
// star. Valid for 1950–2100 to the accuracy stated in the package notes
// above; outside, the Earth's mean orbit and ΔT degrade slowly.
func BarycentricTimes(site Site, st Star, t time.Time) (BaryTimes, error) {
	if err := site.Validate(); err != nil {
		return BaryTimes{}, err
	}
	if err := baryValidateStar(st); err != nil {
		return BaryTimes{}, err
	}
	return baryTimes(&site, st, JDUTC(t)), nil
}

// BJDTDB returns the barycentric Julian date in the TDB scale of an event seen
// from site at UTC instant t in the direction of st. The inputs must be valid
// (Site.Validate; a star with RA 0..360°, Dec −90..90°); for invalid inputs
// the zero JD2 is returned, never NaN: call BarycentricTimes to get the error.
func BJDTDB(site Site, st Star, t time.Time) JD2 {
	b, err := BarycentricTimes(site, st, t)
	if err != nil {
		return JD2{}
	}
	return b.BJDTDB
}

// HJDUTC returns the heliocentric Julian date in the UTC scale (the delay is
// to the Sun's centre; the scale stays UTC, as in much of the older eclipse
// timing literature). Invalid inputs give the zero JD2, as for BJDTDB.
func HJDUTC(site Site, st Star, t time.Time) JD2 {
	b, err := BarycentricTimes(site, st, t)
	if err != nil {
		return JD2{}
	}
	return b.HJDUTC
}

// HJDTT returns the heliocentric Julian date in the TT scale. Invalid inputs
// give the zero JD2, as for BJDTDB.
func HJDTT(site Site, st Star, t time.Time) JD2 {
	b, err := BarycentricTimes(site, st, t)
	if err != nil {
		return JD2{}
	}
	return b.HJDTT
}

// BJDUTC returns the barycentric Julian date in the UTC scale (a hybrid some
// authors used before BJD_TDB was recommended; it differs from BJD_TDB by
// TDB − UTC, 32.184 s + leap seconds + ≤ 1.7 ms). Invalid inputs give the
// zero JD2, as for BJDTDB.
func BJDUTC(site Site, st Star, t time.Time) JD2 {
	b, err := BarycentricTimes(site, st, t)
	if err != nil {
		return JD2{}
	}
	return b.BJDUTC
}

// RoemerDelaySeconds returns the barycentric and heliocentric light-travel
// delays, seconds, for an event seen from site at UTC instant t in the
// direction of st: BJD_TDB = JD_TDB + bary, HJD_UTC = JD_UTC + helio. Invalid
// inputs give zeros, as for BJDTDB.
func RoemerDelaySeconds(site Site, st Star, t time.Time) (bary, helio float64) {
	b, err := BarycentricTimes(site, st, t)
	if err != nil {
		return 0, 0
	}
	return b.BaryDelayS, b.HelioDelayS
}

// UTCFromBJDTDB returns the UTC instant at which an event with barycentric
// time b (BJD_TDB) is observed from site in the direction of st: the inverse
// of BJDTDB, by fixed-point iteration (the delay changes by at most 1e-4 s per
// second, so each step gains four digits; three steps reach nanoseconds).
// The result carries nanoseconds. Invalid inputs give the zero time.Time.
func UTCFromBJDTDB(site Site, st Star, b JD2) time.Time {
	if site.Validate() != nil || baryValidateStar(st) != nil || !finite(b.Day) || !finite(b.Frac) {
		return time.Time{}
	}
	return baryTimeFromJD(baryInvert(&site, st, b, StdBJDTDB))
}

// baryTimes evaluates every standard at the UTC Julian date u. A nil site
// means the geocentre.
func baryTimes(site *Site, st Star, u JD2) BaryTimes {
	tt := u.AddSeconds(TTMinusUTC(baryTimeFromJD(u)))
	tdb := tt.AddSeconds(TDBMinusTT(tt.Float()))
	bary, helio := baryDelays(site, st, u, tdb)
	return BaryTimes{
		JDUTC:       u,
		JDTT:        tt,
		JDTDB:       tdb,
		HJDUTC:      u.AddSeconds(helio),
		HJDTT:       tt.AddSeconds(helio),
		BJDUTC:      u.AddSeconds(bary),
		BJDTDB:      tdb.AddSeconds(bary),
		BaryDelayS:  bary,
		HelioDelayS: helio,
	}
}

// baryPick returns the standard std from b.
func baryPick(b BaryTimes, std TimeStandard) JD2 {
	switch std {
	case StdHJDUTC:
		return b.HJDUTC
	case StdHJDTT:
		return b.HJDTT
	case StdBJDUTC:
		return b.BJDUTC
	case StdBJDTDB:
		return b.BJDTDB
	}
	return b.JDUTC
}

// baryInvert returns the UTC Julian date at which the standard std reads v,
// by fixed-point iteration: each standard runs at the rate of UTC to within
// 1e-4 (the Earth's orbital speed over c), so the error shrinks by 1e4 per
// step. At most six steps; stops below 1e-14 day (1 ns).
func baryInvert(site *Site, st Star, v JD2, std TimeStandard) JD2 {
	return baryInvertFrom(site, st, v, std, v)
}

// baryInvertFrom is baryInvert starting from the UTC Julian date u (a guess
// within a few milliseconds saves one or two steps).
func baryInvertFrom(site *Site, st Star, v JD2, std TimeStandard, u JD2) JD2 {
	if std == StdJDUTC {
		return v
	}
	for range 6 {
		d := v.SubDays(baryPick(baryTimes(site, st, u), std))
		u = u.AddDays(d)
		if math.Abs(d) < 1e-14 {
			break
		}
	}
	return u
}

// baryTimeFromJD returns the UTC instant of a UTC Julian date with
// nanosecond resolution (TimeFromJDUTC rounds to microseconds).
func baryTimeFromJD(j JD2) time.Time {
	days := j.Day - jdUnixEpoch
	whole := math.Floor(days)
	frac := (days - whole) + j.Frac
	extra := math.Floor(frac)
	frac -= extra
	ns := math.Round(frac * secondsPerDay * 1e9)
	return time.Unix(int64(whole+extra)*86400, int64(ns)).UTC()
}

// baryDelays returns the barycentric and heliocentric Rømer delays, seconds,
// at UTC Julian date u (for sidereal time) and TDB Julian date tdb (for the
// positions). A nil site means the geocentre.
func baryDelays(site *Site, st Star, u, tdb JD2) (bary, helio float64) {
	jde := tdb.Float()
	earthHelio, sunBary := baryEarthSun(jde)

	// Ecliptic of date → mean equator of date, Meeus (13.4) as a rotation
	// about the x axis by the mean obliquity.
	se, ce := nutation.MeanObliquity(jde).Sincos()
	eq := func(v [3]float64) [3]float64 {
		return [3]float64{v[0], v[1]*ce - v[2]*se, v[1]*se + v[2]*ce}
	}
	helioEq := eq(earthHelio)
	sunEq := eq(sunBary)

	var obs [3]float64
	if site != nil {
		obs = baryObservatory(*site, u)
	}
	n := baryStarDirection(st, jde)
	dot := func(v [3]float64) float64 { return v[0]*n[0] + v[1]*n[1] + v[2]*n[2] }
	helioAU := dot(helioEq) + dot(obs)
	baryAU := helioAU + dot(sunEq)
	return baryAU * AULightSeconds, helioAU * AULightSeconds
}

// baryEarthSun returns the Earth's heliocentric position and the Sun's
// barycentric position, au, in the mean ecliptic and equinox of date, at TDB
// Julian date jde.
func baryEarthSun(jde float64) (earthHelio, sunBary [3]float64) {
	T := (jde - J2000) / 36525
	// Earth–Moon barycentre: opposite the Sun's geometric longitude of date,
	// Meeus (25.2)–(25.5); latitude 0 (the ecliptic is the EMB's orbit plane).
	lon, _ := solar.True(T)
	R := solar.Radius(T)
	dLon, dR := baryEarthPerturbations(jde)
	lon += dLon
	R += dR
	sl, cl := lon.Sincos()
	emb := [3]float64{-R * cl, -R * sl, 0}

	// Earth = EMB − r_Moon·M☾/(M⊕+M☾), geocentric Moon from Meeus ch. 47.
	λ, β, distKm := moonposition.Position(jde)
	sλ, cλ := λ.Sincos()
	sβ, cβ := β.Sincos()
	k := distKm / AUKm / (1 + EarthMoonMassRatio)
	earthHelio = [3]float64{emb[0] - k*cβ*cλ, emb[1] - k*cβ*sλ, emb[2] - k*sβ}

	// Sun about the barycentre: −Σ mᵢ rᵢ / (1 + Σ mᵢ).
	sum := [3]float64{baryEMBMass * emb[0], baryEMBMass * emb[1], 0}
	mass := 1 + baryEMBMass
	var el planetelements.Elements
	for _, p := range baryPlanets {
		planetelements.Mean(p.index, jde, &el)
		r := baryEllipse(&el)
		for i := range sum {
			sum[i] += p.mass * r[i]
		}
		mass += p.mass
	}
	for i := range sum {
		sunBary[i] = -sum[i] / mass
	}
	return earthHelio, sunBary
}

// baryEarthPerturbations returns the largest periodic perturbations of the
// Sun's geocentric longitude (radians) and distance (au) by Venus (two terms,
// periods 584 d and 292 d) and Jupiter (399 d), and the long-period term:
// Meeus, Astronomical Formulae for Calculators, 4th ed. (1988), ch. 18 (from
// memory; the coefficients agree with several independent public
// implementations and remove the 584-, 292- and 399-day terms, 4.8″, 5.5″
// and 7.1″, from the residuals against ERFA epv00). Arguments in Julian
// centuries from 1900 January 0.5 (JD 2415020.0), as in that book. The
// Moon's term (6.4″, the Earth's monthly motion about the Earth–Moon
// barycentre) is left out: baryEarthSun applies the Moon's actual position.
func baryEarthPerturbations(jde float64) (dLon unit.Angle, dR float64) {
	T := (jde - 2415020.0) / 36525
	sc := func(a, b float64) (float64, float64) { return math.Sincos((a + b*T) * math.Pi / 180) }
	sA, cA := sc(153.23, 22518.7541)
	sB, cB := sc(216.57, 45037.5082)
	sC, cC := sc(312.69, 32964.3577)
	sE, _ := sc(231.19, 20.20)
	sH, _ := sc(353.40, 65928.7155)
	dLon = unit.AngleFromDeg(0.00134*cA + 0.00154*cB + 0.00200*cC + 0.00178*sE)
	dR = 0.00000543*sA + 0.00001575*sB + 0.00001627*sC + 0.00000927*sH
	return dLon, dR
}

// baryEllipse returns the heliocentric rectangular ecliptic position, au, of
// a body on the unperturbed ellipse of its mean elements (same frame as the
// elements). Kepler's equation by meeus kepler.Kepler2 (Meeus (30.7)), true
// anomaly and radius by Meeus (30.1), (30.2); orientation as in Meeus (33.x)
// with the ecliptic as reference plane.
func baryEllipse(el *planetelements.Elements) [3]float64 {
	M := (el.Lon - el.Peri).Mod1()
	E, err := kepler.Kepler2(el.Ecc, M, 14)
	if err != nil { // not reached for planetary eccentricities (< 0.21)
		E = kepler.Kepler3(el.Ecc, M)
	}
	ν := kepler.True(E, el.Ecc)
	r := kepler.Radius(E, el.Ecc, el.Axis)
	u := ν + el.Peri - el.Node // argument of latitude
	su, cu := u.Sincos()
	sΩ, cΩ := el.Node.Sincos()
	si, ci := el.Inc.Sincos()
	return [3]float64{
		r * (cΩ*cu - sΩ*su*ci),
		r * (sΩ*cu + cΩ*su*ci),
		r * su * si,
	}
}

// baryObservatory returns the observatory's geocentric position, au, in the
// equator of date: Meeus (11.3) for ρ sin φ′, ρ cos φ′ (Earth76 ellipsoid),
// rotated by the local mean sidereal time (meeus sidereal.Mean, Meeus ch. 12,
// with UT1 ≈ UTC; longitude east-positive).
func baryObservatory(s Site, u JD2) [3]float64 {
	rhoSin, rhoCos := s.geocentric()
	θ := sidereal.Mean(u.Float()).Angle() + unit.AngleFromDeg(s.LonEastDeg)
	sθ, cθ := θ.Sincos()
	k := globe.Earth76.Er / AUKm
	return [3]float64{k * rhoCos * cθ, k * rhoCos * sθ, k * rhoSin}
}

// baryStarDirection returns the unit vector towards st in the mean equator
// and equinox of TDB Julian date jde: ICRS position moved by proper motion
// from its coordinate epoch and precessed, Meeus (21.2)–(21.4) via meeus precess.Position
// (epochs in Julian years).
func baryStarDirection(st Star, jde float64) [3]float64 {
	st = st.atJ2000() // coordinates at another epoch: moved to J2000.0 first
	from := coord.Equatorial{RA: unit.RAFromDeg(st.RADeg), Dec: unit.AngleFromDeg(st.DecDeg)}
	epoch := 2000 + (jde-J2000)/365.25
	var mRA unit.HourAngle
	if c := math.Cos(from.Dec.Rad()); c > 1e-9 {
		mRA = unit.HourAngle(unit.AngleFromSec(st.PMRAmasyr / 1000 / c).Rad())
	}
	mDec := unit.AngleFromSec(st.PMDecmasyr / 1000)
	var to coord.Equatorial
	precess.Position(&from, &to, 2000, epoch, mRA, mDec)
	sa, ca := to.RA.Sincos()
	sd, cd := to.Dec.Sincos()
	return [3]float64{cd * ca, cd * sa, sd}
}

// baryValidateStar reports an out-of-range star position as an *InputError.
func baryValidateStar(st Star) error {
	switch {
	case !finite(st.RADeg) || st.RADeg < 0 || st.RADeg >= 360:
		return &InputError{"ra", fmtNum(st.RADeg), "0 ≤ RA < 360 degrees (ICRS)"}
	case !finite(st.DecDeg) || st.DecDeg < -90 || st.DecDeg > 90:
		return &InputError{"dec", fmtNum(st.DecDeg), "−90..90 degrees (ICRS)"}
	case !finite(st.PMRAmasyr) || math.Abs(st.PMRAmasyr) > 1e5:
		return &InputError{"pm_ra", fmtNum(st.PMRAmasyr), "−100000..100000 mas/yr (μα cos δ)"}
	case !finite(st.PMDecmasyr) || math.Abs(st.PMDecmasyr) > 1e5:
		return &InputError{"pm_dec", fmtNum(st.PMDecmasyr), "−100000..100000 mas/yr"}
	case !finite(st.EpochJY) || st.EpochJY != 0 && (st.EpochJY < 1800 || st.EpochJY > 2200):
		return &InputError{"coord_epoch", fmtNum(st.EpochJY), "a Julian epoch J1800.0..J2200.0 (e.g. J2016.0), or empty for J2000.0"}
	}
	return nil
}
