package main

import (
	"context"
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
	"strings"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/web/ical"
)

const windowsSynopsis = `Queue phase windows: for targets of a CSV list (the plan command's), every UTC
interval between --from and --to (at most 366 days) in which a goal's phase
window is open and the target is observable under the constraints (Sun below
the twilight altitude, airmass, Moon, horizon, ...), merged and sorted, with the
ephemeris' phase uncertainty (1σ) at each window. Edges are good to about 0.1 s.

--target picks one target (default: all). --goal picks the goal: a phase
0 ≤ φ < 1 in the convention of T0, or an event (quadratures, eclipse,
max_recession, max_approach, ...); default: the CSV's phases. --halfwidth sets
the window's half-width for --goal (default: the CSV's phase_halfwidth).
--from and --to take a date YYYY-MM-DD (local midnight in --tz) or an instant
(RFC 3339).

--format text (default), json, csv (one window per row, header
target,phase_goal,phase_halfwidth,start_utc,end_utc,duration_min,cycle,phase_err,
uncertain,airmass_min,airmass_max,exposures), or ics (iCalendar, RFC 5545: one
event per window, UTC times, stable UIDs; DTSTAMP is --stamp, default --from, so
the same command gives the same file).`

func runWindows(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("windows", windowsSynopsis)
	sf := addSiteFlags(fl)
	tz := fl.text("tz", "ZONE", "UTC", "IANA time zone for dates and local times, e.g. America/Santiago")
	targets := fl.text("targets", "FILE.csv", "", "targets file (CSV, as for plan); required")
	target := fl.text("target", "NAME", "all", "the target, by its name in the file")
	goal := fl.text("goal", "PHASE|EVENT", "the CSV's phases", "the goal: a phase 0..1 or an event name")
	halfWidth := fl.text("halfwidth", "W", "the CSV's", "half-width of the --goal window in phase, 0 < w < 0.5")
	from := fl.text("from", "DATE|TIME", "", "start of the range: YYYY-MM-DD (local midnight) or RFC 3339; required")
	to := fl.text("to", "DATE|TIME", "", "end of the range, at most 366 days after --from; required")
	cf := addConstraintFlags(fl)
	minExp := fl.text("min-exposures", "N", "0", "list only windows that hold at least N whole exposures (0 = every window)")
	step := fl.text("step-s", "S", "60", "constraint scan step, seconds 1..900 (edges are refined to 1 ms)")
	format := fl.text("format", "text|json|csv|ics", "text", "output format")
	stamp := fl.text("stamp", "TIME", "--from", "DTSTAMP of the iCalendar events (RFC 3339)")
	inf := addPlanInstrumentFlags(fl)
	asJSON := fl.boolean("json", "print one JSON object (the same as --format json)")
	if help, err := fl.parse(args, stdout); help || err != nil {
		return err
	}
	site, err := sf.site()
	if err != nil {
		return err
	}
	loc := time.UTC
	if tz.set {
		if loc, err = zone(tz); err != nil {
			return err
		}
	}
	fmtName := strings.ToLower(strings.TrimSpace(format.value))
	if !format.set {
		fmtName = "text"
	}
	switch fmtName {
	case "text", "json", "csv", "ics":
	default:
		return fieldError(format, "not a format", "text, json, csv or ics")
	}
	if *asJSON {
		if format.set && fmtName != "json" {
			return usageErrorf("--json and --format %s: give one output format", shown(format.value))
		}
		fmtName = "json"
	}
	t0, err := rangeEnd(from, loc)
	if err != nil {
		return err
	}
	t1, err := rangeEnd(to, loc)
	if err != nil {
		return err
	}
	if !t1.After(t0) || t1.Sub(t0) > planner.MaxWindowDays*24*time.Hour {
		return fieldError(to, "out of range", fmt.Sprintf("an instant after --from, at most %d days later", planner.MaxWindowDays))
	}
	c, err := cf.constraints()
	if err != nil {
		return err
	}
	nMin, err := wholeNumber(minExp, 0, 0, 10000, "a whole number 0..10000")
	if err != nil {
		return err
	}
	stepS, err := number(step, false, 60, 1, 900, "seconds 1..900")
	if err != nil {
		return err
	}
	dtstamp := t0
	if stamp.set {
		if dtstamp, err = ephem.ParseTime(stamp.value); err != nil {
			return fromInputError(err, "not a time", map[string]*textValue{"time": stamp})
		}
	}
	inst, err := inf.read()
	if err != nil {
		return err
	}
	list, err := readTargets(targets)
	if err != nil {
		return err
	}
	if list, err = pickTargets(list, target, goal, halfWidth); err != nil {
		return err
	}
	got, err := planner.QueueWindows(ctx, planner.WindowRequest{Site: site, From: t0, To: t1, Targets: list, Constraints: c,
		Options: planner.Options{StepS: stepS}, Instrument: inst}, nil)
	if err != nil {
		return fromInputError(err, "not accepted", nil)
	}
	for i := range got {
		kept := got[i].Windows[:0]
		for _, w := range got[i].Windows {
			if w.Exposures >= nMin {
				kept = append(kept, w)
			}
		}
		got[i].Windows = kept
	}
	if err := checkWindowsFinite(got); err != nil {
		return err
	}
	switch fmtName {
	case "json":
		return writeJSON(stdout, windowsOutput(got, loc, t0, t1))
	case "csv":
		return writeWindowsCSV(stdout, got, inst != nil)
	case "ics":
		return writeWindowsICS(stdout, got, dtstamp)
	}
	return printWindows(stdout, got, site, loc, t0, t1, c)
}

