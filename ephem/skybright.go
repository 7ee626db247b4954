package ephem

import (
	"math"
	"strconv"
	"strings"
	"time"
)

// Band is a photometric passband: the Johnson–Cousins U B V R I (Vega
// magnitudes) or the SDSS g r i z (AB magnitudes). The names are
// case-sensitive, as the trade writes them (R is Cousins R, r is SDSS r).
type Band string

// The passbands phasecast knows.
const (
	BandU Band = "U"
	BandB Band = "B"
	BandV Band = "V"
	BandR Band = "R"
	BandI Band = "I"
	Bandg Band = "g"
	Bandr Band = "r"
	Bandi Band = "i"
	Bandz Band = "z"
)

// bandInfo holds what the models need of one passband.
type bandInfo struct {
	// sunMinusV is the Sun's colour (band − V), mag: the colour given to
	// scattered moonlight and twilight, which are sunlight (the journals'
	// volume and page numbers in this table are from memory). UBVRI: Patat,
	// Ugolnikov & Postylyakov (2006, A&A 455, 385), caption of Fig. 8 (U−B
	// 0.13, B−V 0.65, V−R 0.52, V−I 0.81). g r i z: the Sun's absolute AB
	// magnitudes of Willmer (2018, ApJS 236, 47), M_V 4.81, g 5.11, r 4.65,
	// i 4.53, z 4.50 — from memory.
	sunMinusV float64
	// fnu0Jy is the flux density of a 0-magnitude star, Jy: UBVRI from
	// Bessell, Castelli & Plez (1998, A&A 333, 231), Table A2 (1790, 4063,
	// 3636, 3064, 2416 Jy) — from memory; g r i z are AB, 3631 Jy by the
	// definition of the AB system (Oke & Gunn 1983).
	fnu0Jy float64
	// dLambdaOverLambda is the passband's FWHM over its effective
	// wavelength: UBVRI from Bessell (2005, ARA&A 43, 293), Table 1 (U
	// 3600/660 Å, B 4380/940, V 5450/880, R 6410/1380, I 7980/1490); g r i z
	// from Fukugita et al. (1996, AJ 111, 1748) (g 4686/1380, r 6165/1370,
	// i 7481/1530, z 8931/950) — from memory.
	dLambdaOverLambda float64
	// darkZenith is the default dark-sky zenith brightness, mag/arcsec²:
	// UBVRI are the zenith-corrected dark-time means at Paranal of Patat
	// (2003, A&A 400, 1183), abstract (22.3, 22.6, 21.6, 20.9, 19.7); g r i z
	// are common practice for a dark site (22.0, 21.1, 20.3, 19.0).
	darkZenith float64
	// extinction is the default extinction coefficient, mag/airmass, common
	// practice for a good site (U 0.55, B 0.25, V 0.15, R 0.10, I 0.07;
	// g 0.20, r 0.12, i 0.08, z 0.06).
	extinction float64
}

var bands = map[Band]bandInfo{
	BandU: {sunMinusV: 0.13 + 0.65, fnu0Jy: 1790, dLambdaOverLambda: 660.0 / 3600, darkZenith: 22.3, extinction: 0.55},
	BandB: {sunMinusV: 0.65, fnu0Jy: 4063, dLambdaOverLambda: 940.0 / 4380, darkZenith: 22.6, extinction: 0.25},
	BandV: {sunMinusV: 0, fnu0Jy: 3636, dLambdaOverLambda: 880.0 / 5450, darkZenith: 21.6, extinction: 0.15},
	BandR: {sunMinusV: -0.52, fnu0Jy: 3064, dLambdaOverLambda: 1380.0 / 6410, darkZenith: 20.9, extinction: 0.10},
	BandI: {sunMinusV: -0.81, fnu0Jy: 2416, dLambdaOverLambda: 1490.0 / 7980, darkZenith: 19.7, extinction: 0.07},
	Bandg: {sunMinusV: 5.11 - 4.81, fnu0Jy: 3631, dLambdaOverLambda: 1380.0 / 4686, darkZenith: 22.0, extinction: 0.20},
	Bandr: {sunMinusV: 4.65 - 4.81, fnu0Jy: 3631, dLambdaOverLambda: 1370.0 / 6165, darkZenith: 21.1, extinction: 0.12},
	Bandi: {sunMinusV: 4.53 - 4.81, fnu0Jy: 3631, dLambdaOverLambda: 1530.0 / 7481, darkZenith: 20.3, extinction: 0.08},
	Bandz: {sunMinusV: 4.50 - 4.81, fnu0Jy: 3631, dLambdaOverLambda: 950.0 / 8931, darkZenith: 19.0, extinction: 0.06},
}

// BandNames lists the accepted passbands in their usual order.
const BandNames = "U, B, V, R, I, g, r, i or z"

