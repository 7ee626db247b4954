package ephem

import (
	"math"
	"strconv"
	"time"
)

// Detector is a telescope and CCD in one passband: what the CCD equation
// needs to turn a star's magnitude and the sky's brightness into electrons.
type Detector struct {
	Band      Band
	ApertureM float64 // clear aperture diameter, m, 0 < D ≤ 50
	// ZeroPointEPerS is the detected photo-electrons per second of a
	// 0-magnitude star above the atmosphere, all of its light, in Band,
	// 0 < ZP ≤ 1e14. When 0, it is computed from Throughput, the aperture
	// and the band's photon rate (Band.PhotonsPerSecondCm2).
	ZeroPointEPerS float64
	Throughput     float64 // total telescope + instrument + detector efficiency, 0 < τ ≤ 1; used when ZeroPointEPerS is 0
	ReadNoiseE     float64 // read noise, e⁻ rms per pixel, 0..1000
	DarkEPerSPix   float64 // dark current, e⁻ s⁻¹ per pixel, 0..10000
	PixelArcsec    float64 // pixel scale, arcsec per pixel, 0.01..100
	// RadiusArcsec is the radius of a circular extraction aperture, arcsec,
	// used when SlitWidthArcsec is 0; 0.05..600.
	RadiusArcsec float64
	// SlitWidthArcsec, when positive, makes the extraction a slit of this
	// width and SlitLengthArcsec along it (a rectangle of width × length);
	// 0.05..600 each.
	SlitWidthArcsec  float64
	SlitLengthArcsec float64
	SeeingArcsec     float64 // seeing FWHM at the zenith, arcsec, 0.1..20 (taken as the delivered image at any airmass)
}

// Validate reports the first out-of-range field as an *InputError.
func (d Detector) Validate() error {
	if _, ok := bands[d.Band]; !ok {
		return &InputError{"band", strconv.Quote(string(d.Band)), BandNames}
	}
	type check struct {
		field    string
		v        float64
		lo, hi   float64
		accepted string
	}
	checks := []check{
		{"aperture", d.ApertureM, 1e-3, 50, "0 < aperture ≤ 50 m"},
		{"read noise", d.ReadNoiseE, 0, 1000, "0..1000 e⁻ rms per pixel"},
		{"dark current", d.DarkEPerSPix, 0, 10000, "0..10000 e⁻/s per pixel"},
		{"pixel scale", d.PixelArcsec, 0.01, 100, "0.01..100 arcsec per pixel"},
		{"seeing", d.SeeingArcsec, 0.1, 20, "0.1..20 arcsec FWHM"},
	}
	if d.ZeroPointEPerS != 0 {
		checks = append(checks, check{"zero point", d.ZeroPointEPerS, 1e-6, 1e14, "0 < zero point ≤ 1e14 e⁻/s for a 0-mag star (or 0 with a throughput)"})
	} else {
		checks = append(checks, check{"throughput", d.Throughput, 1e-6, 1, "0 < throughput ≤ 1 (or give a zero point instead)"})
	}
	if d.SlitWidthArcsec != 0 {
		checks = append(checks,
			check{"slit width", d.SlitWidthArcsec, 0.05, 600, "0.05..600 arcsec (or 0 for a circular aperture)"},
			check{"slit length", d.SlitLengthArcsec, 0.05, 600, "0.05..600 arcsec extracted along the slit"})
	} else {
		checks = append(checks, check{"extraction radius", d.RadiusArcsec, 0.05, 600, "0.05..600 arcsec (or give a slit width)"})
	}
	for _, c := range checks {
		if !finite(c.v) || c.v < c.lo || c.v > c.hi {
			return &InputError{c.field, fmtNum(c.v), c.accepted}
		}
	}
	return nil
}

