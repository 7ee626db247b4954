package ephem

import (
	"math"

	"github.com/soniakeys/meeus/v3/refraction"
	"github.com/soniakeys/unit"
)

// Atmospheric refraction (Meeus ch. 16) and airmass.

// refractionFloorDeg is the airless altitude, degrees, below which
// RefractionDeg stops following Saemundsson's formula. The formula's angle
// h + 10.3/(h + 5.11) has its minimum at h = √10.3 − 5.11 ≈ −1.90°, where the
// refraction peaks at about 44.6′; below it the formula turns back and then
// diverges at h = −5.11°. Holding the value reached there keeps the
// refraction continuous with a continuous slope. Bodies that low are below
// the horizon, where no formula describes the air (common practice).
var refractionFloorDeg = math.Sqrt(10.3) - 5.11

// bennettFloorDeg is the apparent altitude, degrees, below which
// RefractionFromApparentDeg holds its value (see refractionFloorDeg).
var bennettFloorDeg = math.Sqrt(7.31) - 4.4

// RefractionDeg returns the refraction, degrees, to ADD to an airless (true)
// altitude altAirlessDeg to obtain the apparent (refracted) altitude, for
// pressure pressureHPa (hPa) and temperature tempC (°C).
//
// Saemundsson's formula, Meeus (16.4), via meeus refraction.Saemundsson,
// scaled by (P/1010)·(283/(273 + T)) (Meeus p. 107). Consistent with
// Bennett's formula (16.3) to about 4″ (Meeus); the real atmosphere near the
// horizon varies by far more. Within 0.11° of the zenith the formula turns
// slightly negative (−0.12″ at the zenith); that is left as the book has it.
// Below −1.90° airless the value there is held (see refractionFloorDeg).
// P = 0 gives 0 (no air). Accepted ranges are those of Site.Validate:
// 0 ≤ P ≤ 1100, −90 ≤ T ≤ 60.
func RefractionDeg(altAirlessDeg, pressureHPa, tempC float64) float64 {
	return refractionScaled(altAirlessDeg, atmosphereScale(pressureHPa, tempC))
}

// refractionScaled is RefractionDeg for atmosphere scale s (atmosphereScale).
func refractionScaled(altAirlessDeg, s float64) float64 {
	h := math.Max(altAirlessDeg, refractionFloorDeg)
	return refraction.Saemundsson(unit.AngleFromDeg(h)).Deg() * s
}

// RefractionFromApparentDeg returns the refraction, degrees, to SUBTRACT from
// an apparent (observed) altitude altApparentDeg to obtain the airless
// altitude: Bennett's formula, Meeus (16.3), via meeus refraction.Bennett,
// accurate to 0.07′ from horizon to zenith for the standard atmosphere,
// scaled like RefractionDeg. Below the minimum of Bennett's angle
// h + 7.31/(h + 4.4), at h = √7.31 − 4.4 ≈ −1.70° apparent, the value there is
// held, as in RefractionDeg. Useful for horizon profiles measured on the sky.
func RefractionFromApparentDeg(altApparentDeg, pressureHPa, tempC float64) float64 {
	h := math.Max(altApparentDeg, bennettFloorDeg)
	return refraction.Bennett(unit.AngleFromDeg(h)).Deg() * atmosphereScale(pressureHPa, tempC)
}

// atmosphereScale is Meeus' scaling of refraction for pressure and
// temperature: (P/1010)·(283/(273 + T)), P in hPa, T in °C (Meeus p. 107).
func atmosphereScale(pressureHPa, tempC float64) float64 {
	if pressureHPa <= 0 {
		return 0
	}
	return pressureHPa / StandardPressureHPa * 283 / (273 + tempC)
}

// RefractedAltDeg returns the apparent altitude, degrees, of a body whose
// airless altitude is altAirlessDeg, with the site's pressure and temperature
// (the standard 1010 hPa, 10 °C when the site gives none).
func (s Site) RefractedAltDeg(altAirlessDeg float64) float64 {
	p, t := s.atmosphere()
	return altAirlessDeg + RefractionDeg(altAirlessDeg, p, t)
}

// Airmass returns the relative optical airmass X toward apparent (refracted)
// altitude altRefractedDeg, by the approximation formula of Kasten & Young
// (1989), Applied Optics 28, 4735, eq. 3:
//
//	X = 1 / (sin h + 0.50572 (h + 6.07995°)^−1.6364),  h in degrees
//
// (their zenith-angle form with z = 90° − h). X is 1 at the zenith (0.9997 by
// the formula), 2 near h = 30° and 37.92 on the horizon (their table gives
// 38.0868 there; from memory). The formula is for the ISO standard
// atmosphere at sea level; it ignores the site's altitude. ok is false, and
// x is 0, when the body is below the horizon (altRefractedDeg < 0), or the
// input is above 90° or not a number.
func Airmass(altRefractedDeg float64) (x float64, ok bool) {
	h := altRefractedDeg
	if !(h >= 0 && h <= 90) { // also NaN
		return 0, false
	}
	return 1 / (math.Sin(h*degToRad) + 0.50572*math.Pow(h+6.07995, -1.6364)), true
}
