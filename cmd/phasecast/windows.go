package main

import (
	"context"
	"fmt"
	"io"
	"strconv"
	"strings"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/planner/export"
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

--format text (default), json (the queue-windows document of the web and the
API), csv (one window per row, header
target,phase_goal,phase_halfwidth,start_utc,end_utc,duration_min,cycle,phase_err,
uncertain,airmass_min,airmass_max,exposures,event), or ics (iCalendar, RFC 5545:
one event per window, UTC times, stable UIDs; DTSTAMP is --stamp, default --from,
so the same command gives the same file). The documents are described in
docs/formats.md.`

func runWindows(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	wf := addWindowsFlags()
	if help, err := wf.fl.parse(args, stdout); help || err != nil {
		return err
	}
	job, err := wf.read()
	if err != nil {
		return err
	}
	got, err := job.compute(ctx, stderr)
	if err != nil {
		return err
	}
	return job.write(stdout, got)
}

// windowsFlags are the windows command's flags, as typed.
type windowsFlags struct {
	fl                                   *flags
	sf                                   siteFlags
	cf                                   constraintFlags
	tz, targets, target, goal, halfWidth *textValue
	from, to, minExp, step, format       *textValue
	stamp, siteName                      *textValue
	asJSON                               *bool
	inf                                  planInstrumentFlags
}

func addWindowsFlags() windowsFlags {
	fl := newFlags("windows", windowsSynopsis)
	wf := windowsFlags{fl: fl, sf: addSiteFlags(fl)}
	wf.tz = fl.text("tz", "ZONE", "UTC", "IANA time zone for dates and local times, e.g. America/Santiago")
	wf.targets = fl.text("targets", "FILE.csv", "", "targets file (CSV, as for plan); required")
	wf.target = fl.text("target", "NAME", "all", "the target, by its name in the file")
	wf.goal = fl.text("goal", "PHASE|EVENT", "the CSV's phases", "the goal: a phase 0..1 or an event name")
	wf.halfWidth = fl.text("halfwidth", "W", "the CSV's", "half-width of the --goal window in phase, 0 < w < 0.5")
	wf.from = fl.text("from", "DATE|TIME", "", "start of the range: YYYY-MM-DD (local midnight) or RFC 3339; required")
	wf.to = fl.text("to", "DATE|TIME", "", "end of the range, at most 366 days after --from; required")
	wf.cf = addConstraintFlags(fl)
	wf.minExp = fl.text("min-exposures", "N", "0", "list only windows that hold at least N whole exposures (0 = every window)")
	wf.step = fl.text("step-s", "S", "60", "constraint scan step, seconds 1..900 (edges are refined to 1 ms)")
	wf.format = fl.text("format", "text|json|csv|ics", "text", "output format")
	wf.stamp = fl.text("stamp", "TIME", "--from", "DTSTAMP of the iCalendar events (RFC 3339)")
	wf.inf = addPlanInstrumentFlags(fl)
	wf.siteName = addSiteNameFlag(fl)
	wf.asJSON = fl.boolean("json", "print one JSON object (the same as --format json)")
	return wf
}

// windowsJob is a parsed windows command: what to compute and how to write
// it.
type windowsJob struct {
	site     ephem.Site
	siteName string
	loc      *time.Location
	t0, t1   time.Time
	c        planner.Constraints
	nMin     int
	stepS    float64
	pad      float64 // --pad-sigma
	stamp    time.Time
	inst     *planner.Instrument // nil: no exposure sizing
	targets  []planner.Target
	format   string
}

// read parses and checks the flags (the targets file included).
func (wf windowsFlags) read() (windowsJob, error) {
	j := windowsJob{loc: time.UTC, siteName: wf.siteName.value}
	var err error
	if j.site, err = wf.sf.site(); err != nil {
		return j, err
	}
	if wf.tz.set {
		if j.loc, err = zone(wf.tz); err != nil {
			return j, err
		}
	}
	if j.format, err = outputFormat(wf.format, *wf.asJSON); err != nil {
		return j, err
	}
	if j.t0, err = rangeEnd(wf.from, j.loc); err != nil {
		return j, err
	}
	if j.t1, err = rangeEnd(wf.to, j.loc); err != nil {
		return j, err
	}
	if !j.t1.After(j.t0) || j.t1.Sub(j.t0) > planner.MaxWindowDays*24*time.Hour {
		return j, fieldError(wf.to, "out of range", fmt.Sprintf("an instant after --from, at most %d days later", planner.MaxWindowDays))
	}
	if j.c, err = wf.cf.constraints(); err != nil {
		return j, err
	}
	if j.pad, err = wf.cf.pad(); err != nil {
		return j, err
	}
	if j.nMin, err = wholeNumber(wf.minExp, 0, 0, 10000, "a whole number 0..10000"); err != nil {
		return j, err
	}
	if j.stepS, err = number(wf.step, false, 60, 1, 900, "seconds 1..900"); err != nil {
		return j, err
	}
	j.stamp = j.t0
	if wf.stamp.set {
		if j.stamp, err = ephem.ParseTime(wf.stamp.value); err != nil {
			return j, fromInputError(err, "not a time", map[string]*textValue{"time": wf.stamp})
		}
	}
	if j.inst, err = wf.inf.read(); err != nil {
		return j, err
	}
	list, err := readTargets(wf.targets)
	if err != nil {
		return j, err
	}
	j.targets, err = pickTargets(list, wf.target, wf.goal, wf.halfWidth)
	return j, err
}

// compute lists the windows, keeping those that hold at least nMin whole
// exposures.
// A progress line goes to stderr when it is a terminal.
func (j windowsJob) compute(ctx context.Context, stderr io.Writer) ([]planner.GoalWindows, error) {
	prog := newProgress(stderr, "windows")
	got, err := planner.QueueWindows(ctx, planner.WindowRequest{Site: j.site, From: j.t0, To: j.t1, Targets: j.targets, Constraints: j.c,
		Options: planner.Options{StepS: j.stepS, PadSigma: j.pad}, Instrument: j.inst}, prog.callback())
	prog.finish()
	if err != nil {
		if ctx.Err() != nil {
			return nil, interrupted(err, "windows")
		}
		return nil, fromInputError(err, "not accepted", nil)
	}
	for i := range got {
		kept := got[i].Windows[:0]
		for _, w := range got[i].Windows {
			if w.Exposures >= j.nMin {
				kept = append(kept, w)
			}
		}
		got[i].Windows = kept
	}
	return got, checkWindowsFinite(got)
}

// write prints the windows in the chosen format.
func (j windowsJob) write(w io.Writer, got []planner.GoalWindows) error {
	doc := export.NewWindows(j.siteName, j.loc.String(), j.t0, j.t1, 0, got)
	switch j.format {
	case "json":
		return writeJSON(w, doc)
	case "csv":
		return writeBytes(w, func() ([]byte, error) { return export.WindowsCSV(doc, j.inst != nil) })
	case "ics":
		return writeBytes(w, func() ([]byte, error) { return export.WindowsICS(doc, j.stamp) })
	}
	return printWindows(w, got, j.site, j.loc, j.t0, j.t1, j.c)
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
