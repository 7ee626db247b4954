package main

// The `run` command (its file is not run.go: that name holds the dispatcher).

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/planner/export"
)

const runSynopsis = `Plan a run of nights: spread the exposures of a target list over several nights
(or half nights) so that every goal gets its exposures on enough nights, with the
coverage each goal reaches and, for every goal, the nights on which it can be
reached at all (best first).

Nights: --from DATE with --nights N (consecutive full nights), or --dates with a
comma-separated list of dates, each optionally followed by :first or :second for
half a night (split at the middle of the dark time), e.g.
  --dates 2026-03-14,2026-03-15:second,2026-03-18
At most 366 nights, within 366 days. Each night runs from local noon to local noon.

Targets: the CSV of the plan command (header
  name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority).
Every goal wants --n-exposures exposures (0 = enough to cover its window
once, -1 = as many as fit) on each of
--min-nights nights. --bins N reports the coverage in N phase bins too; with
--bin-goals the targets' goals become those N bins (a light curve).

Observed log (--observed): CSV, header naming any of
  target,start_utc,mid_utc,exposure_s,n_exposures,overhead_s,status,note
target and exposure_s are required, and exactly one of start_utc or mid_utc
(RFC 3339); n_exposures back-to-back exposures per row from start_utc (default
1), each exposure_s then overhead_s (default 0); status ok (default) or failed
(recorded, not counted); note is free text. Every bad row is reported by line
and nothing is read. The nights up to the last one in the log are over (or give
--past N): they are not planned again, and the remaining nights are planned for
what is still missing.

Predicted precision: targets with an RV goal (the optional columns rv_model,
rv_k_kms, rv_sigma_kms, rv_want_rel_k) get σK/K now (the log) and after the
plan, and the exposures still needed for rv_want_rel_k; with --timings
(columns target,time,std,err_s or err_days[,form][,note], as for fit) each timed
target gets σT0 and σP now and once the planned timings of its reference
event join them.`

func runRun(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	rf := addRunFlags()
	if help, err := rf.fl.parse(args, stdout); help || err != nil {
		return err
	}
	job, err := rf.read()
	if err != nil {
		return err
	}
	rp, out, err := job.compute(ctx, stderr)
	if err != nil {
		return err
	}
	return job.write(stdout, rp, out)
}

// runFlags are the run command's flags, as typed.
type runFlags struct {
	fl                                          *flags
	sf                                          siteFlags
	cf                                          constraintFlags
	tz, from, nNights, dates, targets, observed *textValue
	timings                                     *textValue
	past, acquire, nExp, minNights, bins, step  *textValue
	rounds, siteName, name, format, stamp       *textValue
	binGoals, fill, compare, asJSON             *bool
	inf                                         planInstrumentFlags
}

