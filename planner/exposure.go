package planner

import (
	"fmt"
	"math"
	"sort"
	"strings"
	"time"

	"phasecast/ephem"
)

// DefaultMaxSmear is the most of the orbit one exposure may span when a goal
// sizes its exposures by S/N and gives no Goal.MaxSmear (common practice for
// phase-resolved spectroscopy and photometry).
const DefaultMaxSmear = 0.02

// Instrument is a telescope and detector of a site, as the CCD equation
// needs it (ephem.Detector, one band at a time). Per-band values missing
// from the maps take the defaults named on each field. The JSON keys are
// those the store and the API use (store/FORMAT.md).
type Instrument struct {
	Name      string  `json:"name"`
	ApertureM float64 `json:"aperture_m"` // clear aperture diameter, m, 0 < D ≤ 50
	// ZeroPoints are detected e⁻/s of a 0-magnitude star above the
	// atmosphere, per band ("V", "r", …). A band without one uses
	// Throughput.
	ZeroPoints map[string]float64 `json:"zero_points,omitempty"`
	Throughput float64            `json:"throughput,omitempty"` // total efficiency 0 < τ ≤ 1, for bands without a zero point (0: those bands are refused)
	ReadNoiseE float64            `json:"read_noise_e"`         // e⁻ rms per pixel
	// DarkEPerSPix is the dark current, e⁻/s per pixel.
	DarkEPerSPix float64 `json:"dark_e_per_s_pix"`
	PixelArcsec  float64 `json:"pixel_arcsec"`            // arcsec per pixel
	RadiusArcsec float64 `json:"radius_arcsec,omitempty"` // circular extraction radius, arcsec (0: the seeing FWHM, common practice)
	// SlitWidthArcsec > 0 extracts a slit of that width and
	// SlitLengthArcsec (0: twice the seeing FWHM) along it instead.
	SlitWidthArcsec  float64            `json:"slit_width_arcsec,omitempty"`
	SlitLengthArcsec float64            `json:"slit_length_arcsec,omitempty"`
	SeeingArcsec     float64            `json:"seeing_arcsec"`        // typical seeing FWHM, arcsec
	Extinction       map[string]float64 `json:"extinction,omitempty"` // mag/airmass per band (missing: ephem's common-practice default)
	DarkSky          map[string]float64 `json:"dark_sky,omitempty"`   // dark-sky zenith brightness per band, mag/arcsec² (missing: ephem's default)
}

// Detector returns the instrument in band b with that band's extinction
// (mag/airmass) and dark-sky zenith brightness (mag/arcsec²), the defaults
// filled in, or an *ephem.InputError naming the instrument's bad field.
func (in Instrument) Detector(b ephem.Band) (ephem.Detector, float64, float64, error) {
	d := ephem.Detector{
		Band: b, ApertureM: in.ApertureM, ZeroPointEPerS: in.ZeroPoints[string(b)], Throughput: in.Throughput,
		ReadNoiseE: in.ReadNoiseE, DarkEPerSPix: in.DarkEPerSPix, PixelArcsec: in.PixelArcsec,
		RadiusArcsec: in.RadiusArcsec, SlitWidthArcsec: in.SlitWidthArcsec, SlitLengthArcsec: in.SlitLengthArcsec,
		SeeingArcsec: in.SeeingArcsec,
	}
	if d.RadiusArcsec == 0 {
		d.RadiusArcsec = in.SeeingArcsec
	}
	if d.SlitWidthArcsec > 0 && d.SlitLengthArcsec == 0 {
		d.SlitLengthArcsec = 2 * in.SeeingArcsec
	}
	k, ok := in.Extinction[string(b)]
	if !ok {
		k = b.DefaultExtinction()
	}
	dark, ok := in.DarkSky[string(b)]
	if !ok {
		dark = b.DefaultDarkZenithMag()
	}
	if err := d.Validate(); err != nil {
		return d, 0, 0, prefixField("instrument", err)
	}
	if !finite(k) || k <= 0 || k > 2 {
		return d, 0, 0, &ephem.InputError{Field: "instrument.extinction." + string(b), Value: fmtNum(k), Accepted: "0 < k ≤ 2 mag/airmass"}
	}
	if !finite(dark) || dark < 10 || dark > 25 {
		return d, 0, 0, &ephem.InputError{Field: "instrument.dark_sky." + string(b), Value: fmtNum(dark), Accepted: "10..25 mag/arcsec²"}
	}
	return d, k, dark, nil
}

