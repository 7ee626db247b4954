package ephem

import (
	"math"

	"github.com/soniakeys/meeus/v3/kepler"
	"github.com/soniakeys/unit"
)

// RVShape returns the primary's radial-velocity curve of unit semi-amplitude
// and its slope at mean phase m (M/2π, cycles, any real value) for an orbit
// of eccentricity ecc (0 ≤ e < 1) and the primary's argument of periastron
// omegaDeg (degrees):
//
//	g(m) = cos(ν + ω) + e·cos ω,  dg/dm = −2π·sin(ν + ω)·(1 + e cos ν)²/(1 − e²)^{3/2}
//
// so that the velocity is v = γ + K·g (the standard Keplerian
// radial-velocity curve, e.g. Hilditch, An Introduction to Close Binary
// Stars (2001), ch. 2, cited from memory; the slope from Kepler's second law,
// dν/dM = (1 + e cos ν)²/(1 − e²)^{3/2}). The
// eccentric anomaly solves Kepler's equation M = E − e sin E by meeus
// kepler.Kepler2 (Meeus (30.7)), with the bisection kepler.Kepler3 when it
// does not converge; ν by Meeus (30.1) (kepler.True). For e = 0 it is
// cos(2πm + ω). Bad input gives an *InputError naming "ecc" or "omega".
func RVShape(ecc, omegaDeg, m float64) (g, slope float64, err error) {
	if !finite(ecc) || ecc < 0 || ecc >= 1 {
		return 0, 0, &InputError{"ecc", fmtNum(ecc), "an eccentricity 0 ≤ e < 1"}
	}
	if !finite(omegaDeg) || omegaDeg < -360 || omegaDeg > 360 {
		return 0, 0, &InputError{"omega", fmtNum(omegaDeg), "the primary's argument of periastron, −360..360 degrees"}
	}
	if !finite(m) {
		return 0, 0, &InputError{"phase", fmtNum(m), "a finite mean phase, cycles"}
	}
	ω := omegaDeg * math.Pi / 180
	M := 2 * math.Pi * (m - math.Floor(m))
	ν := M
	if ecc > 0 {
		E, kerr := kepler.Kepler2(ecc, unit.Angle(M), 12)
		if kerr != nil {
			E = kepler.Kepler3(ecc, unit.Angle(M))
		}
		ν = kepler.True(E, ecc).Rad()
	}
	s, c := math.Sincos(ν + ω)
	q := 1 + ecc*math.Cos(ν)
	r := 1 - ecc*ecc
	return c + ecc*math.Cos(ω), -2 * math.Pi * s * q * q / (r * math.Sqrt(r)), nil
}

// MeanPhaseAtT0 returns M/2π (cycles, 0 ≤ m < 1), the mean anomaly's share
// of a cycle, at the ephemeris' T0: phase φ of e is mean phase φ + m. It is
// the geometry of the event notes above (conjunctions at u = 90° and 270°).
func (e Ephemeris) MeanPhaseAtT0() float64 { return orbitRefPhase(e) }