func addRunFlags() runFlags {
	fl := newFlags("run", runSynopsis)
	rf := runFlags{fl: fl, sf: addSiteFlags(fl)}
	rf.tz = fl.text("tz", "ZONE", "", "IANA time zone of the site, e.g. America/Santiago or UTC; required")
	rf.from = fl.text("from", "YYYY-MM-DD", "", "local date of the first night's evening; with --nights")
	rf.nNights = fl.text("nights", "N", "", "number of consecutive full nights from --from, 1..366")
	rf.dates = fl.text("dates", "LIST", "", "allocated nights: dates YYYY-MM-DD[:first|:second], comma-separated, in order")
	rf.targets = fl.text("targets", "FILE.csv", "", "targets file (CSV, as for plan); required")
	rf.observed = fl.text("observed", "LOG.csv", "", "log of exposures already taken (CSV, columns above)")
	rf.timings = fl.text("timings", "FILE.csv", "", "measured times of the targets' reference events (CSV as for fit, with a target column)")
	rf.past = fl.text("past", "N", "the nights the log reaches", "nights already over, 0..number of nights")
	rf.cf = addConstraintFlags(fl)
	rf.acquire = fl.text("acquire-s", "S", "120", "acquisition overhead per visit (slew, centring), seconds 0..3600")
	rf.nExp = fl.text("n-exposures", "N", "0", "exposures wanted per goal and night (0 = cover the window once, -1 = as many as fit)")
	rf.minNights = fl.text("min-nights", "M", "1", "nights each goal wants its exposures on, 1..366")
	rf.bins = fl.text("bins", "N", "0", "also count the coverage in N phase bins, 2..100 (0 = none)")
	rf.binGoals = fl.boolean("bin-goals", "plan for the --bins phase bins instead of the CSV's phases (a light curve)")
	rf.step = fl.text("step-s", "S", "60", "time resolution of the plan, seconds 1..900")
	rf.rounds = fl.text("rounds", "N", "2", "improvement rounds after the greedy pass, 0..100")
	rf.fill = fl.boolean("fill", "fill idle dark time with filler blocks of the most valuable observable target")
	rf.compare = fl.boolean("compare", "also plan every night on its own (as plan does) and show that objective")
	rf.inf = addPlanInstrumentFlags(fl)
	rf.siteName = addSiteNameFlag(fl)
	rf.name = fl.text("name", "NAME", "none", "the run's name, written into the JSON, CSV and iCalendar documents")
	rf.format = fl.text("format", "text|json|csv|ics", "text", "output format (the run document, docs/formats.md)")
	rf.stamp = fl.text("stamp", "TIME", "the first night's start", "DTSTAMP of the iCalendar events (RFC 3339)")
	rf.asJSON = fl.boolean("json", "print one JSON object (the same as --format json)")
	return rf
}

// runJob is a parsed run command: the request to plan and how to write
// the plan.
type runJob struct {
	req            planner.RunRequest
	acq            float64
	name, siteName string
	format         string
	stamp          *time.Time // nil: the first night's start
	observed       string     // the --observed file, for its errors
	// timings are the measured timings of the targets' reference events
	// (--timings), by target name.
	timings map[string][]ephem.Timing
}

// read parses and checks the flags (the targets file and the observed log
// included) into the run request.
func (rf runFlags) read() (runJob, error) {
	j := runJob{name: rf.name.value, siteName: rf.siteName.value, observed: rf.observed.value}
	var err error
	if j.format, err = outputFormat(rf.format, *rf.asJSON); err != nil {
		return j, err
	}
	site, err := rf.sf.site()
	if err != nil {
		return j, err
	}
	loc, err := zone(rf.tz)
	if err != nil {
		return j, err
	}
	nights, err := runNightFlags(rf.from, rf.nNights, rf.dates)
	if err != nil {
		return j, err
	}
	c, err := rf.cf.constraints()
	if err != nil {
		return j, err
	}
	pad, err := rf.cf.pad()
	if err != nil {
		return j, err
	}
	if j.acq, err = number(rf.acquire, false, 120, 0, 3600, "seconds 0..3600"); err != nil {
		return j, err
	}
	n, err := wholeNumber(rf.nExp, 0, planner.NAsManyAsFit, 10000, "a whole number -1..10000 (0 = cover the window once, -1 = as many as fit)")
	if err != nil {
		return j, err
	}
	m, err := wholeNumber(rf.minNights, 1, 1, planner.MaxRunNights, "a whole number 1..366")
	if err != nil {
		return j, err
	}
	nb, err := wholeNumber(rf.bins, 0, 0, planner.MaxBins, "0 (none) or a whole number 2..100")
	if err == nil && nb == 1 {
		err = fieldError(rf.bins, "out of range", "0 (none) or a whole number 2..100")
	}
	if err != nil {
		return j, err
	}
	if *rf.binGoals && nb == 0 {
		return j, usageErrorf("--bin-goals needs --bins N (2..100): the number of phase bins to plan for")
	}
	stepS, err := number(rf.step, false, 60, 1, 900, "seconds 1..900")
	if err != nil {
		return j, err
	}
	nr, err := wholeNumber(rf.rounds, 2, 0, 100, "a whole number 0..100")
	if err != nil {
		return j, err
	}
	if rf.stamp.set {
		t, err := ephem.ParseTime(rf.stamp.value)
		if err != nil {
			return j, fromInputError(err, "not a time", map[string]*textValue{"time": rf.stamp})
		}
		j.stamp = &t
	}
	inst, err := rf.inf.read()
	if err != nil {
		return j, err
	}
	list, err := readTargets(rf.targets)
	if err != nil {
		return j, err
	}
	for i := range list {
		list[i].AcquireS = j.acq
		for k := range list[i].Goals {
			list[i].Goals[k].NExposures, list[i].Goals[k].MinNights = n, m
		}
		if *rf.binGoals {
			if list[i].Goals, err = planner.PhaseBinGoals(nb, list[i].Goals[0]); err != nil {
				return j, err
			}
		}
	}
	j.req = planner.RunRequest{Site: site, Zone: loc, Nights: nights, Targets: list, Constraints: c,
		Options: planner.Options{StepS: stepS, Fill: *rf.fill, PadSigma: pad}, Bins: nb, Rounds: nr, CompareIndependent: *rf.compare, Instrument: inst}
	if nr == 0 {
		j.req.Rounds = -1
	}
	j.req.Observed, j.req.Past, err = runObserved(rf.observed, rf.past, site, loc, c, nights)
	if err != nil {
		return j, err
	}
	j.timings, err = runTimings(rf.timings, site, list)
	return j, err
}