// Validate checks the instrument in every band it has a zero point for, and
// in V when it has a throughput; the bands of its maps must be known.
func (in Instrument) Validate() error {
	var bands []string
	for _, m := range []map[string]float64{in.ZeroPoints, in.Extinction, in.DarkSky} {
		for name := range m {
			if _, err := ephem.ParseBand(name); err != nil {
				return prefixField("instrument", err)
			}
		}
	}
	for name := range in.ZeroPoints {
		bands = append(bands, name)
	}
	if in.Throughput != 0 {
		bands = append(bands, "V")
	}
	if len(bands) == 0 {
		return &ephem.InputError{Field: "instrument.zero_points", Value: "none", Accepted: "a zero point for at least one band, or a throughput"}
	}
	sort.Strings(bands)
	for _, name := range bands {
		if _, _, _, err := in.Detector(ephem.Band(name)); err != nil {
			return err
		}
	}
	return nil
}

// prefixField puts a prefix before an *ephem.InputError's field.
func prefixField(prefix string, err error) error {
	if ie, ok := err.(*ephem.InputError); ok {
		return &ephem.InputError{Field: prefix + "." + strings.ReplaceAll(ie.Field, " ", "_"), Value: ie.Value, Accepted: ie.Accepted}
	}
	return err
}

// SizesBySNR reports whether goal g of target t has its exposures sized by
// signal-to-noise: the goal wants an S/N and the target has a band.
func SizesBySNR(t Target, g Goal) bool { return g.SNR > 0 && t.Band != "" }

// maxSmear returns the goal's smear limit, phase.
func (g Goal) maxSmear() float64 {
	if g.MaxSmear > 0 {
		return g.MaxSmear
	}
	return DefaultMaxSmear
}

// ExposureSizing is the exposure a goal gets at one instant.
type ExposureSizing struct {
	ExposureS float64 // the exposure, s: what reaches Goal.SNR, or the smear limit when that is shorter
	SNR       float64 // the S/N it reaches per exposure
	SkyMag    float64 // sky brightness used, mag/arcsec² in the target's band
	Airmass   float64 // the target's airmass at that instant
	// Reached is false when the smear limit stops the exposure short of
	// the wanted S/N; SNR is then the best reachable.
	Reached bool
	// LimitS is the smear limit in seconds: MaxSmear × P.
	LimitS float64
	// NeededS is the exposure that reaches the wanted S/N, s (longer than
	// LimitS when Reached is false).
	NeededS float64
}

// SizeExposure computes the exposure goal g of target t needs at instant
// at (UTC) from site with instrument in: the exposure that reaches g.SNR
// under that instant's sky (ephem.ExposureAt, ephem.CCDRates.ExposureForSNR)
// in the target's band (at its magnitude at the goal's centre phase,
// MagAtPhase), rounded up to a tenth of a second (as shutter times
// are set; kept unrounded when the rounding would pass the limit) and capped
// at g.MaxSmear (default DefaultMaxSmear) of the orbital period. It fails with an *ephem.InputError when the target is
// below the horizon, the Sun up, or an input out of range.
func SizeExposure(site ephem.Site, t Target, g Goal, in Instrument, at time.Time) (ExposureSizing, error) {
	e, err := exposureAt(site, t, in, at, g.Center)
	if err != nil {
		return ExposureSizing{}, err
	}
	want, err := e.Rates.ExposureForSNR(g.SNR)
	if err != nil {
		return ExposureSizing{}, err
	}
	limit := g.maxSmear() * t.Ephem.PeriodDays * 86400
	s := ExposureSizing{ExposureS: want, SkyMag: e.Sky.Mag, Airmass: e.Point.Airmass, Reached: true, LimitS: limit, NeededS: want}
	if want > limit {
		s.ExposureS, s.Reached = limit, false
	} else if up := math.Ceil(want*10) / 10; up <= limit {
		s.ExposureS = up // a shutter time in tenths of a second, never below the S/N
	}
	s.SNR = e.Rates.SNR(s.ExposureS)
	return s, nil
}

// snrAt returns the S/N per exposure of exposureS seconds and the sky used
// for target t at instant at, when the request has an instrument and the
// target a band; ok is false otherwise (or when the instant is not
// observable, which a scheduled block's middle always is).
func snrAt(site ephem.Site, t Target, in *Instrument, exposureS float64, at time.Time, phi float64) (snr, skyMag float64, ok bool) {
	if in == nil || t.Band == "" {
		return 0, 0, false
	}
	e, err := exposureAt(site, t, *in, at, phi)
	if err != nil {
		return 0, 0, false
	}
	return e.Rates.SNR(exposureS), e.Sky.Mag, true
}