// ParseBand reads a passband name (surrounding blanks ignored; case matters:
// R and r are different bands) and reports an unknown one as an *InputError.
func ParseBand(s string) (Band, error) {
	b := Band(strings.TrimSpace(s))
	if _, ok := bands[b]; !ok {
		return "", &InputError{"band", strconv.Quote(s), BandNames + " (case matters: R is Cousins, r is SDSS)"}
	}
	return b, nil
}

// DefaultDarkZenithMag returns the default dark-sky zenith brightness of the
// band, mag/arcsec² (see bandInfo.darkZenith for the sources); 0 for an
// unknown band.
func (b Band) DefaultDarkZenithMag() float64 { return bands[b].darkZenith }

// DefaultExtinction returns the default extinction coefficient of the band,
// mag/airmass, common practice for a good site; 0 for an unknown band.
func (b Band) DefaultExtinction() float64 { return bands[b].extinction }

// PhotonsPerSecondCm2 returns the photon rate of a 0-magnitude star above the
// atmosphere across the band, photons s⁻¹ cm⁻², from the band's zero-point
// flux density f_ν0 and width: f_ν0 (Δλ/λ) / h (a flat f_ν across the band;
// the band tables are from memory, see bandInfo).
func (b Band) PhotonsPerSecondCm2() float64 {
	const hCGS = 6.62607015e-27 // Planck constant, erg s (exact, SI 2019)
	bi := bands[b]
	return bi.fnu0Jy * 1e-23 * bi.dLambdaOverLambda / hCGS
}

// KSAirmass is the airmass of Krisciunas & Schaefer (1991), eq. 3:
// X = (1 − 0.96 sin²Z)^−½ for zenith distance Z in degrees, 0..90 (X = 1 at
// the zenith, 5 at the horizon). It is the optical path of a scattering
// layer of finite height, used throughout their model; it differs from the
// Kasten & Young airmass of Airmass by less than 2% above 30° altitude.
func KSAirmass(zenithDeg float64) float64 {
	s := math.Sin(zenithDeg * degToRad)
	return 1 / math.Sqrt(1-0.96*s*s)
}

// NanolambertsFromV converts a V surface brightness, mag/arcsec², to
// nanolamberts: B = 34.08 exp(20.7233 − 0.92104 V), Krisciunas & Schaefer
// (1991), eq. 1.
func NanolambertsFromV(v float64) float64 { return 34.08 * math.Exp(20.7233-0.92104*v) }

// VFromNanolamberts is the inverse of NanolambertsFromV, mag/arcsec²; +Inf
// for b ≤ 0.
func VFromNanolamberts(b float64) float64 {
	if b <= 0 {
		return math.Inf(1)
	}
	return (20.7233 - math.Log(b/34.08)) / 0.92104
}

// MoonIlluminance is the Moon's illuminance outside the atmosphere at phase
// angle alphaDeg (0 = full, 180 = new), in the units of Krisciunas &
// Schaefer (1991), eq. 20: I* = 10^(−0.4 (3.84 + 0.026|α| + 4×10⁻⁹ α⁴))
// (the Moon's V magnitude, from Allen, with the opposition surge left out as
// they do).
func MoonIlluminance(alphaDeg float64) float64 {
	a := math.Abs(alphaDeg)
	return math.Pow(10, -0.4*(3.84+0.026*a+4e-9*a*a*a*a))
}

// KSScattering is the scattering function of Krisciunas & Schaefer (1991),
// eq. 21, at scattering angle rhoDeg (Moon–sky separation, degrees):
// f(ρ) = 10^5.36 (1.06 + cos²ρ) + 10^(6.15 − ρ/40), the Rayleigh term and
// the Mie (aerosol) term. Their eq. 21 is fitted for ρ ≥ 10°; below it the
// Mie term keeps rising.
func KSScattering(rhoDeg float64) float64 {
	c := math.Cos(rhoDeg * degToRad)
	return math.Pow(10, 5.36)*(1.06+c*c) + math.Pow(10, 6.15-rhoDeg/40)
}

// KSMoonlight is the sky brightness added by scattered moonlight,
// nanolamberts, Krisciunas & Schaefer (1991), eq. 15:
// B_moon = f(ρ) I* 10^(−0.4 k X(Zm)) [1 − 10^(−0.4 k X(Z))], with the phase
// angle alphaDeg (0 full .. 180 new), the Moon–sky separation rhoDeg, the
// zenith distances of the Moon (moonZenithDeg) and of the sky position
// (zenithDeg), degrees, and the extinction coefficient k, mag/airmass. A
// Moon at or below the horizon (moonZenithDeg ≥ 90) adds nothing.
func KSMoonlight(alphaDeg, rhoDeg, moonZenithDeg, zenithDeg, k float64) float64 {
	if moonZenithDeg >= 90 {
		return 0
	}
	return KSScattering(rhoDeg) * MoonIlluminance(alphaDeg) *
		math.Pow(10, -0.4*k*KSAirmass(moonZenithDeg)) *
		(1 - math.Pow(10, -0.4*k*KSAirmass(zenithDeg)))
}