// compute plans the run and makes its document; a target's id in the
// document is its row in the targets file, from 1.
// A progress line goes to stderr when it is a terminal.
func (j runJob) compute(ctx context.Context, stderr io.Writer) (*planner.RunPlan, export.Run, error) {
	prog := newProgress(stderr, "run")
	rp, err := planner.PlanRun(ctx, j.req, prog.callback())
	prog.finish()
	if err != nil {
		if ctx.Err() != nil {
			return nil, export.Run{}, interrupted(err, "run")
		}
		var te *planner.TableError
		if errors.As(err, &te) {
			return nil, export.Run{}, usageErrorf("--observed %s: %s", shown(j.observed), te.Error())
		}
		return nil, export.Run{}, fromInputError(err, "not accepted", nil)
	}
	ids := make([]int64, len(j.req.Targets))
	for i := range ids {
		ids[i] = int64(i + 1)
	}
	out, err := export.NewRun(export.RunInput{Name: j.name, Site: export.NewSite(j.siteName, j.req.Site), Loc: j.req.Zone, AcquireS: j.acq,
		TargetIDs: ids, Timings: j.timings}, rp)
	if err != nil {
		return nil, export.Run{}, fromInputError(err, "not accepted", nil)
	}
	return rp, out, checkRunFinite(out)
}

// write prints the plan in the chosen format.
func (j runJob) write(w io.Writer, rp *planner.RunPlan, out export.Run) error {
	switch j.format {
	case "json":
		return writeJSON(w, out)
	case "csv":
		return writeBytes(w, func() ([]byte, error) { return export.RunCSV(out, j.req.Zone) })
	case "ics":
		stamp := rp.Nights[0].From
		if j.stamp != nil {
			stamp = *j.stamp
		}
		return writeBytes(w, func() ([]byte, error) { return export.RunICS(out, j.name, stamp) })
	}
	return printRun(w, rp, out, j.req.Zone, j.acq)
}

// runTimings reads the --timings file (none: nil), converting each row with
// its target's position at the site.
func runTimings(file *textValue, site ephem.Site, list []planner.Target) (map[string][]ephem.Timing, error) {
	if !file.set {
		return nil, nil
	}
	stars := map[string]ephem.Star{}
	for _, t := range list {
		stars[t.Name] = t.Star()
	}
	rows, err := readTimings(file, &site, nil, stars)
	if err != nil {
		return nil, err
	}
	out := map[string][]ephem.Timing{}
	for _, r := range rows {
		out[r.target] = append(out[r.target], ephem.Timing{Value: r.bjd, Std: ephem.StdBJDTDB, ErrDays: r.errDays})
	}
	return out, nil
}