// ZeroPoint returns the detected e⁻/s of a 0-magnitude star above the
// atmosphere: ZeroPointEPerS when given, else the band's photon rate times
// the aperture's area π D²/4 times Throughput.
func (d Detector) ZeroPoint() float64 {
	if d.ZeroPointEPerS != 0 {
		return d.ZeroPointEPerS
	}
	areaCm2 := math.Pi * d.ApertureM * d.ApertureM / 4 * 1e4
	return d.Band.PhotonsPerSecondCm2() * areaCm2 * d.Throughput
}

// Pixels returns the number of pixels in the extraction, n_pix: π r²/p² for
// a circular aperture, w L/p² for a slit.
func (d Detector) Pixels() float64 {
	p2 := d.PixelArcsec * d.PixelArcsec
	if d.SlitWidthArcsec != 0 {
		return d.SlitWidthArcsec * d.SlitLengthArcsec / p2
	}
	return math.Pi * d.RadiusArcsec * d.RadiusArcsec / p2
}

// EnclosedFraction returns the fraction of a star's light inside the
// extraction for a Gaussian image of FWHM SeeingArcsec (σ = FWHM/2.3548):
// 1 − exp(−r²/2σ²) in a circle of radius r, erf(w/(2√2 σ)) erf(L/(2√2 σ))
// in a centred w × L slit (common practice; a Moffat profile has wider
// wings).
func (d Detector) EnclosedFraction() float64 {
	sigma := d.SeeingArcsec / (2 * math.Sqrt(2*math.Ln2))
	if d.SlitWidthArcsec != 0 {
		k := 2 * math.Sqrt2 * sigma
		return math.Erf(d.SlitWidthArcsec/k) * math.Erf(d.SlitLengthArcsec/k)
	}
	return 1 - math.Exp(-d.RadiusArcsec*d.RadiusArcsec/(2*sigma*sigma))
}

// CCDRates are the count rates of the CCD equation for one target and sky:
// everything S/N needs, per second.
type CCDRates struct {
	SourceEPerS  float64 // N* rate: the star's detected electrons per second inside the extraction
	SkyEPerSPix  float64 // N_S rate: sky electrons per second per pixel
	DarkEPerSPix float64 // N_D rate: dark electrons per second per pixel
	ReadNoiseE   float64 // N_R: read noise, e⁻ rms per pixel
	Pixels       float64 // n_pix
}

// ValidateMagnitude reports a magnitude outside −2..30 as an *InputError
// named field.
func ValidateMagnitude(field string, m float64) error {
	if !finite(m) || m < -2 || m > 30 {
		return &InputError{field, fmtNum(m), "−2..30 mag"}
	}
	return nil
}

// Rates returns the count rates for a star of magnitude mag (in d.Band,
// −2..30) seen at airmass x (1..40) through extinction k (mag/airmass,
// 0..2) against a sky of skyMag (mag/arcsec², as seen from the ground,
// 5..30). The star's rate is ZP 10^(−0.4 (m + k X)) times the enclosed
// fraction; the sky's is ZP 10^(−0.4 μ) p² per pixel.
func (d Detector) Rates(mag, x, k, skyMag float64) (CCDRates, error) {
	if err := d.Validate(); err != nil {
		return CCDRates{}, err
	}
	if err := ValidateMagnitude("magnitude", mag); err != nil {
		return CCDRates{}, err
	}
	if !finite(x) || x < 1 || x > 40 {
		return CCDRates{}, &InputError{"airmass", fmtNum(x), "1..40"}
	}
	if !finite(k) || k < 0 || k > 2 {
		return CCDRates{}, &InputError{"extinction", fmtNum(k), "0..2 mag/airmass"}
	}
	if !finite(skyMag) || skyMag < 5 || skyMag > 30 {
		return CCDRates{}, &InputError{"sky brightness", fmtNum(skyMag), "5..30 mag/arcsec²"}
	}
	zp := d.ZeroPoint()
	return CCDRates{
		SourceEPerS:  zp * math.Pow(10, -0.4*(mag+k*x)) * d.EnclosedFraction(),
		SkyEPerSPix:  zp * math.Pow(10, -0.4*skyMag) * d.PixelArcsec * d.PixelArcsec,
		DarkEPerSPix: d.DarkEPerSPix,
		ReadNoiseE:   d.ReadNoiseE,
		Pixels:       d.Pixels(),
	}, nil
}

