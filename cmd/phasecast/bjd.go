package main

import (
	"context"
	"fmt"
	"io"
	"time"

	"phasecast/ephem"
)

// bjdJSON is the `bjd --json` contract: one instant in five standards, each
// a Julian date printed from its two parts with jdDecimals decimals.
type bjdJSON struct {
	JDUTC  jdValue `json:"jd_utc"`
	JDTT   jdValue `json:"jd_tt"`
	JDTDB  jdValue `json:"jd_tdb"`
	HJDUTC jdValue `json:"hjd_utc"`
	BJDTDB jdValue `json:"bjd_tdb"`
	// TimeScaleNote: see skyJSON.
	TimeScaleNote string `json:"time_scale_note,omitempty"`
}

const bjdSynopsis = `One instant of observation in the time standards used for timing work:
JD_UTC and JD_TT (geocentric), JD_TDB, HJD_UTC (light time to the Sun's centre,
UTC scale) and BJD_TDB (light time to the solar-system barycentre, TDB scale,
the recommended standard), for a target seen from a site. The Rømer delay uses
the site's position; the Shapiro delay (≤ 0.1 ms) is neglected.`

func runBJD(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("bjd", bjdSynopsis)
	sg := addSightingFlags(fl, "instant of observation, RFC 3339; UTC unless an offset is given")
	asJSON := fl.boolean("json", "print one JSON object")
	if help, err := fl.parse(args, stdout); help || err != nil {
		return err
	}
	site, star, t, err := sg.read(now)
	if err != nil {
		return err
	}
	b, err := ephem.BarycentricTimes(site, star, t)
	if err != nil {
		return err
	}
	out := bjdJSON{
		JDUTC: jdValue(b.JDUTC), JDTT: jdValue(b.JDTT), JDTDB: jdValue(b.JDTDB),
		HJDUTC: jdValue(b.HJDUTC), BJDTDB: jdValue(b.BJDTDB), TimeScaleNote: ephem.TimeScaleNote(t),
	}
	if *asJSON {
		return writeJSON(stdout, out)
	}
	tb := newTable(stdout)
	tb.row("site", siteLine(site))
	tb.row("target", starLine(star))
	tb.row("instant", utcMillis(t).String()+" (UTC)")
	tb.row("JD_UTC", out.JDUTC.String())
	tb.row("JD_TT", out.JDTT.String(), fmt.Sprintf("TT − UTC = %.3f s", ephem.TTMinusUTC(t)))
	tb.row("JD_TDB", out.JDTDB.String())
	tb.row("HJD_UTC", out.HJDUTC.String(), fmt.Sprintf("light time to the Sun's centre %+.3f s", b.HelioDelayS))
	tb.row("BJD_TDB", out.BJDTDB.String(), fmt.Sprintf("light time to the barycentre %+.3f s", b.BaryDelayS))
	if err := tb.flush(); err != nil {
		return err
	}
	if err := printTimeScaleNote(stdout, out.TimeScaleNote); err != nil {
		return err
	}
	_, err = fmt.Fprintln(stdout, "JDs to 1e-9 d (86 µs). UT1 is taken equal to UTC; leap seconds from the table of", ephem.LeapTableUpdated+".")
	return err
}
