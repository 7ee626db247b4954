package ephem

import (
	"math"
	"time"

	"github.com/soniakeys/meeus/v3/nutation"
	"github.com/soniakeys/meeus/v3/sidereal"
)

// Sidereal time. Meeus ch. 12 (IAU 1982 expression, (12.4)), with the
// equation of the equinoxes Δψ·cos ε from ch. 22 for apparent sidereal time,
// via meeus sidereal.Mean and sidereal.Apparent. UT1 = UTC is assumed (see
// timescale.go): the error is at most 0.9 s of time.

// GMSTHours returns the Greenwich mean sidereal time at instant t, in hours,
// 0 ≤ GMST < 24. Meeus (12.4), via meeus sidereal.Mean; UT1 = UTC.
func GMSTHours(t time.Time) float64 {
	return wrapHours(sidereal.Mean(JDUTC(t).Float()).Hour())
}

// GASTHours returns the Greenwich apparent sidereal time at instant t, in
// hours, 0 ≤ GAST < 24: mean sidereal time plus the nutation in right
// ascension Δψ·cos ε. Meeus ch. 12 and (22.A), via meeus sidereal.Apparent;
// UT1 = UTC.
func GASTHours(t time.Time) float64 {
	return wrapHours(sidereal.Apparent(JDUTC(t).Float()).Hour())
}

// LASTHours returns the local apparent sidereal time at the site at instant
// t, in hours, 0 ≤ LAST < 24: GAST plus the east longitude. Meeus ch. 12.
func (s Site) LASTHours(t time.Time) float64 {
	return wrapHours(GASTHours(t) + s.LonEastDeg/15)
}

// lastRad returns the local apparent sidereal time in radians, [0, 2π).
func (s Site) lastRad(t time.Time) float64 {
	return s.LASTHours(t) * math.Pi / 12
}

// Nutation returns the nutation in longitude Δψ and in obliquity Δε, in
// arcseconds, and the true obliquity of the ecliptic ε = ε0 + Δε, in degrees,
// at the TT Julian date jdTT. Meeus ch. 22: the terms of the IAU 1980 theory
// of 0.0003″ and more (table 22.A, meeus nutation.Nutation) and the mean
// obliquity (22.2) (meeus nutation.MeanObliquity). The IAU 1980 theory itself
// departs from the current IAU 2000A model by a few hundredths of an
// arcsecond (from memory).
func Nutation(jdTT float64) (dPsiArcsec, dEpsArcsec, trueObliquityDeg float64) {
	dPsi, dEps := nutation.Nutation(jdTT)
	eps := nutation.MeanObliquity(jdTT) + dEps
	return dPsi.Sec(), dEps.Sec(), eps.Deg()
}

// wrapHours reduces h to [0, 24).
func wrapHours(h float64) float64 {
	h = math.Mod(h, 24)
	if h < 0 {
		h += 24
	}
	if h >= 24 { // −tiny + 24 rounds to 24
		h = 0
	}
	return h
}

// wrapDeg360 reduces d to [0, 360).
func wrapDeg360(d float64) float64 {
	d = math.Mod(d, 360)
	if d < 0 {
		d += 360
	}
	if d >= 360 {
		d = 0
	}
	return d
}

// wrapPi reduces an angle in radians to [−π, π).
func wrapPi(x float64) float64 {
	x = math.Mod(x+math.Pi, 2*math.Pi)
	if x < 0 {
		x += 2 * math.Pi
	}
	if x >= 2*math.Pi {
		x = 0
	}
	return x - math.Pi
}

const (
	degToRad    = math.Pi / 180
	radToDeg    = 180 / math.Pi
	arcsecToRad = math.Pi / (180 * 3600)
	masToRad    = arcsecToRad / 1000
)