// wholeNumber parses a whole number flag in lo..hi.
func wholeNumber(v *textValue, def, lo, hi int, accepted string) (int, error) {
	x, err := number(v, false, float64(def), float64(lo), float64(hi), accepted)
	if err != nil {
		return 0, err
	}
	if x != math.Trunc(x) {
		return 0, fieldError(v, "not a whole number", accepted)
	}
	return int(x), nil
}

// runNightFlags reads --from with --nights, or --dates.
func runNightFlags(from, nNights, dates *textValue) ([]planner.RunNight, error) {
	switch {
	case dates.set && (from.set || nNights.set):
		return nil, usageErrorf("give either --dates, or --from with --nights, not both")
	case dates.set:
		nights, err := planner.ParseRunNights(dates.value)
		if err != nil {
			var ie *ephem.InputError
			if errors.As(err, &ie) {
				return nil, usageErrorf("--dates: %s %s: not accepted; accepted: %s", ie.Field, ie.Value, ie.Accepted)
			}
			return nil, err
		}
		return nights, nil
	case !from.set:
		return nil, usageErrorf("missing the nights: give --from YYYY-MM-DD with --nights N, or --dates LIST")
	}
	y, m, d, err := ephem.ParseDate(from.value)
	if err != nil {
		return nil, fromInputError(err, "not a date", map[string]*textValue{"date": from})
	}
	k, err := wholeNumber(nNights, 1, 1, planner.MaxRunNights, "a whole number of nights 1..366")
	if err != nil {
		return nil, err
	}
	return planner.NightsFrom(y, m, d, k)
}

// runObserved reads the observed log and works out the nights already over.
func runObserved(observed, past *textValue, site ephem.Site, loc *time.Location, c planner.Constraints, nights []planner.RunNight) ([]planner.Exposure, int, error) {
	var obs []planner.Exposure
	if observed.set {
		fh, err := os.Open(observed.value)
		if err != nil {
			return nil, 0, fmt.Errorf("--observed %s: %w", shown(observed.value), err)
		}
		defer fh.Close()
		if obs, err = planner.ParseObservedCSV(fh); err != nil {
			var te *planner.TableError
			if errors.As(err, &te) {
				return nil, 0, usageErrorf("--observed %s: %s", shown(observed.value), te.Error())
			}
			return nil, 0, fmt.Errorf("--observed %s: %w", shown(observed.value), err)
		}
	}
	if past.set {
		p, err := wholeNumber(past, 0, 0, len(nights), fmt.Sprintf("a whole number of nights 0..%d", len(nights)))
		return obs, p, err
	}
	windows, err := planner.RunNightWindows(site, loc, c, nights)
	if err != nil {
		return nil, 0, fromInputError(err, "not accepted", nil)
	}
	return obs, planner.PastThrough(windows, obs), nil
}

func nightLabel(n planner.RunNight) string {
	return fmt.Sprintf("%04d-%02d-%02d", n.Year, int(n.Month), n.Day)
}

func partName(n planner.RunNight) string {
	if n.Part == "" {
		return string(planner.PartFull)
	}
	return string(n.Part)
}

// checkRunFinite makes sure no NaN reaches the output.
func checkRunFinite(out export.Run) error {
	for _, n := range out.Nights {
		pd := export.PlanDoc{Night: n.Night}
		for _, b := range n.Blocks {
			pd.Blocks = append(pd.Blocks, b.BlockDoc)
		}
		if err := checkPlanFinite(pd); err != nil {
			return fmt.Errorf("night %s: %w", n.Date, err)
		}
	}
	for _, p := range out.Precision {
		if r := p.RV; r != nil {
			for _, q := range append([]planner.RVPrecisionDoc{r.Now, r.After}, r.PerNight...) {
				if err := checkFinite([]string{"σK", "σγ", "σφ0", "σK/K"}, q.SigmaK, q.SigmaGamma, q.SigmaPhase0, q.RelK); err != nil {
					return fmt.Errorf("%s: %w", p.Target, err)
				}
			}
		}
	}
	for _, t := range out.Targets {
		for _, g := range t.Goals {
			if err := checkFinite([]string{"coverage value"}, g.Value); err != nil {
				return fmt.Errorf("%s: %w", t.Target, err)
			}
			for _, n := range g.Nights {
				if err := checkFinite([]string{"airmass", "airmass", "phase error"}, n.AirmassMin, n.AirmassMax, n.PhaseErr); err != nil {
					return fmt.Errorf("%s: %w", t.Target, err)
				}
			}
		}
	}
	return nil
}