// Variable reports whether the target has faint and bright magnitudes.
func (t Target) Variable() bool { return t.FaintMag != 0 || t.BrightMag != 0 }

// MagAtPhase returns the target's magnitude in its band at orbital phase
// phi: Mag, or for a variable the magnitude linear in phase between its
// bright and faint points, along both arcs of the orbit between them (a
// first estimate, common practice without a light curve).
func (t Target) MagAtPhase(phi float64) float64 {
	if !t.Variable() {
		return t.Mag
	}
	frac := func(x float64) float64 { return x - math.Floor(x) }
	span := frac(t.FaintPhase - t.BrightPhase) // bright → faint, forward
	u := frac(phi - t.BrightPhase)
	if u <= span {
		return t.BrightMag + (t.FaintMag-t.BrightMag)*u/span
	}
	return t.FaintMag + (t.BrightMag-t.FaintMag)*(u-span)/(1-span)
}

// exposureAt is ephem.ExposureAt for target t in its band with instrument
// in, at the target's magnitude at phase phi (MagAtPhase).
func exposureAt(site ephem.Site, t Target, in Instrument, at time.Time, phi float64) (ephem.Exposure, error) {
	b, err := ephem.ParseBand(t.Band)
	if err != nil {
		return ephem.Exposure{}, err
	}
	d, k, dark, err := in.Detector(b)
	if err != nil {
		return ephem.Exposure{}, err
	}
	return ephem.ExposureAt(site, t.Star(), at, d, k, dark, t.MagAtPhase(phi))
}

// validateBrightness is ValidateBrightness with field names prefixed with
// pre.
func validateBrightness(pre string, t Target) error {
	err := ValidateBrightness(t)
	if ie, ok := err.(*ephem.InputError); ok {
		return &ephem.InputError{Field: pre + "." + ie.Field, Value: ie.Value, Accepted: ie.Accepted}
	}
	return err
}

// ValidateBrightness checks a target's band (ephem.ParseBand), magnitude
// (−2..30 in the band when a band is given), faint and bright magnitudes
// and phases, and its goals' S/N (0..100000) and max smear (0 ≤ s < 0.5),
// reporting the first bad field as an *ephem.InputError ("band", "mag",
// "faint_mag", …, "goals[k].snr", "goals[k].max_smear"). The one validator
// of these fields: the planner, the store and the forms call it.
func ValidateBrightness(t Target) error {
	bad := func(field, value, accepted string) error {
		return &ephem.InputError{Field: field, Value: value, Accepted: accepted}
	}
	if t.Band != "" {
		if _, err := ephem.ParseBand(t.Band); err != nil {
			return bad("band", fmt.Sprintf("%q", t.Band), ephem.BandNames)
		}
		if err := ephem.ValidateMagnitude("mag", t.Mag); err != nil {
			return bad("mag", fmtNum(t.Mag), "−2..30 mag in the target's band")
		}
	}
	if t.Variable() {
		switch {
		case t.Band == "":
			return bad("faint_mag", fmtNum(t.FaintMag), "faint and bright magnitudes on a target with a band")
		case t.FaintMag == 0 || t.BrightMag == 0:
			return bad("faint_mag", fmtNum(t.FaintMag)+", "+fmtNum(t.BrightMag), "both faint_mag and bright_mag, or neither")
		case ephem.ValidateMagnitude("faint_mag", t.FaintMag) != nil:
			return bad("faint_mag", fmtNum(t.FaintMag), "−2..30 mag in the target's band")
		case ephem.ValidateMagnitude("bright_mag", t.BrightMag) != nil || t.BrightMag > t.FaintMag:
			return bad("bright_mag", fmtNum(t.BrightMag), "−2..30 mag, not fainter than faint_mag")
		case !finite(t.FaintPhase) || t.FaintPhase < 0 || t.FaintPhase >= 1:
			return bad("faint_phase", fmtNum(t.FaintPhase), "0 ≤ phase < 1")
		case !finite(t.BrightPhase) || t.BrightPhase < 0 || t.BrightPhase >= 1 || t.BrightPhase == t.FaintPhase:
			return bad("bright_phase", fmtNum(t.BrightPhase), "0 ≤ phase < 1, not the faint phase")
		}
	}
	for k, g := range t.Goals {
		gp := fmt.Sprintf("goals[%d].", k)
		switch {
		case !finite(g.SNR) || g.SNR < 0 || g.SNR > 100000:
			return bad(gp+"snr", fmtNum(g.SNR), "0 (exposure as given) or a wanted S/N per exposure, up to 100000")
		case g.SNR > 0 && t.Band == "":
			return bad(gp+"snr", fmtNum(g.SNR), "an S/N goal on a target with a band and magnitude")
		case g.SNR > 0 && t.Mag == 0 && !t.Variable():
			return bad(gp+"snr", fmtNum(g.SNR), "an S/N goal on a target with a known magnitude (mag 0 means unknown)")
		case !finite(g.MaxSmear) || g.MaxSmear < 0 || g.MaxSmear >= 0.5:
			return bad(gp+"max_smear", fmtNum(g.MaxSmear), fmt.Sprintf("0 (the default %g) or the most phase one exposure may span, below 0.5", DefaultMaxSmear))
		}
	}
	return nil
}

