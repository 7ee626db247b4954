package main

import (
	"context"
	"fmt"
	"io"
	"strings"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
)

// exposureJSON is the `exposure --json` contract (docs/exposure.md). A sky
// part that adds nothing (Moon down, no twilight) is null, as is the smear
// without --period.
type exposureJSON struct {
	Instant            utcMillis `json:"instant"`
	Band               string    `json:"band"`
	Mag                float64   `json:"mag"`
	Airmass            float64   `json:"airmass"`
	AltDeg             float64   `json:"alt_deg"`
	SunAltDeg          float64   `json:"sun_alt_deg"`
	MoonAltDeg         float64   `json:"moon_alt_deg"`
	MoonIlluminated    float64   `json:"moon_illuminated"`
	MoonPhaseAngleDeg  float64   `json:"moon_phase_angle_deg"`
	MoonSepDeg         float64   `json:"moon_sep_deg"`
	Extinction         float64   `json:"extinction"`
	SkyMag             float64   `json:"sky_mag_arcsec2"`
	SkyDarkMag         float64   `json:"sky_dark_mag_arcsec2"`
	SkyMoonMag         *float64  `json:"sky_moon_mag_arcsec2"`
	SkyTwilightMag     *float64  `json:"sky_twilight_mag_arcsec2"`
	MoonBrighteningMag float64   `json:"moon_brightening_mag"`
	ZeroPointEPerS     float64   `json:"zero_point_e_per_s"`
	EnclosedFraction   float64   `json:"enclosed_fraction"`
	Pixels             float64   `json:"pixels"`
	SourceEPerS        float64   `json:"source_e_per_s"`
	SkyEPerSPix        float64   `json:"sky_e_per_s_per_pixel"`
	DarkEPerSPix       float64   `json:"dark_e_per_s_per_pixel"`
	ReadNoiseE         float64   `json:"read_noise_e"`
	ExposureS          float64   `json:"exposure_s"`
	SNR                float64   `json:"snr"`
	PeriodDays         *float64  `json:"period_days"`
	SmearPhase         *float64  `json:"smear_phase"`
}

const exposureSynopsis = `The exposure that reaches a wanted signal-to-noise (--snr), or the S/N of a given
exposure (--exposure-s), for a star of a given magnitude seen from a site at one instant.
The sky is the dark sky rising with airmass plus scattered moonlight (Krisciunas &
Schaefer 1991) plus twilight (Schaefer 1998); S/N is the CCD equation (Howell 2006).
Defaults marked "common practice" are typical values, not your site's: give your own.`

// opticsFlags are the band-independent telescope and detector flags, shared
// by exposure and plan.
type opticsFlags struct {
	aperture, throughput, readNoise, dark, pixel, radius, slitWidth, slitLength, seeing *textValue
}

func addOpticsFlags(fl *flags, apertureUsage string) opticsFlags {
	return opticsFlags{
		aperture:   fl.text("aperture-m", "M", "", apertureUsage),
		throughput: fl.text("throughput", "FRACTION", "", "total efficiency of telescope, instrument and detector, 0..1, for bands without a zero point"),
		readNoise:  fl.text("read-noise", "E", "5", "read noise, e⁻ rms per pixel (common practice for a scientific CCD)"),
		dark:       fl.text("dark", "E/S", "0.002", "dark current, e⁻/s per pixel (common practice for a cooled CCD)"),
		pixel:      fl.text("pixel-scale", "ARCSEC", "", "pixel scale, arcsec per pixel (0.01..100); required with --aperture-m"),
		radius:     fl.text("radius", "ARCSEC", "seeing FWHM", "radius of the circular extraction aperture, arcsec (common practice: ≈ FWHM, 94% of a Gaussian star)"),
		slitWidth:  fl.text("slit-width", "ARCSEC", "", "slit width, arcsec: extract a slit instead of a circle"),
		slitLength: fl.text("slit-length", "ARCSEC", "2 × FWHM", "length extracted along the slit, arcsec"),
		seeing:     fl.text("seeing", "ARCSEC", "1.0", "seeing FWHM, arcsec (0.1..20; common practice for a good site)"),
	}
}