// printRun writes the human run sheet: the objective, every night's
// blocks, the coverage table and the best nights.
func printRun(w io.Writer, rp *planner.RunPlan, out export.Run, loc *time.Location, acq float64) error {
	var b strings.Builder
	printRunHeader(&b, rp, out, loc, acq)
	for k := range rp.Nights {
		if err := printRunNight(&b, rp, k, loc); err != nil {
			return err
		}
	}
	if err := printRunCoverage(&b, rp); err != nil {
		return err
	}
	if err := printPrecision(&b, out.Precision); err != nil {
		return err
	}
	printRunBestNights(&b, rp)
	b.WriteString(planner.SafetyCaution + "\n")
	_, err := io.WriteString(w, b.String())
	return err
}

// printRunHeader writes the nights, site, limits and objective.
func printRunHeader(b *strings.Builder, rp *planner.RunPlan, out export.Run, loc *time.Location, acq float64) {
	first, last := rp.Nights[0].Night, rp.Nights[len(rp.Nights)-1].Night
	fmt.Fprintf(b, "Run of %d night(s), %s to %s (%s), site %s\n", len(rp.Nights), first, last, loc, siteLine(rp.Request.Site))
	c := out.Constraints
	fmt.Fprintf(b, "Limits: Sun below %s° (%s), airmass ≤ %s", fmtG(c.SunAltMaxDeg), c.Twilight, fmtG(c.MaxAirmass))
	if c.MinMoonSepDeg > 0 {
		fmt.Fprintf(b, ", Moon ≥ %s° away", fmtG(c.MinMoonSepDeg))
	}
	fmt.Fprintf(b, ", Sun avoidance %s°; acquisition %s s per visit\n", fmtG(c.SunAvoidDeg), fmtG(acq))
	o := out.Objective
	fmt.Fprintf(b, "Coverage objective: J = %s, %.1f%% of the %s that meeting every requirement exactly is worth (at most %s; greedy pass %s",
		fmtJ(o.Value), 100*o.Fraction, fmtJ(o.RequiredValue), fmtJ(o.MaxValue), fmtJ(o.GreedyValue))
	if o.IndependentValue != nil {
		fmt.Fprintf(b, "; each night planned on its own: %s", fmtJ(*o.IndependentValue))
	}
	fmt.Fprintf(b, "), %d night schedules solved, %d improvement round(s)\n", o.Solves, o.Rounds)
}

// printRunNight writes night k: its heading, and its dark time and blocks
// or, for a night over, what was observed.
func printRunNight(b *strings.Builder, rp *planner.RunPlan, k int, loc *time.Location) error {
	lt := func(t time.Time) string { return t.In(loc).Format("15:04") }
	ut := func(t time.Time) string { return t.UTC().Format("15:04") }
	np := rp.Nights[k]
	nt := np.Night
	label := time.Date(nt.Year, nt.Month, nt.Day, 12, 0, 0, 0, loc).Format("Mon 2006-01-02")
	part := map[string]string{"full": "full night", "first": "first half", "second": "second half"}[partName(nt)]
	fmt.Fprintf(b, "\nNight %d: %s, %s", k+1, label, part)
	switch partName(nt) {
	case "first":
		fmt.Fprintf(b, " (until %s local, %s UTC)", lt(np.To), ut(np.To))
	case "second":
		fmt.Fprintf(b, " (from %s local, %s UTC)", lt(np.From), ut(np.From))
	}
	if np.Past {
		n := 0
		for _, e := range rp.Exposures {
			if !e.Planned && e.Night == k && !e.Failed {
				n++
			}
		}
		fmt.Fprintf(b, ": over, %d exposure(s) observed\n", n)
		return nil
	}
	b.WriteString("\n")
	for _, dk := range np.Plan.Dark {
		fmt.Fprintf(b, "  Dark time %s–%s local (%s–%s UTC)\n", lt(dk.Start), lt(dk.End), ut(dk.Start), ut(dk.End))
	}
	tb := newTable(b)
	tb.row("  Start", "(UTC)", "End", "(UTC)", "Target", "Goal", "Exposures", "Phase", "Airmass")
	for _, bl := range np.Plan.Blocks {
		goal := "filler"
		if !bl.Filler {
			goal = fmt.Sprintf("%.3f", bl.Goal.Center)
		}
		tb.row("  "+bl.Start.In(loc).Format("15:04:05"), bl.Start.UTC().Format("15:04:05"), bl.End.In(loc).Format("15:04:05"), bl.End.UTC().Format("15:04:05"),
			bl.Target, goal, fmt.Sprintf("%d×%ss+%ss", bl.N, fmtG(bl.ExposureS), fmtG(bl.OverheadS)),
			fmt.Sprintf("%.3f→%.3f", bl.PhaseStart, bl.PhaseEnd), fmt.Sprintf("%.2f–%.2f", bl.AirmassMin, bl.AirmassMax))
	}
	if len(np.Plan.Blocks) == 0 {
		tb.row("  (no block)", "", "", "", "", "", "", "", "")
	}
	return tb.flush()
}

