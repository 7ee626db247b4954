package ephem

import (
	"fmt"
	"math"

	"github.com/soniakeys/meeus/v3/globe"
	"github.com/soniakeys/unit"
)

// Standard atmosphere for refraction (the values the project uses when a
// site gives none): 1010 hPa and 10 °C, as in Meeus ch. 16.
const (
	StandardPressureHPa = 1010.0
	StandardTempC       = 10.0
)

// Site is an observatory on the Earth. Longitude is east-positive (the one
// conversion to Meeus' west-positive convention is in (Site).globe).
type Site struct {
	LatDeg     float64 // geodetic latitude, degrees, north positive, −90..90
	LonEastDeg float64 // longitude, degrees, EAST positive, −180..180
	ElevM      float64 // height above the WGS84 ellipsoid (≈ sea level), m, −500..9000
	// PressureHPa and TempC set the refraction scaling. Zero pressure means
	// the standard atmosphere (StandardPressureHPa, StandardTempC).
	PressureHPa float64
	TempC       float64
}

// InputError reports a bad input value: which field, which value, and what is
// accepted. Messages read "lat: 95 is out of range; accepted −90..90 degrees".
type InputError struct {
	Field    string
	Value    string
	Accepted string
}

func (e *InputError) Error() string {
	return fmt.Sprintf("%s: %s is not accepted; accepted: %s", e.Field, e.Value, e.Accepted)
}

// NewSite validates and returns a Site with the standard atmosphere.
func NewSite(latDeg, lonEastDeg, elevM float64) (Site, error) {
	s := Site{LatDeg: latDeg, LonEastDeg: lonEastDeg, ElevM: elevM}
	return s, s.Validate()
}

// Validate reports the first out-of-range field of s as an *InputError.
func (s Site) Validate() error {
	switch {
	case !finite(s.LatDeg) || s.LatDeg < -90 || s.LatDeg > 90:
		return &InputError{"lat", fmtNum(s.LatDeg), "−90..90 degrees, north positive"}
	case !finite(s.LonEastDeg) || s.LonEastDeg < -180 || s.LonEastDeg > 180:
		return &InputError{"lon", fmtNum(s.LonEastDeg), "−180..180 degrees, east positive"}
	case !finite(s.ElevM) || s.ElevM < -500 || s.ElevM > 9000:
		return &InputError{"elev", fmtNum(s.ElevM), "−500..9000 metres"}
	case !finite(s.PressureHPa) || s.PressureHPa < 0 || s.PressureHPa > 1100:
		return &InputError{"pressure", fmtNum(s.PressureHPa), "0..1100 hPa (0 = standard 1010 hPa)"}
	case !finite(s.TempC) || s.TempC < -90 || s.TempC > 60:
		return &InputError{"temperature", fmtNum(s.TempC), "−90..60 °C"}
	}
	return nil
}

// globe returns the site in Meeus' convention: longitude WEST-positive.
// This is the only place phasecast flips the sign of longitude.
func (s Site) globe() globe.Coord {
	return globe.Coord{
		Lat: unit.AngleFromDeg(s.LatDeg),
		Lon: unit.AngleFromDeg(-s.LonEastDeg),
	}
}

// geocentric returns ρ sin φ′ and ρ cos φ′ in Earth equatorial radii
// (Meeus (11.3), via meeus globe.Earth76.ParallaxConstants).
func (s Site) geocentric() (rhoSinPhi, rhoCosPhi float64) {
	return globe.Earth76.ParallaxConstants(unit.AngleFromDeg(s.LatDeg), s.ElevM)
}

// atmosphere returns the pressure (hPa) and temperature (°C) for refraction.
func (s Site) atmosphere() (pHPa, tC float64) {
	if s.PressureHPa == 0 {
		return StandardPressureHPa, StandardTempC
	}
	return s.PressureHPa, s.TempC
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func fmtNum(x float64) string { return fmt.Sprintf("%g", x) }
