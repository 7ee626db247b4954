package main

import (
	"context"
	"fmt"
	"io"
	"time"

	"phasecast/ephem"
)

// skyJSON is the `sky --json` contract. JDs are two-part, printed with
// jdDecimals decimals; airmass is null when the target is below the horizon.
type skyJSON struct {
	JDUTC           jdValue  `json:"jd_utc"`
	JDTT            jdValue  `json:"jd_tt"`
	LSTHours        float64  `json:"lst_hours"`
	HourAngleHours  float64  `json:"hour_angle_hours"`
	AltDeg          float64  `json:"alt_deg"`
	AltRefractedDeg float64  `json:"alt_refracted_deg"`
	AzDeg           float64  `json:"az_deg"`
	Airmass         *float64 `json:"airmass"`
	ParallacticDeg  float64  `json:"parallactic_deg"`
	SunAltDeg       float64  `json:"sun_alt_deg"`
	MoonAltDeg      float64  `json:"moon_alt_deg"`
	MoonIlluminated float64  `json:"moon_illuminated"`
	MoonSepDeg      float64  `json:"moon_sep_deg"`
	// TimeScaleNote is ephem.TimeScaleNote: present only when TT − UTC rests
	// on an assumption beyond the tables (after the leap-second table's end,
	// before 1960).
	TimeScaleNote string `json:"time_scale_note,omitempty"`
}

const skySynopsis = `Where a target, the Sun and the Moon stand, seen from a site at one instant:
sidereal time, hour angle, altitude (airless and refracted), azimuth (0 = north,
90 = east), airmass, parallactic angle, and the Moon's altitude, phase and
distance from the target. UT1 is taken equal to UTC.`

func runSky(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("sky", skySynopsis)
	sg := addSightingFlags(fl, "instant, RFC 3339 (2026-12-01T03:00:00Z); UTC unless an offset is given")
	asJSON := fl.boolean("json", "print one JSON object")
	if help, err := fl.parse(args, stdout); help || err != nil {
		return err
	}
	site, star, t, err := sg.read(now)
	if err != nil {
		return err
	}

	p := ephem.Observe(site, star, t)
	if err := checkFinite([]string{"lst", "hour angle", "altitude", "refracted altitude", "azimuth", "parallactic angle",
		"Sun altitude", "Moon altitude", "Moon illumination", "Moon separation"},
		p.LSTHours, p.HourAngleHours, p.AltDeg, p.AltRefractedDeg, p.AzDeg, p.ParallacticDeg,
		p.SunAltDeg, p.MoonAltDeg, p.MoonIlluminated, p.MoonSepDeg); err != nil {
		return err
	}
	out := skyJSON{
		// Two-part Julian dates straight from ephem (SkyPoint's are single floats).
		JDUTC: jdValue(ephem.JDUTC(t)), JDTT: jdValue(ephem.JDTT(t)),
		LSTHours: p.LSTHours, HourAngleHours: p.HourAngleHours,
		AltDeg: p.AltDeg, AltRefractedDeg: p.AltRefractedDeg, AzDeg: p.AzDeg,
		ParallacticDeg: p.ParallacticDeg,
		SunAltDeg:      p.SunAltDeg, MoonAltDeg: p.MoonAltDeg,
		MoonIlluminated: p.MoonIlluminated, MoonSepDeg: p.MoonSepDeg,
		TimeScaleNote: ephem.TimeScaleNote(t),
	}
	if p.AirmassOK && finite(p.Airmass) {
		am := p.Airmass
		out.Airmass = &am
	}
	if *asJSON {
		return writeJSON(stdout, out)
	}
	return printSky(stdout, site, star, t, out)
}

func printSky(w io.Writer, site ephem.Site, star ephem.Star, t time.Time, o skyJSON) error {
	airmass := "— (below the horizon)"
	if o.Airmass != nil {
		airmass = f(*o.Airmass, 3)
	}
	tb := newTable(w)
	tb.row("site", siteLine(site))
	tb.row("target", starLine(star))
	tb.row("instant", utcMillis(t).String()+" (UTC)")
	tb.row("JD (UTC)", o.JDUTC.String())
	tb.row("JD (TT)", o.JDTT.String())
	tb.row("local sidereal time", hms(o.LSTHours)+" ("+f(o.LSTHours, 6)+" h, apparent; UT1 = UTC)")
	tb.row("hour angle", signed(o.HourAngleHours, 4)+" h ("+direction(o.HourAngleHours)+")")
	tb.row("altitude", signed(o.AltDeg, 4)+"° airless, "+signed(o.AltRefractedDeg, 4)+"° refracted")
	tb.row("azimuth", f(o.AzDeg, 4)+"° (0 = north, 90 = east)")
	tb.row("airmass", airmass)
	tb.row("parallactic angle", signed(o.ParallacticDeg, 2)+"°")
	tb.row("Sun altitude", signed(o.SunAltDeg, 2)+"°"+sunNote(o.SunAltDeg))
	tb.row("Moon altitude", signed(o.MoonAltDeg, 2)+"°")
	tb.row("Moon illuminated", f(o.MoonIlluminated*100, 1)+" %")
	tb.row("Moon–target", f(o.MoonSepDeg, 2)+"°")
	if err := tb.flush(); err != nil {
		return err
	}
	if err := printTimeScaleNote(w, o.TimeScaleNote); err != nil {
		return err
	}
	_, err := fmt.Fprintln(w, safetyNote)
	return err
}

// direction says which side of the meridian an hour angle is on.
func direction(haHours float64) string {
	switch {
	case haHours < 0:
		return "east of the meridian, rising"
	case haHours > 0:
		return "west of the meridian, setting"
	}
	return "on the meridian"
}

// sunNote flags daytime and twilight (Sun-centre altitudes −0.833°, −6°,
// −12°, −18°: common practice).
func sunNote(alt float64) string {
	switch {
	case alt > -0.833:
		return " (daytime: the Sun is up)"
	case alt > -6:
		return " (civil twilight)"
	case alt > -12:
		return " (nautical twilight)"
	case alt > -18:
		return " (astronomical twilight)"
	}
	return " (dark)"
}