// SNR returns the signal-to-noise ratio of one exposure of tSec seconds by
// the CCD equation (Howell, Handbook of CCD Astronomy, 2nd ed. 2006, §4.4,
// eq. 4.4, without the digitisation term):
// S/N = N* / √(N* + n_pix (N_S + N_D + N_R²)), with N* = R* t, N_S = R_S t,
// N_D = R_D t. 0 for tSec ≤ 0.
func (r CCDRates) SNR(tSec float64) float64 {
	if tSec <= 0 || r.SourceEPerS <= 0 {
		return 0
	}
	n := r.SourceEPerS * tSec
	return n / math.Sqrt(n+r.Pixels*((r.SkyEPerSPix+r.DarkEPerSPix)*tSec+r.ReadNoiseE*r.ReadNoiseE))
}

// ExposureForSNR returns the exposure, seconds, that reaches signal-to-noise
// snr (0 < snr ≤ 100000), solving the CCD equation exactly: squaring
// S/N = R* t / √(R* t + n (R_S + R_D) t + n N_R²) gives the quadratic
// R*² t² − S² A t − S² n N_R² = 0 with A = R* + n (R_S + R_D), whose positive
// root is t = [S² A + √(S⁴ A² + 4 R*² S² n N_R²)] / (2 R*²).
func (r CCDRates) ExposureForSNR(snr float64) (float64, error) {
	if !finite(snr) || snr <= 0 || snr > 100000 {
		return 0, &InputError{"snr", fmtNum(snr), "0 < S/N ≤ 100000"}
	}
	if r.SourceEPerS <= 0 {
		return 0, &InputError{"source rate", fmtNum(r.SourceEPerS), "a positive count rate from the star"}
	}
	s2 := snr * snr
	a := r.SourceEPerS + r.Pixels*(r.SkyEPerSPix+r.DarkEPerSPix)
	c := s2 * r.Pixels * r.ReadNoiseE * r.ReadNoiseE
	r2 := r.SourceEPerS * r.SourceEPerS
	// Both terms of the numerator are positive, so the root loses no
	// precision to cancellation.
	return (s2*a + math.Sqrt(s2*s2*a*a+4*r2*c)) / (2 * r2), nil
}

// Exposure is everything known about one exposure of a target at one
// instant: the geometry, the sky and the CCD count rates.
type Exposure struct {
	Point      SkyPoint      // the target, Sun and Moon (Observe)
	Conditions SkyConditions // the sky model's inputs
	Sky        Sky           // the sky brightness in the detector's band
	Rates      CCDRates      // the CCD equation's rates
}

// ExposureAt computes the sky and the count rates for a star of magnitude
// mag (in d.Band) at instant t (UTC) from site, with extinction k
// (mag/airmass) and dark-sky zenith brightness darkZenithMag (mag/arcsec²) in
// that band. The star's light is extinguished by k times the Kasten & Young
// airmass of the refracted altitude (Airmass); the sky model uses its own
// X (KSAirmass). It fails with an *InputError when the target is below the
// horizon, the Sun above it, or any input is out of range.
func ExposureAt(site Site, st Star, t time.Time, d Detector, k, darkZenithMag, mag float64) (Exposure, error) {
	if err := d.Validate(); err != nil {
		return Exposure{}, err
	}
	c, p := SkyConditionsAt(site, st, t, d.Band, k, darkZenithMag)
	if !p.AirmassOK {
		return Exposure{}, &InputError{"altitude", strconv.FormatFloat(p.AltDeg, 'f', 2, 64) + "°", "a target above the horizon at that instant"}
	}
	s, err := SkyBrightness(c)
	if err != nil {
		return Exposure{}, err
	}
	r, err := d.Rates(mag, p.Airmass, k, s.Mag)
	if err != nil {
		return Exposure{}, err
	}
	return Exposure{Point: p, Conditions: c, Sky: s, Rates: r}, nil
}