// given reports whether any of the flags was given.
func (o opticsFlags) given() bool {
	for _, v := range []*textValue{o.aperture, o.throughput, o.readNoise, o.dark, o.pixel, o.radius, o.slitWidth, o.slitLength, o.seeing} {
		if v.set {
			return true
		}
	}
	return false
}

// read parses the flags into an instrument without zero points, extinction
// or dark-sky values (the caller adds those per band).
func (o opticsFlags) read() (planner.Instrument, error) {
	var in planner.Instrument
	var err error
	if in.ApertureM, err = number(o.aperture, true, 0, 1e-3, 50, "0 < aperture ≤ 50 metres"); err != nil {
		return in, err
	}
	if in.Throughput, err = number(o.throughput, false, 0, 1e-6, 1, "0 < throughput ≤ 1"); err != nil {
		return in, err
	}
	steps := []struct {
		v        *textValue
		dst      *float64
		required bool
		def      float64
		lo, hi   float64
		accepted string
	}{
		{o.readNoise, &in.ReadNoiseE, false, 5, 0, 1000, "0..1000 e⁻ rms per pixel"},
		{o.dark, &in.DarkEPerSPix, false, 0.002, 0, 10000, "0..10000 e⁻/s per pixel"},
		{o.pixel, &in.PixelArcsec, true, 0, 0.01, 100, "0.01..100 arcsec per pixel"},
		{o.seeing, &in.SeeingArcsec, false, 1.0, 0.1, 20, "0.1..20 arcsec FWHM"},
		{o.radius, &in.RadiusArcsec, false, 0, 0.05, 600, "0.05..600 arcsec"},
		{o.slitWidth, &in.SlitWidthArcsec, false, 0, 0.05, 600, "0.05..600 arcsec"},
		{o.slitLength, &in.SlitLengthArcsec, false, 0, 0.05, 600, "0.05..600 arcsec"},
	}
	for _, s := range steps {
		if *s.dst, err = number(s.v, s.required, s.def, s.lo, s.hi, s.accepted); err != nil {
			return in, err
		}
	}
	switch {
	case o.slitWidth.set && o.radius.set:
		return in, usageErrorf("--radius and --slit-width: give a circular aperture or a slit, not both")
	case o.slitLength.set && !o.slitWidth.set:
		return in, usageErrorf("--slit-length %s: a slit length needs --slit-width", shown(o.slitLength.value))
	}
	return in, nil
}

// instrumentFlags are exposure's instrument flags: the optics and, for its
// one band, the zero point, extinction and dark sky.
type instrumentFlags struct {
	optics                               opticsFlags
	band, zeroPoint, extinction, darkSky *textValue
}

func addInstrumentFlags(fl *flags) instrumentFlags {
	return instrumentFlags{
		band:       fl.text("band", "BAND", "V", "photometric band of --mag: "+ephem.BandNames+" (UBVRI Vega, griz AB)"),
		optics:     addOpticsFlags(fl, "telescope clear aperture diameter, metres (0 < D ≤ 50); required"),
		zeroPoint:  fl.text("zero-point", "E/S", "", "detected e⁻/s from a 0-mag star above the atmosphere in the band, all its light; or give --throughput"),
		extinction: fl.text("extinction", "MAG", "band's", "extinction coefficient in the band, mag/airmass (common practice: "+defaultExtinctions()+")"),
		darkSky:    fl.text("sky-dark", "MAG", "band's", "dark-sky zenith brightness in the band, mag/arcsec² (defaults: UBVRI 22.3 22.6 21.6 20.9 19.7, Patat 2003; griz 22.0 21.1 20.3 19.0, common practice)"),
	}
}

// defaultExtinctions lists ephem's default extinction per band.
func defaultExtinctions() string {
	var parts []string
	for _, b := range strings.Split("U B V R I g r i z", " ") {
		parts = append(parts, b+" "+f(ephem.Band(b).DefaultExtinction(), 2))
	}
	return strings.Join(parts, " ")
}