// KSDarkSky is the dark-sky brightness at zenith distance zenithDeg, in the
// units of bZen, Krisciunas & Schaefer (1991), eq. 2:
// B = B_zen 10^(−0.4 k (X − 1)) X, with X of eq. 3 (KSAirmass): the airglow
// path grows as X while the light is extinguished by k (X − 1).
func KSDarkSky(bZen, zenithDeg, k float64) float64 {
	x := KSAirmass(zenithDeg)
	return bZen * math.Pow(10, -0.4*k*(x-1)) * x
}

// TwilightNanolamberts is the brightness of the twilight sky, nanolamberts
// in V, from the twilight term of Schaefer's sky-brightness model (Schaefer
// 1998, "To the visual limits", Sky & Telescope 95(5), 57, program
// VISLIMIT): B = 10^(−0.4 (M_S − M_0 + 32.5 − h_S − Z/(360 k))) (100/R_S)
// [1 − 10^(−0.4 k X)] in his brightness units (1 nL = 1.02×10⁻¹⁵ of them),
// with M_S = −26.74 (the Sun, V), M_0 = −11.05, the Sun's altitude h_S ≤ 0
// and its separation R_S from the sky position, degrees, the zenith distance
// Z of the sky position, degrees, and X its airmass (KSAirmass). The
// constants were read from a public copy of the program, not from the
// magazine. The sky dims by 1 mag per degree of solar depression: at −18°
// the term is about 2% of a dark V sky. R_S below 1° is taken as 1°.
func TwilightNanolamberts(sunAltDeg, sunSepDeg, zenithDeg, k float64) float64 {
	const ms, m0, unitsPerNL = -26.74, -11.05, 1.02e-15
	rs := math.Max(sunSepDeg, 1)
	b := math.Pow(10, -0.4*(ms-m0+32.5-sunAltDeg-zenithDeg/(360*k)))
	b *= (100 / rs) * (1 - math.Pow(10, -0.4*k*KSAirmass(zenithDeg)))
	return b / unitsPerNL
}

// SkyConditions is where and when a sky brightness is wanted: the geometry
// of the target, the Moon and the Sun, and the site's sky in the band.
type SkyConditions struct {
	Band              Band
	ZenithDeg         float64 // zenith distance of the sky position, degrees, 0..90
	MoonZenithDeg     float64 // zenith distance of the Moon, degrees, 0..180 (≥ 90: below the horizon)
	MoonPhaseAngleDeg float64 // Moon's phase angle, degrees, 0 (full) .. 180 (new)
	MoonSepDeg        float64 // Moon–target separation, degrees, 0..180
	SunAltDeg         float64 // Sun's altitude, degrees, −90..0 (the model is for night and twilight only)
	SunSepDeg         float64 // Sun–target separation, degrees, 0..180
	Extinction        float64 // extinction coefficient in Band, mag/airmass, 0 < k ≤ 2
	DarkZenithMag     float64 // dark-sky zenith brightness in Band, mag/arcsec², 10..25
}

// Sky is a sky surface brightness and its parts, mag/arcsec² in the band of
// its SkyConditions. A part that contributes nothing is reported as 0 with
// its OK flag false (never an infinite magnitude).
type Sky struct {
	Mag         float64 // total, mag/arcsec²
	DarkMag     float64 // dark sky (airglow, zodiacal and starlight) at this zenith distance
	MoonMag     float64 // scattered moonlight alone
	MoonOK      bool    // false when the Moon is below the horizon
	TwilightMag float64 // twilight alone
	TwilightOK  bool    // false when the Sun is more than 24° below the horizon
	MoonDeltaV  float64 // brightening by the Moon, mag (dark − dark+moon), ≥ 0; Krisciunas & Schaefer's ΔV
}