// rangeEnd parses --from or --to: a date (local midnight in loc) or an
// instant.
func rangeEnd(v *textValue, loc *time.Location) (time.Time, error) {
	if !v.set {
		return time.Time{}, missing(v)
	}
	s := strings.TrimSpace(v.value)
	if len(s) == len("2006-01-02") {
		y, m, d, err := ephem.ParseDate(s)
		if err != nil {
			return time.Time{}, fieldError(v, "not a date", "a date YYYY-MM-DD (local midnight) or an instant in RFC 3339")
		}
		return ephem.LocalDayStart(y, m, d, loc), nil
	}
	t, err := ephem.ParseTime(s)
	if err != nil {
		return time.Time{}, fieldError(v, "not a time", "a date YYYY-MM-DD (local midnight) or an instant in RFC 3339")
	}
	return t, nil
}

// pickTargets keeps the --target and replaces its goals by --goal.
func pickTargets(list []planner.Target, target, goal, halfWidth *textValue) ([]planner.Target, error) {
	if target.set {
		var names []string
		var picked []planner.Target
		for _, t := range list {
			names = append(names, t.Name)
			if t.Name == target.value {
				picked = append(picked, t)
			}
		}
		if len(picked) == 0 {
			if len(names) > 10 {
				names = append(names[:10], "…")
			}
			return nil, fieldError(target, "no such target in the file", "a name from the file: "+strings.Join(names, ", "))
		}
		list = picked
	}
	if halfWidth.set && !goal.set {
		return nil, usageErrorf("--halfwidth goes with --goal")
	}
	if !goal.set {
		return list, nil
	}
	spec := strings.TrimSpace(goal.value)
	var g planner.Goal
	if x, ok := parseNumber(spec); ok {
		if x < 0 || x >= 1 {
			return nil, fieldError(goal, "out of range", "a phase 0 ≤ φ < 1, or an event: "+strings.Join(planner.EventNames(), ", "))
		}
		g.Center = x
	} else {
		known := false
		for _, e := range planner.EventNames() {
			known = known || e == spec
		}
		if !known {
			return nil, fieldError(goal, "not a phase or an event", "a phase 0 ≤ φ < 1, or an event: "+strings.Join(planner.EventNames(), ", "))
		}
		g.Event = spec
	}
	for i := range list {
		ng := list[i].Goals[0]
		ng.Event, ng.Center = g.Event, g.Center
		if halfWidth.set {
			w, err := number(halfWidth, true, 0, 0, 0.5, "a half-width 0 < w < 0.5 (phase)")
			if err != nil {
				return nil, err
			}
			if w <= 0 || w >= 0.5 {
				return nil, fieldError(halfWidth, "out of range", "a half-width 0 < w < 0.5 (phase)")
			}
			ng.HalfWidth = w
		}
		list[i].Goals = []planner.Goal{ng}
		if _, err := list[i].ResolveGoals(); err != nil {
			return nil, fieldError(goal, err.Error(), "an event the target's ephemeris defines")
		}
	}
	return list, nil
}

// queueWindowJSON is one window.
type queueWindowJSON struct {
	Start       planTime `json:"start"`
	End         planTime `json:"end"`
	DurationMin float64  `json:"duration_min"`
	Cycle       int64    `json:"cycle"`
	PhaseErr    float64  `json:"phase_err"`
	Uncertain   bool     `json:"uncertain"`
	AirmassMin  float64  `json:"airmass_min"`
	AirmassMax  float64  `json:"airmass_max"`
	Exposures   int      `json:"exposures"`
	// Sizing is the S/N sizing at the window's middle (with an instrument
	// and an S/N goal only).
	Sizing *windowSizingJSON `json:"sizing,omitempty"`
}

// windowSizingJSON is a window's exposure sized for its goal's S/N.
type windowSizingJSON struct {
	ExposureS float64 `json:"exposure_s"`
	SNR       float64 `json:"snr"`
	SkyMag    float64 `json:"sky_mag_arcsec2"`
	Reached   bool    `json:"snr_reached"`
}

