package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"slices"
	"strings"
	"time"

	"phasecast/ephem"
)

const eventsSynopsis = `The next occurrences of named orbital events, or of a phase window, for a
target seen from a site, in a time range. Times are UTC instants of
observation at the site (the barycentric light-time correction is applied),
with the 1σ timing uncertainty propagated from the ephemeris, and the target's
and the Sun's altitude at each.

Events (--event, comma-separated, default all): inferior_conjunction (the
companion in front: mid primary eclipse in most eclipsing systems),
superior_conjunction, max_recession and max_approach (the quadratures, named
for the companion's radial velocity), ascending_node (the primary's: the
pulsar-timing T0, the same instant as max_approach), eclipse_ingress and
eclipse_egress (need --eclipse-duration), periastron (needs --ecc > 0).
--convention says which event T0 marks; it is never guessed from the data.

With --phase C and no --halfwidth: the instants at phase C. With --phase C
--halfwidth W: the intervals with phase in C ± W (through 0 when needed).`

// eventJSON is one occurrence of an event or of a phase.
type eventJSON struct {
	Event     string    `json:"event"`       // an event name, or "phase"
	Phase     float64   `json:"phase"`       // in the ephemeris' convention, 0 ≤ phase < 1
	Cycle     int64     `json:"cycle"`       // counted from T0
	TimeUTC   utcMillis `json:"time_utc"`    // instant observed at the site
	BJDTDB    jdValue   `json:"bjd_tdb"`     // the same instant, barycentric
	SigmaS    float64   `json:"sigma_s"`     // 1σ of the predicted time, seconds
	AltDeg    float64   `json:"alt_deg"`     // target, refracted
	SunAltDeg float64   `json:"sun_alt_deg"` // Sun's centre, airless
}

// windowJSON is one interval with the phase inside the window.
type windowJSON struct {
	StartUTC  utcMillis `json:"start_utc"`
	EndUTC    utcMillis `json:"end_utc"`
	DurationS float64   `json:"duration_s"`
	AltDeg    float64   `json:"alt_deg_mid"`     // target, refracted, at mid-interval
	SunAltDeg float64   `json:"sun_alt_deg_mid"` // Sun's centre at mid-interval
}

// eventsJSON is the `events --json` object. Exactly one of Events and
// Windows is present.
type eventsJSON struct {
	FromUTC      utcMillis     `json:"from_utc"`
	ToUTC        utcMillis     `json:"to_utc"`
	Convention   string        `json:"convention"`
	T0BJDTDB     jdValue       `json:"t0_bjd_tdb"`
	PeriodDays   float64       `json:"period_days"`
	EventPhases  []eventPhase  `json:"event_phases,omitempty"`
	Events       *[]eventJSON  `json:"events,omitempty"`
	Windows      *[]windowJSON `json:"windows,omitempty"`
	Truncated    bool          `json:"truncated"`
	WindowCenter *float64      `json:"window_center,omitempty"`
	WindowHalf   *float64      `json:"window_halfwidth,omitempty"`
	// Warning says in words when the ephemeris' phase uncertainty over
	// the range makes the predictions meaningless or the planner would
	// refuse them (planner.UncertaintyRule).
	Warning string `json:"warning,omitempty"`
}

// eventPhase is where a named event falls in the ephemeris' convention.
type eventPhase struct {
	Event string  `json:"event"`
	Phase float64 `json:"phase"`
}

