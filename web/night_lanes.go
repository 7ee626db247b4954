package web

import (
	"fmt"
	"strings"
	"time"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/web/chart"
	"phasecast/web/page"
)

// laneEvents names the quarter-orbit events for the chart's lanes, short
// enough to fit a lane; an ascending-node (pulsar-timing) ephemeris says
// they are the companion's, as eventName does in full.
var laneEvents = []struct {
	ev, name, pulsar string
}{
	{"inferior_conjunction", "inf. conj.", "comp. inf. conj."},
	{"max_recession", "max. recession", "comp. max. recession"},
	{"superior_conjunction", "sup. conj.", "comp. sup. conj."},
	{"max_approach", "max. approach", "comp. max. approach"},
}

// trackEvents lists target t's named orbital events for the chart: the
// conjunctions and quadratures, and the eclipse ingress and egress of any
// goal that gives an eclipse duration. An event the ephemeris cannot place
// is left out.
func trackEvents(t planner.Target) []chart.PhaseMark {
	var out []chart.PhaseMark
	pulsar := t.Ephem.Convention == planner.ConvAscendingNode
	for _, e := range laneEvents {
		ph, err := planner.EventPhase(t.Ephem, planner.Event(e.ev), 0)
		if err != nil {
			continue
		}
		name := e.name
		if pulsar {
			name = e.pulsar
		}
		out = append(out, chart.PhaseMark{Phase: ph, Name: name})
	}
	for _, g := range t.Goals {
		if g.EclipseDurDays <= 0 {
			continue
		}
		for _, ev := range []string{"eclipse_ingress", "eclipse_egress"} {
			if ph, err := planner.EventPhase(t.Ephem, planner.Event(ev), g.EclipseDurDays); err == nil {
				out = append(out, chart.PhaseMark{Phase: ph, Name: strings.TrimPrefix(ev, "eclipse_")})
			}
		}
		break
	}
	return out
}

// blockDetail is the figures a chart block shows on focus, one per line.
func blockDetail(r page.BlockRow, zone string) string {
	return strings.Join([]string{
		r.UTC + " UT",
		r.Local + " " + zone,
		"LST at start " + r.LST,
		"airmass " + r.Airmass,
		"phase " + r.Phases,
		"parallactic angle " + r.Parallatic,
		"Moon " + r.MoonSep,
	}, "\n")
}

// summary is the night in one line: the dark time (astronomical dusk to
// dawn) in local time and UT with its length, sunset and sunrise, and the
// Moon's phase and hours up. It replaces a table of event times; the same
// limits are drawn in the chart's top strip.
func (n *night) summary() string {
	ev := n.events
	hm := func(t *time.Time) string { return t.In(n.loc).Format("15:04") }
	var parts []string
	if ev.AstronomicalDusk != nil && ev.AstronomicalDawn != nil && ev.AstronomicalDawn.After(*ev.AstronomicalDusk) {
		d := ev.AstronomicalDawn.Sub(*ev.AstronomicalDusk).Round(time.Minute)
		parts = append(parts, fmt.Sprintf("Dark %s–%s %s (%s–%s UT), %d h %02d min", hm(ev.AstronomicalDusk), hm(ev.AstronomicalDawn),
			zoneLabel(n.loc, *ev.AstronomicalDusk), ev.AstronomicalDusk.UTC().Format("15:04"), ev.AstronomicalDawn.UTC().Format("15:04"),
			int(d.Hours()), int(d.Minutes())%60))
	} else {
		parts = append(parts, "No astronomical darkness: the Sun stays above −18°")
	}
	if ev.Sunset != nil && ev.Sunrise != nil {
		parts = append(parts, "sunset "+hm(ev.Sunset)+", sunrise "+hm(ev.Sunrise))
	}
	moon := fmt.Sprintf("Moon %.0f%% lit", ev.MoonIlluminated*100)
	switch rise, set := ev.Moonrise, ev.Moonset; {
	case rise != nil && set != nil && rise.Before(*set):
		moon += ", up " + hm(rise) + "–" + hm(set)
	case rise != nil && set != nil:
		moon += ", sets " + hm(set) + ", rises " + hm(rise)
	case rise != nil:
		moon += ", rises " + hm(rise)
	case set != nil:
		moon += ", sets " + hm(set)
	}
	return strings.Join(append(parts, moon), " · ")
}

// nightOf is the local date of the evening on which the night holding
// instant t began: a window after local midnight belongs to the evening
// before (local noon to noon).
func nightOf(t time.Time, loc *time.Location) string {
	l := t.In(loc)
	if l.Hour() < 12 {
		l = l.AddDate(0, 0, -1)
	}
	return l.Format("2006-01-02")
}

// altitudeTonight is the target detail page's small altitude panel: the
// night at the team's first site that is under way at now, or else the
// coming one (local noon to noon), from an hour before sunset to an hour
// after sunrise, with the site's own limit. ok is false without a site, a
// zone that loads or samples.
func altitudeTonight(sites []store.SiteRecord, tg planner.Target, now time.Time) (chart.Altitude, bool) {
	if len(sites) == 0 {
		return chart.Altitude{}, false
	}
	rec := sites[0]
	loc, err := time.LoadLocation(rec.Zone)
	if err != nil {
		return chart.Altitude{}, false
	}
	day := now.In(loc)
	if day.Hour() < 12 {
		day = day.AddDate(0, 0, -1)
	}
	ev := planner.NightEventsOn(rec.Site, day.Year(), day.Month(), day.Day(), loc)
	from, to := ev.Start, ev.End
	if ev.Sunset != nil && ev.Sunrise != nil {
		from, to = ev.Sunset.Add(-time.Hour), ev.Sunrise.Add(time.Hour)
	}
	smp, err := planner.SampleNight(rec.Site, from, to, []planner.Target{tg}, 5*time.Minute)
	if err != nil || len(smp.Targets) != 1 {
		return chart.Altitude{}, false
	}
	a := chart.Altitude{Title: tg.Name + ", night of " + day.Format("2006-01-02") + " at " + rec.Name, Start: from, End: to, Zone: loc}
	for _, b := range smp.Bands {
		if b.Kind == "night" {
			a.Dark = append(a.Dark, chart.Span{Start: b.Start, End: b.End})
		}
	}
	for i, t := range smp.Times {
		a.Points = append(a.Points, chart.AltPoint{T: t, AltDeg: smp.Targets[0].AltDeg[i]})
	}
	if c := rec.Constraints; c.MaxAirmass > 0 {
		a.LimitAltDeg = planner.AirmassAltDeg(c.MaxAirmass)
	}
	if c := rec.Constraints; c.MinAltDeg > a.LimitAltDeg {
		a.LimitAltDeg = c.MinAltDeg
	}
	return a, true
}