// Validate reports the first out-of-range field as an *InputError.
func (c SkyConditions) Validate() error {
	if _, ok := bands[c.Band]; !ok {
		return &InputError{"band", strconv.Quote(string(c.Band)), BandNames}
	}
	checks := []struct {
		field    string
		v        float64
		lo, hi   float64
		accepted string
	}{
		{"zenith distance", c.ZenithDeg, 0, 90, "0..90 degrees (the target above the horizon)"},
		{"moon zenith distance", c.MoonZenithDeg, 0, 180, "0..180 degrees"},
		{"moon phase angle", c.MoonPhaseAngleDeg, 0, 180, "0 (full) .. 180 (new) degrees"},
		{"moon separation", c.MoonSepDeg, 0, 180, "0..180 degrees"},
		{"sun altitude", c.SunAltDeg, -90, 0, "−90..0 degrees (night and twilight; the model does not cover daytime)"},
		{"sun separation", c.SunSepDeg, 0, 180, "0..180 degrees"},
		{"extinction", c.Extinction, 1e-6, 2, "0 < k ≤ 2 mag/airmass"},
		{"dark sky", c.DarkZenithMag, 10, 25, "10..25 mag/arcsec²"},
	}
	for _, ch := range checks {
		if !finite(ch.v) || ch.v < ch.lo || ch.v > ch.hi {
			return &InputError{ch.field, fmtNum(ch.v), ch.accepted}
		}
	}
	return nil
}

// twilightFloorDeg is the solar depression below which twilight is taken as
// nil: at −24° Schaefer's term is below 10⁻⁴ of a dark V sky.
const twilightFloorDeg = -24

// SkyBrightness returns the sky surface brightness for c: the dark sky rising
// with airmass (Krisciunas & Schaefer 1991, eq. 2), scattered moonlight
// (their eq. 15, 20, 21) and twilight (TwilightNanolamberts), added as
// fluxes. The models are in V; in another band the dark sky starts from that
// band's zenith brightness and moonlight and twilight, being sunlight, are
// given the Sun's colour in that band (bandInfo.sunMinusV), each computed
// with the band's own extinction coefficient. This colour scaling is common
// practice; real moonlit skies are somewhat bluer than the Sun (Rayleigh
// scattering). Krisciunas & Schaefer state an accuracy of 8–23% for the
// moonlight model.
func SkyBrightness(c SkyConditions) (Sky, error) {
	if err := c.Validate(); err != nil {
		return Sky{}, err
	}
	bi := bands[c.Band]
	x := KSAirmass(c.ZenithDeg)
	dark := c.DarkZenithMag + c.Extinction*(x-1) - 2.5*math.Log10(x) // eq. 2 in magnitudes
	flux := math.Pow(10, -0.4*dark)
	s := Sky{DarkMag: dark}
	if b := KSMoonlight(c.MoonPhaseAngleDeg, c.MoonSepDeg, c.MoonZenithDeg, c.ZenithDeg, c.Extinction); b > 0 {
		s.MoonMag, s.MoonOK = VFromNanolamberts(b)+bi.sunMinusV, true
		flux += math.Pow(10, -0.4*s.MoonMag)
	}
	if c.SunAltDeg > twilightFloorDeg {
		b := TwilightNanolamberts(c.SunAltDeg, c.SunSepDeg, c.ZenithDeg, c.Extinction)
		s.TwilightMag, s.TwilightOK = VFromNanolamberts(b)+bi.sunMinusV, true
		flux += math.Pow(10, -0.4*s.TwilightMag)
	}
	s.Mag = -2.5 * math.Log10(flux)
	if s.MoonOK {
		s.MoonDeltaV = dark + 2.5*math.Log10(math.Pow(10, -0.4*dark)+math.Pow(10, -0.4*s.MoonMag))
	}
	return s, nil
}

// MoonPhaseAngleDeg returns the Moon's phase angle, degrees, 0 (full) .. 180
// (new), from its illuminated fraction k: k = (1 + cos i)/2, Meeus (48.1).
func MoonPhaseAngleDeg(k float64) float64 {
	return math.Acos(math.Max(-1, math.Min(1, 2*k-1))) * radToDeg
}

// SkyConditionsAt fills the geometry of SkyConditions for target st seen
// from site at instant t (UTC), with Observe for the target, the Moon and the
// Sun's altitude, SunApparent for the Sun's direction, and the Moon's phase
// angle from its illuminated fraction; Band, Extinction and DarkZenithMag are
// the caller's. Zenith distances are airless (90° − altitude). It also returns
// the SkyPoint it used. The conditions fail Validate when the target is below
// the horizon or the Sun above it.
func SkyConditionsAt(site Site, st Star, t time.Time, band Band, k, darkZenithMag float64) (SkyConditions, SkyPoint) {
	p := Observe(site, st, t)
	ra, dec := ApparentPlace(st, t)
	sunRA, sunDec, _ := SunApparent(t)
	return SkyConditions{
		Band:              band,
		ZenithDeg:         90 - p.AltDeg,
		MoonZenithDeg:     90 - p.MoonAltDeg,
		MoonPhaseAngleDeg: MoonPhaseAngleDeg(p.MoonIlluminated),
		MoonSepDeg:        p.MoonSepDeg,
		SunAltDeg:         p.SunAltDeg,
		SunSepDeg:         SeparationDeg(ra, dec, sunRA, sunDec),
		Extinction:        k,
		DarkZenithMag:     darkZenithMag,
	}, p
}