func runEvents(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("events", eventsSynopsis)
	sf := addSiteFlags(fl)
	tf := addTargetFlags(fl)
	ef := addEphemFlags(fl)
	conv := fl.text("convention", "NAME", "inferior_conjunction", "event T0 marks: inferior_conjunction, ascending_node, superior_conjunction or custom")
	offset := fl.text("phase-offset", "PHASE", "0", "with --convention custom: T0's phase in the inferior-conjunction cycle, 0 ≤ offset < 1")
	ecc := fl.text("ecc", "E", "0", "eccentricity, 0 ≤ e ≤ 0.99 (0: circular orbit)")
	omega := fl.text("omega", "DEG", "0", "the primary's argument of periastron, degrees (eccentric orbits)")
	from := fl.text("from", "TIME", "now", "start of the range, RFC 3339; UTC unless an offset is given")
	to := fl.text("to", "TIME", "", "end of the range, RFC 3339 (or --days)")
	days := fl.text("days", "N", "1", "length of the range, days, when --to is not given (≤ 366)")
	event := fl.text("event", "NAMES", "all", "events to list, comma-separated, or all")
	eclipse := fl.text("eclipse-duration", "S", "", "full eclipse duration (first to last contact), seconds, for eclipse_ingress and eclipse_egress")
	phaseC := fl.text("phase", "C", "", "list the instants at this phase (0 ≤ C < 1) instead of named events")
	half := fl.text("halfwidth", "W", "", "with --phase: list the intervals with phase in C ± W (0 < W ≤ 0.5)")
	maxRows := fl.text("max", "N", "500", "at most this many rows (1..100000)")
	asJSON := fl.boolean("json", "print one JSON object")
	if help, err := fl.parse(args, stdout); help || err != nil {
		return err
	}
	site, err := sf.site()
	if err != nil {
		return err
	}
	star, err := tf.star()
	if err != nil {
		return err
	}
	e, err := ef.ephemeris(site, star)
	if err != nil {
		return err
	}
	if e, err = orbitShape(e, conv, offset, ecc, omega, ef); err != nil {
		return err
	}
	start, end, err := timeRange(from, to, days, now)
	if err != nil {
		return err
	}
	limitF, err := number(maxRows, false, 500, 1, 100000, "a whole number of rows, 1..100000")
	if err != nil {
		return err
	}
	limit := int(limitF)
	if float64(limit) != limitF {
		return fieldError(maxRows, "not a whole number", "a whole number of rows, 1..100000")
	}

	out := eventsJSON{FromUTC: utcMillis(start), ToUTC: utcMillis(end), Convention: string(e.Convention),
		T0BJDTDB: jdValue(e.T0), PeriodDays: e.PeriodDays}
	sigma := max(e.PhaseErr(ephem.BJDTDB(site, star, start)), e.PhaseErr(ephem.BJDTDB(site, star, end)))
	out.Warning = uncertaintyWarning(sigma, e.PeriodDays)
	if phaseC.set && event.set {
		return usageErrorf("--event and --phase exclude each other: give named events or a phase, not both")
	}
	if half.set && !phaseC.set {
		return usageErrorf("--halfwidth %s needs --phase: the window is --phase ± --halfwidth", shown(half.value))
	}
	if phaseC.set {
		c, err := number(phaseC, true, 0, 0, math.Nextafter(1, 0), "a phase 0 ≤ C < 1")
		if err != nil {
			return err
		}
		if half.set {
			w, err := number(half, true, 0, math.SmallestNonzeroFloat64, 0.5, "a half-width 0 < W ≤ 0.5 in phase")
			if err != nil {
				return err
			}
			wins := ephem.WindowOccurrences(site, star, e, ephem.PhaseWindow{Center: c, HalfWidth: w}, start, end)
			list := make([]windowJSON, 0, min(len(wins), limit))
			for _, iv := range wins {
				if len(list) == limit {
					out.Truncated = true
					break
				}
				mid := iv.Start.Add(iv.End.Sub(iv.Start) / 2)
				p := ephem.Observe(site, star, mid)
				list = append(list, windowJSON{StartUTC: utcMillis(iv.Start), EndUTC: utcMillis(iv.End),
					DurationS: iv.End.Sub(iv.Start).Seconds(), AltDeg: p.AltRefractedDeg, SunAltDeg: p.SunAltDeg})
			}
			out.Windows, out.WindowCenter, out.WindowHalf = &list, &c, &w
		} else {
			list := occurrences(site, star, e, "phase", c, start, end, limit, &out.Truncated)
			out.Events = &list
		}
	} else {
		names, err := eventNames(event, e, eclipse.set)
		if err != nil {
			return err
		}
		durDays := 0.0
		if eclipse.set {
			s, err := number(eclipse, false, 0, math.SmallestNonzeroFloat64, e.PeriodDays*86400, fmt.Sprintf("a duration in seconds, > 0 and shorter than the period (%.3f s)", e.PeriodDays*86400))
			if err != nil {
				return err
			}
			durDays = ephem.SecondsToDays(s)
		}
		var list []eventJSON
		for _, name := range names {
			if (name == ephem.EventEclipseIngress || name == ephem.EventEclipseEgress) && !eclipse.set {
				return missing(eclipse)
			}
			ph, err := e.EventPhase(name, durDays)
			if err != nil {
				return fromInputError(err, "not accepted", map[string]*textValue{"event": event, "eclipse_duration": eclipse})
			}
			out.EventPhases = append(out.EventPhases, eventPhase{string(name), ph})
			list = append(list, occurrences(site, star, e, string(name), ph, start, end, limit, &out.Truncated)...)
		}
		slices.SortStableFunc(list, func(a, b eventJSON) int { return time.Time(a.TimeUTC).Compare(time.Time(b.TimeUTC)) })
		if len(list) > limit {
			list, out.Truncated = list[:limit], true
		}
		if list == nil {
			list = []eventJSON{}
		}
		out.Events = &list
	}
	if *asJSON {
		return writeJSON(stdout, out)
	}
	return printEvents(stdout, site, star, e, out)
}