// snrShortfall records, per goal, the best S/N found when the smear limit
// stopped every occurrence short.
type snrShortfall struct {
	best, want, limitS, needS float64
}

func (s snrShortfall) detail(g Goal, p float64) string {
	return fmt.Sprintf("S/N %s per exposure would need %.0f s, but the smear limit of %s of the %s d orbit allows %.0f s: the best S/N reachable is %.1f",
		fmtNum(s.want), s.needS, fmtNum(g.maxSmear()), fmtNum(p), s.limitS, s.best)
}

// occKey names one occurrence (by its cycle) of goal goal of target target.
type occKey struct {
	target, goal int
	cycle        int64
}

// sizeOccurrence sizes goal gi (g) of ts for occurrence oc: the exposure
// the run's reach sized for it when there is one (en.presized), else at the
// middle of the longest part of the window the target is observable in; ok
// is false when no part is observable.
func (en *engine) sizeOccurrence(ts *targetState, gi int, g Goal, oc occurrence) (ExposureSizing, bool, error) {
	if sz, ok := en.presized[occKey{ts.idx, gi, oc.cycle}]; ok {
		return sz, true, nil
	}
	var parts []span
	for _, v := range ts.vis {
		parts = append(parts, span{math.Max(v.lo+guardS, oc.lo), math.Min(v.hi-guardS, oc.hi)})
	}
	at, ok := longestMiddle(parts)
	if !ok {
		return ExposureSizing{}, false, nil
	}
	s, err := SizeExposure(en.site, ts.t, g, *en.instrument, timeOf(at))
	if err != nil {
		return ExposureSizing{}, false, err
	}
	return s, true, nil
}

// longestMiddle returns the middle of the longest non-empty span.
func longestMiddle(parts []span) (float64, bool) {
	best, bestLen := 0.0, 0.0
	for _, p := range parts {
		if p.hi-p.lo > bestLen {
			best, bestLen = 0.5*(p.lo+p.hi), p.hi-p.lo
		}
	}
	return best, bestLen > 0
}

// sizeReach sizes, for a run night, every occurrence of goal gi of ts among
// its reach spans rs with the night planner's rule (the middle of the
// occurrence's longest observable part, guardS inside the interval), so that
// the night's model and the reach's capacity use the same exposure.
func sizeReach(site ephem.Site, in *Instrument, ts *targetState, gi int, rs []reachSpan, out map[occKey]ExposureSizing) {
	g := ts.goals[gi]
	if in == nil || !SizesBySNR(ts.t, g) {
		return
	}
	byCycle := map[int64][]span{}
	var cycles []int64
	for _, r := range rs {
		if _, seen := byCycle[r.occ.cycle]; !seen {
			cycles = append(cycles, r.occ.cycle)
		}
		byCycle[r.occ.cycle] = append(byCycle[r.occ.cycle], span{math.Max(r.vis.lo+guardS, r.occ.lo), math.Min(r.vis.hi-guardS, r.occ.hi)})
	}
	for _, c := range cycles {
		at, ok := longestMiddle(byCycle[c])
		if !ok {
			continue
		}
		// An instant inside an observable interval: only an unmodelled sky
		// fails, and the occurrence is then sized by the night itself.
		if sz, err := SizeExposure(site, ts.t, g, *in, timeOf(at)); err == nil {
			out[occKey{ts.idx, gi, c}] = sz
		}
	}
}

// noteShortfall keeps the best S/N of an occurrence of goal gi of target ti
// that the smear limit stopped short.
func (en *engine) noteShortfall(ti, gi int, sz ExposureSizing, g Goal) {
	k := [2]int{ti, gi}
	en.shortMu.Lock()
	defer en.shortMu.Unlock()
	if cur, ok := en.short[k]; ok && cur.best >= sz.SNR {
		return
	}
	en.short[k] = snrShortfall{best: sz.SNR, want: g.SNR, limitS: sz.LimitS, needS: sz.NeededS}
}