// printRunCoverage writes the coverage table, night by night, and the
// phase bins when asked for.
func printRunCoverage(b *strings.Builder, rp *planner.RunPlan) error {
	b.WriteString("\nCoverage: exposures in each goal window, night by night (observed+planned):\n")
	tb := newTable(b)
	head := []string{"  Target", "Goal", "Wants"}
	for k := range rp.Nights {
		head = append(head, fmt.Sprintf("N%d", k+1))
	}
	tb.row(append(head, "Status", "Reachable nights left")...)
	for _, tc := range rp.Coverage {
		for _, gc := range tc.Goals {
			row := []string{"  " + tc.Target, fmt.Sprintf("%.3f", gc.Goal.Center), fmt.Sprintf("%d×%d", gc.NeedExposures, gc.NeedNights)}
			for _, nc := range gc.PerNight {
				row = append(row, nightCount(nc))
			}
			tb.row(append(row, string(gc.Status), fmt.Sprint(gc.ReachableNights))...)
		}
	}
	if err := tb.flush(); err != nil {
		return err
	}
	var short []string
	for _, tc := range rp.Coverage {
		for _, gc := range tc.Goals {
			if gc.Shortfall != "" && gc.Status != planner.CoverageUnreachable {
				short = append(short, fmt.Sprintf("  %s, phase %.3f (%s): %s", tc.Target, gc.Goal.Center, gc.Status, gc.Shortfall))
			}
		}
	}
	if len(short) > 0 {
		b.WriteString("\nShort of the requirement:\n" + strings.Join(short, "\n") + "\n")
	}
	if rp.Request.Bins > 0 {
		fmt.Fprintf(b, "\nPhase bins (%d, exposures per bin from phase 0):\n", rp.Request.Bins)
		for _, tc := range rp.Coverage {
			var cells []string
			for _, bc := range tc.Bins {
				cells = append(cells, fmt.Sprint(bc.Observed+bc.Planned))
			}
			fmt.Fprintf(b, "  %s: %s\n", tc.Target, strings.Join(cells, " "))
		}
	}
	return nil
}

// nightCount is a coverage cell: "2+1" observed and planned, "2 obs",
// "1", or "·" for none.
func nightCount(nc planner.NightCount) string {
	switch {
	case nc.Observed > 0 && nc.Planned > 0:
		return fmt.Sprintf("%d+%d", nc.Observed, nc.Planned)
	case nc.Observed > 0:
		return fmt.Sprintf("%d obs", nc.Observed)
	case nc.Planned > 0:
		return fmt.Sprint(nc.Planned)
	}
	return "·"
}