// sizingJSON converts a window's sizing (nil stays nil).
func sizingJSON(sz *planner.ExposureSizing) *windowSizingJSON {
	if sz == nil {
		return nil
	}
	return &windowSizingJSON{ExposureS: sz.ExposureS, SNR: sz.SNR, SkyMag: sz.SkyMag, Reached: sz.Reached}
}

// goalWindowsJSON is one goal's list.
type goalWindowsJSON struct {
	Target         string            `json:"target"`
	PhaseGoal      float64           `json:"phase_goal"`
	PhaseHalfWidth float64           `json:"phase_halfwidth"`
	Event          string            `json:"event,omitempty"`
	ExposureS      float64           `json:"exposure_s"`
	OverheadS      float64           `json:"overhead_s"`
	Windows        []queueWindowJSON `json:"windows"`
}

// windowsJSONOut is the `windows --format json` object.
type windowsJSONOut struct {
	From    planTime          `json:"from"`
	To      planTime          `json:"to"`
	Zone    string            `json:"zone"`
	Goals   []goalWindowsJSON `json:"goals"`
	Caution string            `json:"caution"`
}

func windowsOutput(got []planner.GoalWindows, loc *time.Location, t0, t1 time.Time) windowsJSONOut {
	out := windowsJSONOut{From: planTime(t0), To: planTime(t1), Zone: loc.String(), Goals: []goalWindowsJSON{}, Caution: planner.SafetyCaution}
	for _, gw := range got {
		gj := goalWindowsJSON{Target: gw.Target, PhaseGoal: gw.Goal.Center, PhaseHalfWidth: gw.Goal.HalfWidth, Event: gw.Goal.Event,
			ExposureS: gw.Goal.ExposureS, OverheadS: gw.Goal.OverheadS, Windows: []queueWindowJSON{}}
		for _, w := range gw.Windows {
			gj.Windows = append(gj.Windows, queueWindowJSON{Start: planTime(w.Start), End: planTime(w.End), DurationMin: w.Duration().Minutes(),
				Cycle: w.Cycle, PhaseErr: w.PhaseErr, Uncertain: w.Uncertain, AirmassMin: w.AirmassMin, AirmassMax: w.AirmassMax, Exposures: w.Exposures,
				Sizing: sizingJSON(w.Sizing)})
		}
		out.Goals = append(out.Goals, gj)
	}
	return out
}

func checkWindowsFinite(got []planner.GoalWindows) error {
	for _, gw := range got {
		for _, w := range gw.Windows {
			if err := checkFinite([]string{"phase error", "airmass", "airmass"}, w.PhaseErr, w.AirmassMin, w.AirmassMax); err != nil {
				return fmt.Errorf("%s: %w", gw.Target, err)
			}
		}
	}
	return nil
}

// windowsCSVHeader is the header of --format csv.
var windowsCSVHeader = []string{"target", "phase_goal", "phase_halfwidth", "start_utc", "end_utc", "duration_min", "cycle",
	"phase_err", "uncertain", "airmass_min", "airmass_max", "exposures"}

// windowsCSVSizing are the columns --format csv adds with an instrument: a
// window's S/N sizing (empty cells for goals without an S/N).
var windowsCSVSizing = []string{"sized_exposure_s", "snr", "sky_mag_arcsec2", "snr_reached"}