// read parses the instrument flags into a detector, the extinction and the
// dark-sky zenith brightness in the band.
func (fl instrumentFlags) read() (ephem.Detector, float64, float64, error) {
	band := "V"
	if fl.band.set {
		band = fl.band.value
	}
	b, err := ephem.ParseBand(band)
	if err != nil {
		return ephem.Detector{}, 0, 0, fromInputError(err, "unknown band", map[string]*textValue{"band": fl.band})
	}
	in, err := fl.optics.read()
	if err != nil {
		return ephem.Detector{}, 0, 0, err
	}
	switch {
	case fl.zeroPoint.set && fl.optics.throughput.set:
		return ephem.Detector{}, 0, 0, usageErrorf("--zero-point and --throughput: give one of them, not both")
	case fl.zeroPoint.set:
		zp, err := number(fl.zeroPoint, true, 0, 1e-6, 1e14, "0 < e⁻/s ≤ 1e14")
		if err != nil {
			return ephem.Detector{}, 0, 0, err
		}
		in.ZeroPoints = map[string]float64{string(b): zp}
	case !fl.optics.throughput.set:
		return ephem.Detector{}, 0, 0, usageErrorf("missing --zero-point E/S or --throughput FRACTION: the detected e⁻/s of a 0-mag star, or the total efficiency")
	}
	k, err := number(fl.extinction, false, b.DefaultExtinction(), 1e-6, 2, "0 < k ≤ 2 mag/airmass")
	if err != nil {
		return ephem.Detector{}, 0, 0, err
	}
	dark, err := number(fl.darkSky, false, b.DefaultDarkZenithMag(), 10, 25, "10..25 mag/arcsec²")
	if err != nil {
		return ephem.Detector{}, 0, 0, err
	}
	in.Extinction = map[string]float64{string(b): k}
	in.DarkSky = map[string]float64{string(b): dark}
	d, k, dark, err := in.Detector(b)
	if err != nil {
		return ephem.Detector{}, 0, 0, fromInputError(err, "not accepted", nil)
	}
	return d, k, dark, nil
}

func runExposure(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("exposure", exposureSynopsis)
	sg := addSightingFlags(fl, "instant of the exposure, RFC 3339 (2026-12-01T03:00:00Z); UTC unless an offset is given")
	mag := fl.text("mag", "MAG", "", "target magnitude in --band (−2..30); required")
	inst := addInstrumentFlags(fl)
	snr := fl.text("snr", "S/N", "", "wanted signal-to-noise per exposure (0 < S/N ≤ 100000); or give --exposure-s")
	expS := fl.text("exposure-s", "S", "", "exposure length, seconds (0 < t ≤ 100000): print its S/N")
	period := fl.text("period", "DAYS", "", "orbital period, days: print the phase one exposure smears across")
	asJSON := fl.boolean("json", "print one JSON object (keys in docs/exposure.md)")
	if help, err := fl.parse(args, stdout); help || err != nil {
		return err
	}
	site, star, t, err := sg.read(now)
	if err != nil {
		return err
	}
	m, err := number(mag, true, 0, -2, 30, "a magnitude −2..30")
	if err != nil {
		return err
	}
	det, k, dark, err := inst.read()
	if err != nil {
		return err
	}
	if snr.set == expS.set {
		return usageErrorf("give exactly one of --snr S/N (the exposure that reaches it) and --exposure-s S (the S/N it reaches)")
	}
	var wantSNR, tSec float64
	if snr.set {
		wantSNR, err = number(snr, true, 0, 1e-6, 1e5, "0 < S/N ≤ 100000")
	} else {
		tSec, err = number(expS, true, 0, 1e-3, 1e5, "0 < seconds ≤ 100000")
	}
	if err != nil {
		return err
	}
	var periodD *float64
	if period.set {
		p, err := number(period, true, 0, 1e-4, 1e5, "an orbital period in days, 0.0001..100000")
		if err != nil {
			return err
		}
		periodD = &p
	}
	e, err := ephem.ExposureAt(site, star, t, det, k, dark, m)
	if err != nil {
		return fromInputError(err, "not observable", map[string]*textValue{"magnitude": mag})
	}
	if snr.set {
		if tSec, err = e.Rates.ExposureForSNR(wantSNR); err != nil {
			return fromInputError(err, "out of range", map[string]*textValue{"snr": snr})
		}
	}
	out := exposureOutput(t, m, k, det, e, tSec, periodD)
	if err := checkFinite([]string{"exposure", "S/N", "sky"}, out.ExposureS, out.SNR, out.SkyMag); err != nil {
		return err
	}
	if *asJSON {
		return writeJSON(stdout, out)
	}
	return printExposure(stdout, site, star, out, snr.set)
}