// printRunBestNights writes, per goal, the first four nights it can be
// reached on.
func printRunBestNights(b *strings.Builder, rp *planner.RunPlan) {
	b.WriteString("\nBest nights per goal (most exposures one block can hold; airmass over the windows):\n")
	for _, tr := range rp.Reach {
		for _, gr := range tr.Goals {
			if len(gr.Nights) == 0 {
				fmt.Fprintf(b, "  %s %.3f: none — %s\n", tr.Target, gr.Goal.Center, gr.Unreachable)
				continue
			}
			var parts []string
			for i, gn := range gr.Nights {
				if i == 4 {
					parts = append(parts, fmt.Sprintf("… %d more", len(gr.Nights)-4))
					break
				}
				parts = append(parts, fmt.Sprintf("%s (%d, %.0f min, X %.2f–%.2f)", rp.Nights[gn.Night].Night, gn.Capacity, gn.Duration.Minutes(), gn.AirmassMin, gn.AirmassMax))
			}
			fmt.Fprintf(b, "  %s %.3f: %s\n", tr.Target, gr.Goal.Center, strings.Join(parts, ", "))
		}
	}
}

// fmtJ formats an objective value (millionths) in units.
func fmtJ(v int64) string { return f(float64(v)/1e6, 3) }

// printPrecision writes the predicted precision of the targets with an RV
// goal: now (the observing log), after the plan, and the exposures still
// needed for the wanted σK/K.
func printPrecision(b *strings.Builder, docs []planner.PrecisionDoc) error {
	if !slices.ContainsFunc(docs, func(p planner.PrecisionDoc) bool { return p.RV != nil }) {
		return printTimingPrecision(b, docs)
	}
	b.WriteString("\nPredicted precision (Fisher matrix at the exposures' mid-phases; now = observing log):\n")
	tb := newTable(b)
	tb.row("  Target", "Model", "K km/s", "σv km/s", "Now σK/K", "After plan σK/K", "σK km/s", "Wanted", "Still needed")
	for _, p := range docs {
		r := p.RV
		if r == nil {
			continue
		}
		rel := func(q planner.RVPrecisionDoc) string {
			return fmt.Sprintf("%s (%d)", planner.FormatRelPercent(q.RelK, q.Determined), q.N)
		}
		want, need := "—", "—"
		if r.WantRelK > 0 {
			want = "≤ " + planner.FormatRelPercent(r.WantRelK, true)
			need = "over " + fmt.Sprint(planner.MaxExposuresNeeded)
			if r.NeedAfter != nil {
				need = fmt.Sprintf("%d exposure(s)", *r.NeedAfter)
			}
		}
		sk := "—"
		if r.After.Determined {
			sk = f(r.After.SigmaK, 3)
		}
		tb.row("  "+p.Target, string(r.Model), fmtG(r.KKms), fmtG(r.SigmaVKms), rel(r.Now), rel(r.After), sk, want, need)
	}
	if err := tb.flush(); err != nil {
		return err
	}
	b.WriteString("  (exposures in brackets; still needed: beyond the plan, at the velocity extremes, a lower bound)\n")
	return printTimingPrecision(b, docs)
}

// printTimingPrecision writes the timing targets' predicted σT0 and σP.
func printTimingPrecision(b *strings.Builder, docs []planner.PrecisionDoc) error {
	tb := newTable(b)
	head := false
	for _, p := range docs {
		if p.TimingNote != "" {
			fmt.Fprintf(b, "  %s: %s\n", p.Target, p.TimingNote)
		}
		t := p.Timing
		if t == nil {
			continue
		}
		if !head {
			b.WriteString("\nPredicted ephemeris precision (covariance of the fit; planned timings of the reference event):\n")
			tb.row("  Target", "Timings now", "σT0 s", "σP s", "Planned timings", "σT0 s", "σP s")
			head = true
		}
		sec := func(d float64) string { return strconv.FormatFloat(d*86400, 'g', 3, 64) }
		tb.row("  "+p.Target, fmt.Sprintf("%d (%s)", t.Now.N, t.Now.Source), sec(t.Now.SigmaT0Days), sec(t.Now.SigmaPDays),
			fmt.Sprint(t.Planned), sec(t.After.SigmaT0Days), sec(t.After.SigmaPDays))
	}
	return tb.flush()
}