func writeWindowsCSV(w io.Writer, got []planner.GoalWindows, sized bool) error {
	cw := csv.NewWriter(w)
	header := windowsCSVHeader
	if sized {
		header = append(append([]string(nil), header...), windowsCSVSizing...)
	}
	if err := cw.Write(header); err != nil {
		return err
	}
	for _, gw := range got {
		for _, win := range gw.Windows {
			rec := []string{planner.SafeCSVCell(gw.Target), f(gw.Goal.Center, 4), f(gw.Goal.HalfWidth, 4), planTime(win.Start).String(), planTime(win.End).String(),
				f(win.Duration().Minutes(), 2), strconv.FormatInt(win.Cycle, 10), f(win.PhaseErr, 5), strconv.FormatBool(win.Uncertain),
				f(win.AirmassMin, 3), f(win.AirmassMax, 3), strconv.Itoa(win.Exposures)}
			switch {
			case sized && win.Sizing != nil:
				sz := win.Sizing
				rec = append(rec, f(sz.ExposureS, -1), f(sz.SNR, 2), f(sz.SkyMag, 3), strconv.FormatBool(sz.Reached))
			case sized:
				rec = append(rec, "", "", "", "")
			}
			if err := cw.Write(rec); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

// windowUID is a window's stable iCalendar UID: the same target, goal and
// window always give the same UID (RFC 5545 §3.8.4.7), so a calendar
// updates an imported window instead of duplicating it.
func windowUID(gw planner.GoalWindows, w planner.QueueWindow) string {
	name := strings.Map(func(r rune) rune {
		if r < 0x21 || r > 0x7e || r == '@' {
			return '_'
		}
		return r
	}, gw.Target)
	return fmt.Sprintf("window-%s-%s-%d-%d@phasecast", name, strconv.FormatFloat(gw.Goal.Center, 'f', -1, 64), w.Cycle, w.Start.Unix())
}

func writeWindowsICS(w io.Writer, got []planner.GoalWindows, stamp time.Time) error {
	cal := ical.Calendar{ProdID: "-//phasecast//queue windows//EN", Name: "phasecast queue windows"}
	for _, gw := range got {
		for _, win := range gw.Windows {
			desc := fmt.Sprintf("Phase window %.4f ± %.4f of %s (cycle %d), %.1f min; phase uncertainty 1σ %.4f; airmass %.2f–%.2f; %d exposure(s) of %ss fit. %s",
				gw.Goal.Center, gw.Goal.HalfWidth, gw.Target, win.Cycle, win.Duration().Minutes(), win.PhaseErr, win.AirmassMin, win.AirmassMax,
				win.Exposures, fmtG(gw.Goal.ExposureS), planner.SafetyCaution)
			cal.Events = append(cal.Events, ical.Event{
				UID: windowUID(gw, win), Stamp: stamp, Start: win.Start, End: win.End,
				Summary:     fmt.Sprintf("%s phase %.3f", gw.Target, gw.Goal.Center),
				Description: desc, Categories: []string{"phasecast", "queue window"},
			})
		}
	}
	return ical.Encode(w, cal)
}

func printWindows(w io.Writer, got []planner.GoalWindows, site ephem.Site, loc *time.Location, t0, t1 time.Time, c planner.Constraints) error {
	var b strings.Builder
	fmt.Fprintf(&b, "Queue windows %s to %s UTC, site %s\n", t0.UTC().Format("2006-01-02 15:04"), t1.UTC().Format("2006-01-02 15:04"), siteLine(site))
	rc, err := c.Resolved()
	if err != nil {
		return fromInputError(err, "not accepted", nil)
	}
	fmt.Fprintf(&b, "Limits: Sun below %s° (%s), airmass ≤ %s, Sun avoidance %s°\n", fmtG(rc.SunAltMaxDeg), rc.Twilight, fmtG(rc.MaxAirmass), fmtG(rc.SunAvoidDeg))
	for _, gw := range got {
		fmt.Fprintf(&b, "\n%s, phase %.3f ± %.3f", gw.Target, gw.Goal.Center, gw.Goal.HalfWidth)
		if gw.Goal.Event != "" {
			fmt.Fprintf(&b, " (%s)", gw.Goal.Event)
		}
		fmt.Fprintf(&b, ": %d window(s)\n", len(gw.Windows))
		if len(gw.Windows) == 0 {
			continue
		}
		tb := newTable(&b)
		tb.row("  Start UTC", "End UTC", "Local start", "Min", "Cycle", "σφ", "Airmass", "Exp.")
		for _, win := range gw.Windows {
			mark := ""
			if win.Uncertain {
				mark = " (!)"
			}
			tb.row("  "+win.Start.UTC().Format("2006-01-02 15:04:05"), win.End.UTC().Format("15:04:05"), win.Start.In(loc).Format("01-02 15:04"),
				f(win.Duration().Minutes(), 1), strconv.FormatInt(win.Cycle, 10), f(win.PhaseErr, 4)+mark,
				fmt.Sprintf("%.2f–%.2f", win.AirmassMin, win.AirmassMax), strconv.Itoa(win.Exposures)+sizingNote(win.Sizing))
		}
		if err := tb.flush(); err != nil {
			return err
		}
	}
	if anyUncertain(got) {
		b.WriteString("\n(!) the phase uncertainty exceeds the window's half-width: the window may be elsewhere; refine the ephemeris.\n")
	}
	b.WriteString("\n" + planner.SafetyCaution + "\n")
	_, err = io.WriteString(w, b.String())
	return err
}

func anyUncertain(got []planner.GoalWindows) bool {
	for _, gw := range got {
		for _, w := range gw.Windows {
			if w.Uncertain {
				return true
			}
		}
	}
	return false
}

// sizingNote is the text sheet's note of a window's S/N sizing: the exposure
// and its S/N, or the best S/N when the smear limit stops it short.
func sizingNote(sz *planner.ExposureSizing) string {
	switch {
	case sz == nil:
		return ""
	case sz.Reached:
		return fmt.Sprintf(" × %ss (S/N %.1f, sky %.2f)", fmtG(sz.ExposureS), sz.SNR, sz.SkyMag)
	}
	return fmt.Sprintf(" (S/N at most %.1f in %ss: smear limit)", sz.SNR, fmtG(sz.ExposureS))
}