// exposureOutput assembles the JSON contract from a computed exposure of
// tSec seconds.
func exposureOutput(t time.Time, mag, k float64, d ephem.Detector, e ephem.Exposure, tSec float64, periodD *float64) exposureJSON {
	o := exposureJSON{
		Instant: utcMillis(t), Band: string(d.Band), Mag: mag,
		Airmass: e.Point.Airmass, AltDeg: e.Point.AltRefractedDeg,
		SunAltDeg: e.Point.SunAltDeg, MoonAltDeg: e.Point.MoonAltDeg,
		MoonIlluminated: e.Point.MoonIlluminated, MoonPhaseAngleDeg: e.Conditions.MoonPhaseAngleDeg,
		MoonSepDeg: e.Point.MoonSepDeg, Extinction: k,
		SkyMag: e.Sky.Mag, SkyDarkMag: e.Sky.DarkMag, MoonBrighteningMag: e.Sky.MoonDeltaV,
		ZeroPointEPerS: d.ZeroPoint(), EnclosedFraction: d.EnclosedFraction(), Pixels: e.Rates.Pixels,
		SourceEPerS: e.Rates.SourceEPerS, SkyEPerSPix: e.Rates.SkyEPerSPix,
		DarkEPerSPix: e.Rates.DarkEPerSPix, ReadNoiseE: e.Rates.ReadNoiseE,
		ExposureS: tSec, SNR: e.Rates.SNR(tSec), PeriodDays: periodD,
	}
	if e.Sky.MoonOK {
		v := e.Sky.MoonMag
		o.SkyMoonMag = &v
	}
	if e.Sky.TwilightOK {
		v := e.Sky.TwilightMag
		o.SkyTwilightMag = &v
	}
	if periodD != nil {
		s := tSec / (*periodD * 86400)
		o.SmearPhase = &s
	}
	return o
}

func printExposure(w io.Writer, site ephem.Site, star ephem.Star, o exposureJSON, solvedForT bool) error {
	part := func(p *float64) string {
		if p == nil {
			return "none"
		}
		return f(*p, 2)
	}
	tb := newTable(w)
	tb.row("site", siteLine(site))
	tb.row("target", starLine(star)+", "+o.Band+" = "+f(o.Mag, 2))
	tb.row("instant", o.Instant.String()+" (UTC)")
	tb.row("altitude", signed(o.AltDeg, 2)+"° refracted, airmass "+f(o.Airmass, 3))
	tb.row("Sun altitude", signed(o.SunAltDeg, 2)+"°"+sunNote(o.SunAltDeg))
	tb.row("Moon", fmt.Sprintf("altitude %s°, phase angle %s° (%s %% illuminated), %s° from the target",
		signed(o.MoonAltDeg, 2), f(o.MoonPhaseAngleDeg, 1), f(o.MoonIlluminated*100, 1), f(o.MoonSepDeg, 2)))
	tb.row("sky ("+o.Band+")", fmt.Sprintf("%s mag/arcsec² (dark sky %s, moonlight %s, twilight %s; the Moon brightens it by %s mag)",
		f(o.SkyMag, 2), f(o.SkyDarkMag, 2), part(o.SkyMoonMag), part(o.SkyTwilightMag), f(o.MoonBrighteningMag, 2)))
	tb.row("extinction", f(o.Extinction, 3)+" mag/airmass")
	tb.row("star", fmt.Sprintf("%s e⁻/s in the extraction (%s %% of its light; zero point %s e⁻/s)",
		g4(o.SourceEPerS), f(o.EnclosedFraction*100, 1), g4(o.ZeroPointEPerS)))
	tb.row("sky and dark", fmt.Sprintf("%s and %s e⁻/s per pixel over %s pixels, read noise %s e⁻",
		g4(o.SkyEPerSPix), g4(o.DarkEPerSPix), f(o.Pixels, 1), f(o.ReadNoiseE, 1)))
	if solvedForT {
		tb.row("exposure", f(o.ExposureS, 1)+" s for S/N "+f(o.SNR, 1))
	} else {
		tb.row("S/N", f(o.SNR, 1)+" in "+f(o.ExposureS, 1)+" s")
	}
	if o.SmearPhase != nil {
		tb.row("smear", f(*o.SmearPhase, 4)+" of the orbit (period "+f(*o.PeriodDays, -1)+" d)")
	}
	if err := tb.flush(); err != nil {
		return err
	}
	_, err := fmt.Fprintln(w, safetyNote)
	return err
}