// occurrences lists the instants, observed from site in [start, end], at
// which the target's phase is ph, at most limit of them.
func occurrences(site ephem.Site, star ephem.Star, e ephem.Ephemeris, name string, ph float64, start, end time.Time, limit int, truncated *bool) []eventJSON {
	times := ephem.NextEventsUTC(site, star, e, ph, start, end)
	if len(times) > limit {
		times, *truncated = times[:limit], true
	}
	list := make([]eventJSON, 0, len(times))
	for _, t := range times {
		b := ephem.BJDTDB(site, star, t)
		cycle, got := e.CyclePhase(b)
		// The instant is at phase ph up to rounding: keep the cycle of the
		// event itself when rounding crossed a cycle boundary.
		switch d := got - ph; {
		case d > 0.5:
			cycle++
		case d < -0.5:
			cycle--
		}
		p := ephem.Observe(site, star, t)
		list = append(list, eventJSON{Event: name, Phase: ph, Cycle: cycle, TimeUTC: utcMillis(t), BJDTDB: jdValue(b),
			SigmaS: e.PhaseErr(b) * e.PeriodDays * 86400, AltDeg: p.AltRefractedDeg, SunAltDeg: p.SunAltDeg})
	}
	return list
}

// orbitShape applies --convention, --phase-offset, --ecc and --omega.
func orbitShape(e ephem.Ephemeris, conv, offset, ecc, omega *textValue, ef ephemFlags) (ephem.Ephemeris, error) {
	if conv.set {
		e.Convention = ephem.Convention(strings.ToLower(strings.TrimSpace(conv.value)))
	}
	for _, p := range []struct {
		v   *textValue
		dst *float64
	}{{offset, &e.PhaseOffset}, {ecc, &e.Ecc}, {omega, &e.OmegaDeg}} {
		if !p.v.set {
			continue
		}
		x, ok := parseNumber(p.v.value)
		if !ok {
			return e, fieldError(p.v, "not a number", p.v.usage)
		}
		*p.dst = x
	}
	if err := e.Validate(); err != nil {
		byField := ef.byField()
		byField["convention"], byField["phase_offset"], byField["ecc"], byField["omega"] = conv, offset, ecc, omega
		return e, fromInputError(err, "not accepted", byField)
	}
	return e, nil
}

// timeRange reads --from and --to or --days.
func timeRange(from, to, days *textValue, now func() time.Time) (start, end time.Time, err error) {
	if start, err = instant(from, now); err != nil {
		return
	}
	if to.set && days.set {
		return start, end, usageErrorf("--to and --days exclude each other: give the end of the range or its length")
	}
	if to.set {
		if end, err = instant(to, now); err != nil {
			return
		}
		if !end.After(start) || end.Sub(start) > 366*24*time.Hour {
			return start, end, fieldError(to, "not accepted", "an end after --from and at most 366 days later")
		}
		return start, end, nil
	}
	d, err := number(days, false, 1, 1e-6, 366, "a length in days, > 0 and at most 366")
	if err != nil {
		return
	}
	if d <= 0 {
		return start, end, fieldError(days, "out of range", "a length in days, > 0 and at most 366")
	}
	return start, start.Add(time.Duration(d * 86400 * float64(time.Second))), nil
}

