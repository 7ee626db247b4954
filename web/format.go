package web

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"
	"unicode"

	"phasecast/planner"
)

// zoneLabel names a site's time zone at t: the tz database name, with the
// abbreviation when the zone has a real one ("America/Phoenix (MST)"),
// never a bare offset such as "-03" (America/Santiago has none).
func zoneLabel(loc *time.Location, t time.Time) string {
	if loc == nil || loc == time.UTC {
		return "UTC"
	}
	abbr, _ := t.In(loc).Zone()
	if abbr == "" || !unicode.IsLetter([]rune(abbr)[0]) {
		return loc.String()
	}
	return loc.String() + " (" + abbr + ")"
}

// lowAltDeg is the altitude below which no airmass is printed: the
// plane-parallel and fitted formulas part ways and refraction dominates
// there (common practice; airmass is not quoted that low).
const lowAltDeg = 5

// altitudeText writes an altitude with its airmass: "45° (airmass 1.41)",
// "3° (low)" below lowAltDeg, "-4° (below the horizon)".
func altitudeText(sky planner.SkyPoint) string {
	s := fmt.Sprintf("%.0f°", sky.AltRefractedDeg)
	switch {
	case !sky.AirmassOK || sky.AltRefractedDeg < 0:
		return s + " (below the horizon)"
	case sky.AltRefractedDeg < lowAltDeg:
		return s + " (low)"
	}
	return s + fmt.Sprintf(" (airmass %.2f)", sky.Airmass)
}

// sigFig writes x > 0 with n significant digits in plain decimal notation
// (0.000018, 0.43, 430), the one format of the uncertainties shown.
func sigFig(x float64, n int) string {
	if x == 0 || math.IsNaN(x) || math.IsInf(x, 0) {
		return "0"
	}
	mag := int(math.Floor(math.Log10(math.Abs(x))))
	r := math.Round(x/math.Pow10(mag-n+1)) * math.Pow10(mag-n+1)
	return strconv.FormatFloat(r, 'f', max(0, n-1-mag), 64)
}

// pulsarEvents names the events of an ascending-node (pulsar-timing)
// ephemeris for the body they concern: there the primary is the pulsar,
// and a conjunction named alone would be read as the pulsar's.
var pulsarEvents = map[string]string{
	"inferior_conjunction": "companion's inferior conjunction (companion in front of the pulsar)",
	"superior_conjunction": "companion's superior conjunction (pulsar in front of the companion)",
	"max_recession":        "companion's maximum recession (pulsar approaching)",
	"max_approach":         "companion's maximum approach (pulsar receding)",
	"ascending_node":       "pulsar's ascending node",
}

// eventName is an orbital event as shown: its name in words, and for an
// ascending-node ephemeris whose conjunction or quadrature it is.
func eventName(ev string, conv planner.Convention) string {
	if conv == planner.ConvAscendingNode {
		if s, ok := pulsarEvents[ev]; ok {
			return s
		}
	}
	return strings.ReplaceAll(ev, "_", " ")
}