// g4 formats a positive rate with 4 significant digits.
func g4(x float64) string { return fmt.Sprintf("%.4g", x) }

// planInstrumentFlags are plan's instrument flags: the optics and, per band,
// zero points, extinction and dark sky as BAND=VALUE lists.
type planInstrumentFlags struct {
	optics                          opticsFlags
	zeroPoints, extinction, darkSky *textValue
}

func addPlanInstrumentFlags(fl *flags) planInstrumentFlags {
	return planInstrumentFlags{
		optics:     addOpticsFlags(fl, "telescope clear aperture diameter, metres (0 < D ≤ 50): with it, goals with an snr get exposures sized by S/N (docs/exposure.md)"),
		zeroPoints: fl.text("zero-point", "BAND=E/S,…", "", "detected e⁻/s from a 0-mag star above the atmosphere, per band (V=4.7e9,R=5.2e9); bands without one use --throughput"),
		extinction: fl.text("extinction", "BAND=MAG,…", "band's", "extinction coefficients per band, mag/airmass (common practice: "+defaultExtinctions()+")"),
		darkSky:    fl.text("sky-dark", "BAND=MAG,…", "band's", "dark-sky zenith brightness per band, mag/arcsec² (defaults in docs/exposure.md)"),
	}
}

// read returns the instrument, or nil when none of its flags was given.
func (fl planInstrumentFlags) read() (*planner.Instrument, error) {
	if !fl.optics.given() && !fl.zeroPoints.set && !fl.extinction.set && !fl.darkSky.set {
		return nil, nil
	}
	if !fl.optics.aperture.set {
		return nil, missing(fl.optics.aperture)
	}
	in, err := fl.optics.read()
	if err != nil {
		return nil, err
	}
	lists := []struct {
		v        *textValue
		dst      *map[string]float64
		lo, hi   float64
		accepted string
	}{
		{fl.zeroPoints, &in.ZeroPoints, 1e-6, 1e14, "BAND=E/S pairs separated by commas, 0 < E/S ≤ 1e14, bands " + ephem.BandNames},
		{fl.extinction, &in.Extinction, 1e-6, 2, "BAND=MAG pairs separated by commas, 0 < k ≤ 2, bands " + ephem.BandNames},
		{fl.darkSky, &in.DarkSky, 10, 25, "BAND=MAG pairs separated by commas, 10..25 mag/arcsec², bands " + ephem.BandNames},
	}
	for _, l := range lists {
		if !l.v.set {
			continue
		}
		m, ok := bandValues(l.v.value, l.lo, l.hi)
		if !ok {
			return nil, fieldError(l.v, "not accepted", l.accepted)
		}
		*l.dst = m
	}
	if len(in.ZeroPoints) == 0 && in.Throughput == 0 {
		return nil, usageErrorf("missing --zero-point BAND=E/S,… or --throughput FRACTION: the detected e⁻/s of a 0-mag star, or the total efficiency")
	}
	if err := in.Validate(); err != nil {
		return nil, fromInputError(err, "not accepted", nil)
	}
	return &in, nil
}

// bandValues parses "V=4.7e9,R=5.2e9": known bands, each once, values in
// lo..hi.
func bandValues(s string, lo, hi float64) (map[string]float64, bool) {
	out := map[string]float64{}
	for _, part := range strings.Split(s, ",") {
		name, val, ok := strings.Cut(strings.TrimSpace(part), "=")
		if !ok {
			return nil, false
		}
		b, err := ephem.ParseBand(name)
		if err != nil {
			return nil, false
		}
		x, ok := parseNumber(val)
		if _, dup := out[string(b)]; !ok || dup || x < lo || x > hi {
			return nil, false
		}
		out[string(b)] = x
	}
	return out, true
}
