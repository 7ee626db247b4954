package main

import (
	"context"
	"fmt"
	"io"
	"slices"
	"strings"
	"time"

	"phasecast/ephem"
	"phasecast/planner/export"
)

// nightJSON is the `night --json` contract (export.NightDoc, also the
// `night` object of `plan --json` and of the web's night export): RFC 3339
// UTC instants to the second, null for an event that does not happen between
// local noon on DATE and local noon the next day.
type nightJSON = export.NightDoc

const nightSynopsis = `The night that begins on the evening of local date DATE in time zone ZONE, from
local noon to the next local noon: sunset and sunrise (Sun's centre at −0.833°),
civil, nautical and astronomical dusk and dawn (−6°, −12°, −18°), moonrise and
moonset (upper limb, refracted), and the Moon's illuminated fraction at local
midnight. An event that does not happen that night is shown as absent (null).`

// nightObject is the `night --json` object for a night's events.
func nightObject(ev ephem.NightEvents) nightJSON { return export.NewNightDoc(ev) }

func runNight(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("night", nightSynopsis)
	sf := addSiteFlags(fl)
	date := fl.text("date", "YYYY-MM-DD", "today in ZONE", "local calendar date of the evening the night begins")
	tz := fl.text("tz", "ZONE", "", "IANA time zone of the site, e.g. America/Santiago or UTC; required")
	asJSON := fl.boolean("json", "print one JSON object")
	if help, err := fl.parse(args, stdout); help || err != nil {
		return err
	}
	site, err := sf.site()
	if err != nil {
		return err
	}
	loc, err := zone(tz)
	if err != nil {
		return err
	}
	y, m, d := now().In(loc).Date()
	if date.set {
		if y, m, d, err = ephem.ParseDate(date.value); err != nil {
			return fromInputError(err, "not a date", map[string]*textValue{"date": date})
		}
	}

	ev := ephem.Night(site, y, m, d, loc)
	if err := checkFinite([]string{"Moon illumination"}, ev.MoonIlluminated); err != nil {
		return err
	}
	out := nightObject(ev)
	if *asJSON {
		return writeJSON(stdout, out)
	}
	return printNight(stdout, site, loc, y, m, d, ev)
}

// zone loads an IANA time zone. "Local" is refused: a plan must not depend on
// the machine it runs on.
func zone(v *textValue) (*time.Location, error) {
	const accepted = "an IANA time-zone name such as America/Santiago, Europe/Madrid or UTC"
	if !v.set {
		return nil, missing(v)
	}
	name := strings.TrimSpace(v.value)
	if name == "" || name == "Local" {
		return nil, fieldError(v, "not a time zone", accepted)
	}
	loc, err := time.LoadLocation(name)
	if err != nil {
		return nil, fieldError(v, "unknown time zone", accepted)
	}
	return loc, nil
}

func printNight(w io.Writer, site ephem.Site, loc *time.Location, y int, m time.Month, d int, ev ephem.NightEvents) error {
	evening := time.Date(y, m, d, 12, 0, 0, 0, loc)
	fmt.Fprintf(w, "Night of %s (%s), site %s\n\n", evening.Format("Monday 2006-01-02"), loc, siteLine(site))
	tb := newTable(w)
	tb.row("event", "local ("+loc.String()+")", "UTC")
	rows := []struct {
		name string
		t    *time.Time
	}{
		{"sunset", ev.Sunset},
		{"civil dusk (−6°)", ev.CivilDusk},
		{"nautical dusk (−12°)", ev.NauticalDusk},
		{"astronomical dusk (−18°)", ev.AstronomicalDusk},
		{"astronomical dawn (−18°)", ev.AstronomicalDawn},
		{"nautical dawn (−12°)", ev.NauticalDawn},
		{"civil dawn (−6°)", ev.CivilDawn},
		{"sunrise", ev.Sunrise},
		{"moonrise", ev.Moonrise},
		{"moonset", ev.Moonset},
	}
	// In time order; events that do not happen last.
	slices.SortStableFunc(rows, func(a, b struct {
		name string
		t    *time.Time
	}) int {
		switch {
		case a.t == nil || b.t == nil:
			return cmpBool(a.t == nil, b.t == nil)
		}
		return a.t.Compare(*b.t)
	})
	for _, r := range rows {
		if r.t == nil {
			tb.row(r.name, "— (does not happen this night)", "—")
			continue
		}
		lt := r.t.In(loc).Round(time.Second)
		tb.row(r.name, lt.Format("Mon 15:04:05 MST"), export.DocSecond(*r.t).String())
	}
	if err := tb.flush(); err != nil {
		return err
	}
	_, err := fmt.Fprintf(w, "\nMoon illuminated at local midnight: %s %%\n%s\n", f(ev.MoonIlluminated*100, 1), safetyNote)
	return err
}

// cmpBool orders false before true.
func cmpBool(a, b bool) int {
	switch {
	case a == b:
		return 0
	case a:
		return 1
	}
	return -1
}