// eventNames reads --event. "all" is the conjunctions and quadratures, plus
// the eclipse contacts when an eclipse duration is given and periastron for
// an eccentric orbit.
func eventNames(v *textValue, e ephem.Ephemeris, haveEclipse bool) ([]ephem.Event, error) {
	accepted := "all, or a comma-separated list of " + eventList()
	text := strings.TrimSpace(strings.ToLower(v.value))
	if !v.set || text == "all" {
		names := []ephem.Event{ephem.EventInferiorConjunction, ephem.EventMaxRecession, ephem.EventSuperiorConjunction, ephem.EventMaxApproach}
		if haveEclipse {
			names = append(names, ephem.EventEclipseIngress, ephem.EventEclipseEgress)
		}
		if e.Ecc > 0 {
			names = append(names, ephem.EventPeriastron)
		}
		return names, nil
	}
	var names []ephem.Event
	for _, part := range strings.Split(text, ",") {
		name := ephem.Event(strings.TrimSpace(part))
		if !slices.Contains(ephem.Events, name) {
			return nil, fieldError(v, fmt.Sprintf("unknown event %q", name), accepted)
		}
		if !slices.Contains(names, name) {
			names = append(names, name)
		}
	}
	return names, nil
}

func eventList() string {
	var s []string
	for _, e := range ephem.Events {
		s = append(s, string(e))
	}
	return strings.Join(s, ", ")
}

func printEvents(w io.Writer, site ephem.Site, star ephem.Star, e ephem.Ephemeris, o eventsJSON) error {
	fmt.Fprintf(w, "site    %s\ntarget  %s\n", siteLine(site), starLine(star))
	fmt.Fprintf(w, "orbit   T0 = %s BJD_TDB (%s), P = %s d", o.T0BJDTDB, o.Convention, f(e.PeriodDays, 10))
	if e.Ecc > 0 {
		fmt.Fprintf(w, ", e = %g, ω = %g°", e.Ecc, e.OmegaDeg)
	}
	fmt.Fprintf(w, "\nrange   %s to %s (UTC instants observed at the site)\n", o.FromUTC, o.ToUTC)
	if len(o.EventPhases) > 0 {
		var parts []string
		for _, ep := range o.EventPhases {
			parts = append(parts, fmt.Sprintf("%s %.4f", ep.Event, ep.Phase))
		}
		fmt.Fprintf(w, "phases  %s\n", strings.Join(parts, ", "))
	}
	fmt.Fprintln(w)
	tb := newTable(w)
	if o.Windows != nil {
		fmt.Fprintf(w, "Phase window %.4f ± %.4f:\n", *o.WindowCenter, *o.WindowHalf)
		tb.row("start (UTC)", "end (UTC)", "length", "alt mid", "Sun alt mid")
		for _, x := range *o.Windows {
			tb.row(x.StartUTC.String(), x.EndUTC.String(), f(x.DurationS/60, 1)+" min", signed(x.AltDeg, 1)+"°", signed(x.SunAltDeg, 1)+"°")
		}
		if len(*o.Windows) == 0 {
			tb.row("(none in the range)")
		}
	} else {
		tb.row("time (UTC)", "event", "phase", "cycle", "±1σ", "alt", "Sun alt")
		for _, x := range *o.Events {
			tb.row(x.TimeUTC.String(), x.Event, f(x.Phase, 4), fmt.Sprint(x.Cycle), f(x.SigmaS, 1)+" s", signed(x.AltDeg, 1)+"°", signed(x.SunAltDeg, 1)+"°")
		}
		if len(*o.Events) == 0 {
			tb.row("(none in the range)")
		}
	}
	if err := tb.flush(); err != nil {
		return err
	}
	if o.Truncated {
		fmt.Fprintln(w, "(list cut at --max rows)")
	}
	if o.Warning != "" {
		fmt.Fprintln(w, "Warning: "+o.Warning)
	}
	_, err := fmt.Fprintln(w, safetyNote)
	return err
}
