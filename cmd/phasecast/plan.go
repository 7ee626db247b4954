package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strings"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/planner/export"
)

const planSynopsis = `Plan one night: for every target of a CSV list, the observable intervals under the
constraints, then the exposure blocks that land on its wanted orbital phases,
scheduled for the highest total value (priorities weigh; not a greedy fill), with
every goal left out listed with its reason.

Targets file (CSV), header:
  name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority
optionally with band,mag,snr,max_smear (and a variable's faint_mag,faint_phase,
bright_mag,bright_phase): with an instrument (--aperture-m and the flags after it),
goals with an snr get each block's exposure sized for its sky, capped at max_smear
of the orbit (default 0.02); see docs/exposure.md.
phases are goal centres separated by ';' in the convention of T0 (inferior
conjunction of the companion); each goal takes as many exposures as fit in its
window. --twilight takes civil, nautical, astronomical, or a Sun altitude in
degrees (e.g. -15). The horizon file (--horizon) has one "azimuth altitude" pair
of degrees per line, azimuth from north through east; the mask is interpolated
linearly between points, wrapping through north.

Replanning the rest of a night: --start TIME (RFC 3339) plans only from TIME
on (no block or acquisition starts before it), and --observed LOG.csv (the run
command's log: target,start_utc|mid_utc,exposure_s,n_exposures,overhead_s,status)
gives the exposures already taken tonight: they stay as they were, and the goals
they served are not planned again (a goal wanting N with k done wants N − k; with
--n-exposures 0, one exposure serves it).`

func runPlan(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("plan", planSynopsis)
	sf := addSiteFlags(fl)
	tz := fl.text("tz", "ZONE", "", "IANA time zone of the site, e.g. America/Santiago or UTC; required")
	date := fl.text("date", "YYYY-MM-DD", "today in ZONE", "local calendar date of the evening the night begins")
	targets := fl.text("targets", "FILE.csv", "", "targets file (CSV, header above); required")
	cf := addConstraintFlags(fl)
	acquire := fl.text("acquire-s", "S", "120", "acquisition overhead per visit (slew, centring), seconds 0..3600")
	nExp := fl.text("n-exposures", "N", "0", "exposures wanted per goal window (0 = cover the window once, -1 = as many as fit)")
	step := fl.text("step-s", "S", "60", "time resolution of the plan, seconds 1..900")
	fill := fl.boolean("fill", "fill idle dark time with filler blocks of the most valuable observable target")
	inf := addPlanInstrumentFlags(fl)
	siteName := addSiteNameFlag(fl)
	format := fl.text("format", "text|json|csv", "text", "output format: the sheet, or the night document (docs/formats.md)")
	start := fl.text("start", "TIME", "", "replan the rest of the night from TIME (RFC 3339): nothing starts before it")
	observed := fl.text("observed", "LOG.csv", "", "with --start: exposures already taken tonight (the run command's log)")
	sheet := fl.text("sheet", "csv|json", "", "print the telescope sheet of the blocks instead (columns in docs/sheet.md)")
	asJSON := fl.boolean("json", "print one JSON object (the night document; the same as --format json)")
	if help, err := fl.parse(args, stdout); help || err != nil {
		return err
	}
	fmtName, err := outputFormatOf(format, *asJSON, "text", "json", "csv")
	if err != nil {
		return err
	}
	sheetFmt := strings.ToLower(strings.TrimSpace(sheet.value))
	if sheet.set && sheetFmt != "csv" && sheetFmt != "json" {
		return fieldError(sheet, "not a sheet format", "csv or json")
	}
	if sheet.set && (*asJSON || format.set) {
		return usageErrorf("--sheet %s with --json or --format: give one output", shown(sheet.value))
	}
	if observed.set && !start.set {
		return usageErrorf("--observed goes with --start TIME: the instant the night is planned again from")
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
	c, err := cf.constraints()
	if err != nil {
		return err
	}
	pad, err := cf.pad()
	if err != nil {
		return err
	}
	acq, err := number(acquire, false, 120, 0, 3600, "seconds 0..3600")
	if err != nil {
		return err
	}
	n, err := number(nExp, false, 0, planner.NAsManyAsFit, 10000, "a whole number -1..10000 (0 = cover the window once, -1 = as many as fit)")
	if err == nil && n != math.Trunc(n) {
		err = fieldError(nExp, "not a whole number", "a whole number -1..10000 (0 = cover the window once, -1 = as many as fit)")
	}
	if err != nil {
		return err
	}
	stepS, err := number(step, false, 60, 1, 900, "seconds 1..900")
	if err != nil {
		return err
	}
	inst, err := inf.read()
	if err != nil {
		return err
	}
	list, err := readTargets(targets)
	if err != nil {
		return err
	}
	for i := range list {
		list[i].AcquireS = acq
		for k := range list[i].Goals {
			list[i].Goals[k].NExposures = int(n)
		}
	}
	from, to := planner.NightWindow(y, m, d, loc)
	req := planner.NightRequest{Site: site, From: from, To: to, Targets: list, Constraints: c,
		Options: planner.Options{StepS: stepS, Fill: *fill, PadSigma: pad}, Instrument: inst}
	ev := ephem.Night(site, y, m, d, loc)
	var rp *planner.Replan
	var p *planner.Plan
	if start.set {
		if rp, err = replanRest(req, start, observed); err != nil {
			return err
		}
		p, list = rp.Plan, rp.Targets
	} else if p, err = planner.PlanNight(req); err != nil {
		return fromInputError(err, "not accepted", nil)
	}
	if sheet.set {
		return writeSheet(stdout, site, list, p.Blocks, sheetFmt)
	}
	out := export.NewNight(export.NewSite(siteName.value, site), fmt.Sprintf("%04d-%02d-%02d", y, int(m), d), loc.String(), p, ev, acq)
	if rp != nil {
		out.PlanDoc.Replan = export.NewReplanDoc(rp)
	}
	if err := checkPlanFinite(out.PlanDoc); err != nil {
		return err
	}
	switch fmtName {
	case "json":
		return writeJSON(stdout, out)
	case "csv":
		return writeBytes(stdout, func() ([]byte, error) { return export.NightCSV(out, loc) })
	}
	if rp != nil {
		if err := printReplanHead(stdout, rp, loc); err != nil {
			return err
		}
	}
	return printPlan(stdout, p, ev, loc, y, m, d, acq)
}

// writeSheet prints the telescope sheet of blocks (planned from targets)
// as CSV or JSON (export.SheetDoc).
func writeSheet(w io.Writer, site ephem.Site, targets []planner.Target, blocks []planner.Block, format string) error {
	rows, err := planner.TelescopeSheet(site, targets, blocks)
	if err != nil {
		return fromInputError(err, "not accepted", nil)
	}
	doc := export.NewSheetDoc(rows)
	if format == "json" {
		return writeJSON(w, doc)
	}
	return writeBytes(w, func() ([]byte, error) { return export.SheetCSV(doc) })
}

// replanRest plans the rest of the night from --start, keeping the
// exposures of --observed and not repeating the goals they served.
func replanRest(req planner.NightRequest, start, observed *textValue) (*planner.Replan, error) {
	at, err := ephem.ParseTime(start.value)
	if err != nil {
		return nil, fromInputError(err, "not a time", map[string]*textValue{"time": start})
	}
	if at.Before(req.From) || !at.Before(req.To) {
		return nil, fieldError(start, "outside the night", fmt.Sprintf("an instant from %s to %s (local noon to local noon of --date)",
			req.From.UTC().Format(time.RFC3339), req.To.UTC().Format(time.RFC3339)))
	}
	var done []planner.Exposure
	if observed.set {
		fh, err := os.Open(observed.value)
		if err != nil {
			return nil, fmt.Errorf("--observed %s: %w", shown(observed.value), err)
		}
		defer fh.Close()
		if done, err = planner.ParseObservedCSV(fh); err != nil {
			var te *planner.TableError
			if errors.As(err, &te) {
				return nil, usageErrorf("--observed %s: %s", shown(observed.value), te.Error())
			}
			return nil, fmt.Errorf("--observed %s: %w", shown(observed.value), err)
		}
		for _, e := range done {
			if e.Mid.Before(req.From) || !e.Mid.Before(at) {
				return nil, usageErrorf("--observed %s line %d: mid-time %s is not tonight before --start; accepted: exposures from %s to %s",
					shown(observed.value), e.Line, e.Mid.UTC().Format(time.RFC3339), req.From.UTC().Format(time.RFC3339), at.UTC().Format(time.RFC3339))
			}
		}
	}
	rp, err := planner.ReplanNight(req, at, done)
	if err != nil {
		return nil, fromInputError(err, "not accepted", nil)
	}
	return rp, nil
}

// printReplanHead says, above a replanned night's sheet, from when it was
// planned and what was kept.
func printReplanHead(w io.Writer, rp *planner.Replan, loc *time.Location) error {
	var b strings.Builder
	fmt.Fprintf(&b, "Replanned from %s UTC (%s local): nothing new starts before it.\n", rp.Start.UTC().Format("2006-01-02 15:04:05"), rp.Start.In(loc).Format("15:04:05"))
	if len(rp.Done) > 0 {
		fmt.Fprintf(&b, "Kept: %d exposure(s) already taken tonight.\n", len(rp.Done))
		tb := newTable(&b)
		tb.row("  Target", "Goal", "Done", "Wanted", "Still wanted")
		for _, gs := range rp.Served {
			if gs.Done == 0 {
				continue
			}
			wanted, left := fmt.Sprint(gs.Wanted), fmt.Sprint(gs.Remaining)
			if gs.Wanted == 0 {
				wanted = "as many as fit"
			}
			if gs.Remaining == 0 {
				left = "0 (served: not planned again)"
			}
			tb.row("  "+gs.Target, fmt.Sprintf("%.3f", gs.Goal.Center), fmt.Sprint(gs.Done), wanted, left)
		}
		if err := tb.flush(); err != nil {
			return err
		}
	}
	b.WriteString("\n")
	_, err := io.WriteString(w, b.String())
	return err
}

// constraintFlags are the observing-limit flags shared by plan, run and
// windows.
type constraintFlags struct {
	twilight, maxAirmass, minAlt, minMoonSep, maxMoonIllum, haMin, haMax, zenith, sunAvoid, horizon *textValue
	// padSigma widens the goal windows by k σ of phase (planner.Options.PadSigma).
	padSigma *textValue
}

// pad reads --pad-sigma.
func (cf constraintFlags) pad() (float64, error) {
	return number(cf.padSigma, false, 0, 0, 10, "0..10 (σ of the phase added to each goal window's half-width)")
}

// addConstraintFlags registers the observing-limit flags on fl.
func addConstraintFlags(fl *flags) constraintFlags {
	return constraintFlags{
		twilight:     fl.text("twilight", "NAME|DEG", "nautical", "darkness limit: civil (−6°), nautical (−12°), astronomical (−18°) or a Sun altitude −30..0"),
		maxAirmass:   fl.text("max-airmass", "X", "2.0", "highest airmass, 1..40 (0 = none, the horizon only)"),
		minAlt:       fl.text("min-alt", "DEG", "0", "lowest altitude, refracted, degrees (0 = the horizon)"),
		minMoonSep:   fl.text("min-moon-sep", "DEG", "0", "closest distance to the Moon while it is up, degrees (0 = none)"),
		maxMoonIllum: fl.text("max-moon-illum", "FRAC", "0", "brightest Moon allowed while it is up, illuminated fraction 0..1 (0 = no limit)"),
		haMin:        fl.text("ha-min", "HOURS", "", "lowest hour angle, hours −12..12 (equatorial mounts); with --ha-max"),
		haMax:        fl.text("ha-max", "HOURS", "", "highest hour angle, hours −12..12; with --ha-min"),
		zenith:       fl.text("zenith-excl", "DEG", "0", "no tracking within this distance of the zenith (alt-az mounts), degrees 0..30"),
		sunAvoid:     fl.text("sun-avoid", "DEG", "30", "never point closer than this to the Sun, degrees 0..90 (safety)"),
		horizon:      fl.text("horizon", "FILE", "", "horizon mask file: lines of \"azimuth altitude\" in degrees"),
		padSigma:     fl.text("pad-sigma", "K", "0", "widen every goal window by K times the ephemeris' 1σ phase uncertainty that night, 0..10"),
	}
}

// constraints reads the observing-limit flags into planner.Constraints.
func (cf constraintFlags) constraints() (planner.Constraints, error) {
	twilight, maxAirmass, minAlt, minMoonSep, maxMoonIllum := cf.twilight, cf.maxAirmass, cf.minAlt, cf.minMoonSep, cf.maxMoonIllum
	haMin, haMax, zenith, sunAvoid, horizon := cf.haMin, cf.haMax, cf.zenith, cf.sunAvoid, cf.horizon
	c := planner.DefaultConstraints()
	tw := strings.TrimSpace(twilight.value)
	if !twilight.set {
		tw = "nautical"
	}
	if x, ok := parseNumber(tw); ok {
		if x < -30 || x > 0 {
			return c, fieldError(twilight, "out of range", "civil, nautical, astronomical, or a Sun altitude −30..0 degrees")
		}
		c.Twilight, c.SunAltMaxDeg = planner.TwilightCustom, x
	} else if t, err := planner.ParseTwilight(tw); err != nil || t == planner.TwilightCustom {
		return c, fieldError(twilight, "not a twilight", "civil, nautical, astronomical, or a Sun altitude −30..0 degrees")
	} else {
		c.Twilight = t
	}
	var err error
	if c.MaxAirmass, err = number(maxAirmass, false, 2.0, 0, 40, "an airmass 1..40, or 0 for none"); err != nil {
		return c, err
	}
	if c.MaxAirmass > 0 && c.MaxAirmass < 1 {
		return c, fieldError(maxAirmass, "below 1", "an airmass 1..40, or 0 for none")
	}
	if c.MinAltDeg, err = number(minAlt, false, 0, -5, 89, "degrees −5..89"); err != nil {
		return c, err
	}
	if c.MinMoonSepDeg, err = number(minMoonSep, false, 0, 0, 179, "degrees 0..179"); err != nil {
		return c, err
	}
	if c.MaxMoonIllum, err = number(maxMoonIllum, false, 0, 0, 1, "an illuminated fraction 0..1 (0 = no limit)"); err != nil {
		return c, err
	}
	if haMin.set != haMax.set {
		v := haMin
		if !haMin.set {
			v = haMax
		}
		return c, fieldError(v, "given alone", "--ha-min and --ha-max together, hours −12..12, min < max")
	}
	if haMin.set {
		if c.HAMinHours, err = number(haMin, true, 0, -12, 12, "hours −12..12"); err != nil {
			return c, err
		}
		if c.HAMaxHours, err = number(haMax, true, 0, -12, 12, "hours −12..12"); err != nil {
			return c, err
		}
		if c.HAMinHours >= c.HAMaxHours {
			return c, fieldError(haMax, "not above --ha-min", "hours −12..12, greater than --ha-min")
		}
	}
	if c.ZenithExclDeg, err = number(zenith, false, 0, 0, 30, "degrees 0..30"); err != nil {
		return c, err
	}
	if c.SunAvoidDeg, err = number(sunAvoid, false, 30, 0, 90, "degrees 0..90"); err != nil {
		return c, err
	}
	if horizon.set {
		fh, err := os.Open(horizon.value)
		if err != nil {
			return c, fmt.Errorf("--horizon %s: %w", shown(horizon.value), err)
		}
		defer fh.Close()
		pts, err := planner.ParseHorizon(fh)
		if err != nil {
			return c, usageErrorf("--horizon %s: %s", shown(horizon.value), err)
		}
		c.Horizon = pts
	}
	return c, nil
}

// readTargets reads and parses the targets file; a bad file is rejected
// whole with every bad cell listed.
func readTargets(v *textValue) ([]planner.Target, error) {
	if !v.set {
		return nil, missing(v)
	}
	fh, err := os.Open(v.value)
	if err != nil {
		return nil, fmt.Errorf("--targets %s: %w", shown(v.value), err)
	}
	defer fh.Close()
	list, err := planner.ParseTargetsCSV(fh)
	if err != nil {
		var te *planner.TableError
		if errors.As(err, &te) {
			return nil, usageErrorf("--targets %s: %s", shown(v.value), te.Error())
		}
		return nil, fmt.Errorf("--targets %s: %w", shown(v.value), err)
	}
	if len(list) == 0 {
		return nil, usageErrorf("--targets %s: no targets in the file", shown(v.value))
	}
	return list, nil
}

// checkPlanFinite makes sure no NaN reaches the output.
func checkPlanFinite(out export.PlanDoc) error {
	for _, b := range out.Blocks {
		if err := checkFinite([]string{"phase", "phase", "airmass", "airmass", "phase", "smear", "phase error", "Moon separation", "parallactic angle", "hour angle", "Sun altitude"},
			b.PhaseStart, b.PhaseEnd, b.AirmassMax, b.AirmassMin, b.PhaseMid, b.Smear, b.PhaseErr, b.MoonSepDeg, b.ParallacticDeg, b.HourAngleHours, b.SunAltStartDeg); err != nil {
			return fmt.Errorf("block of %s: %w", b.Target, err)
		}
	}
	return checkFinite([]string{"Moon illumination"}, out.Night.MoonIlluminated)
}

// printPlan writes the human night sheet.
func printPlan(w io.Writer, p *planner.Plan, ev ephem.NightEvents, loc *time.Location, y int, m time.Month, d int, acq float64) error {
	var b strings.Builder
	printPlanHeader(&b, p, ev, loc, time.Date(y, m, d, 12, 0, 0, 0, loc), acq)
	if _, err := io.WriteString(w, b.String()); err != nil {
		return err
	}
	if err := printPlanBlocks(w, p, loc); err != nil {
		return err
	}
	b.Reset()
	printPlanNotes(&b, p)
	_, err := io.WriteString(w, b.String())
	return err
}

// printPlanHeader writes the night, site, limits, dark time and Moon.
func printPlanHeader(b *strings.Builder, p *planner.Plan, ev ephem.NightEvents, loc *time.Location, evening time.Time, acq float64) {
	lt := func(t time.Time) string { return t.In(loc).Format("15:04") }
	ut := func(t time.Time) string { return t.UTC().Format("15:04") }
	fmt.Fprintf(b, "Night plan for %s (%s), site %s\n", evening.Format("Monday 2006-01-02"), loc, siteLine(p.Site))
	c := p.Constraints
	fmt.Fprintf(b, "Limits: Sun below %s° (%s), airmass ≤ %s", fmtG(c.SunAltMaxDeg), c.Twilight, fmtG(c.MaxAirmass))
	if c.MinAltDeg != 0 {
		fmt.Fprintf(b, ", altitude ≥ %s°", fmtG(c.MinAltDeg))
	}
	if c.MinMoonSepDeg > 0 {
		fmt.Fprintf(b, ", Moon ≥ %s° away", fmtG(c.MinMoonSepDeg))
	}
	if c.MaxMoonIllum > 0 {
		fmt.Fprintf(b, ", Moon ≤ %s%% lit when up", fmtG(100*c.MaxMoonIllum))
	}
	if c.HAMinHours != 0 || c.HAMaxHours != 0 {
		fmt.Fprintf(b, ", hour angle %s..%s h", fmtG(c.HAMinHours), fmtG(c.HAMaxHours))
	}
	if c.ZenithExclDeg > 0 {
		fmt.Fprintf(b, ", zenith exclusion %s°", fmtG(c.ZenithExclDeg))
	}
	if len(c.Horizon) > 0 {
		fmt.Fprintf(b, ", horizon mask (%d points)", len(c.Horizon))
	}
	fmt.Fprintf(b, ", Sun avoidance %s°; acquisition %s s per visit\n", fmtG(c.SunAvoidDeg), fmtG(acq))
	if len(p.Dark) == 0 {
		fmt.Fprintf(b, "Dark time: none (the Sun stays above %s°)\n", fmtG(c.SunAltMaxDeg))
	}
	for _, dk := range p.Dark {
		fmt.Fprintf(b, "Dark time: %s–%s local (%s–%s UTC), %.1f h\n", lt(dk.Start), lt(dk.End), ut(dk.Start), ut(dk.End), dk.End.Sub(dk.Start).Hours())
	}
	moon := fmt.Sprintf("Moon: %.0f%% illuminated at midnight", 100*ev.MoonIlluminated)
	if ev.Moonrise != nil {
		moon += ", rises " + lt(*ev.Moonrise) + " local"
	}
	if ev.Moonset != nil {
		moon += ", sets " + lt(*ev.Moonset) + " local"
	}
	b.WriteString(moon + "\n\n")
}

// printPlanBlocks writes the table of blocks.
func printPlanBlocks(w io.Writer, p *planner.Plan, loc *time.Location) error {
	tb := newTable(w)
	tb.row("start", "", "end", "", "target", "goal", "exposures", "phase start→end", "airmass", "Moon", "par.angle", "notes")
	tb.row("local", "UTC", "local", "UTC", "", "", "", "", "", "", "", "")
	for _, bl := range p.Blocks {
		goal := "filler"
		if !bl.Filler {
			goal = fmt.Sprintf("%.3f±%.3f", bl.Goal.Center, bl.Goal.HalfWidth)
		}
		notes := []string{}
		if bl.AcquireS > 0 {
			notes = append(notes, fmt.Sprintf("acquire from %s", bl.Start.Add(-time.Duration(bl.AcquireS*float64(time.Second))).In(loc).Format("15:04")))
		}
		if bl.SNROK {
			notes = append(notes, snrNote(bl))
		}
		for _, wn := range bl.Warnings {
			notes = append(notes, string(wn.Code))
		}
		tb.row(bl.Start.In(loc).Format("15:04:05"), bl.Start.UTC().Format("15:04:05"), bl.End.In(loc).Format("15:04:05"), bl.End.UTC().Format("15:04:05"),
			bl.Target, goal, fmt.Sprintf("%d×%ss+%ss", bl.N, fmtG(bl.ExposureS), fmtG(bl.OverheadS)),
			fmt.Sprintf("%.3f→%.3f", bl.PhaseStart, bl.PhaseEnd),
			fmt.Sprintf("%.2f–%.2f", bl.AirmassMin, bl.AirmassMax), fmt.Sprintf("%.0f°", bl.MoonSepDeg),
			fmt.Sprintf("%+.0f°", bl.Parallactic), strings.Join(notes, ", "))
	}
	if len(p.Blocks) == 0 {
		tb.row("(no block can be scheduled)", "", "", "", "", "", "", "", "", "", "", "")
	}
	return tb.flush()
}

// printPlanNotes writes the goals left out, the warnings (each once), the
// schedule's value and the caution.
func printPlanNotes(b *strings.Builder, p *planner.Plan) {
	if len(p.Unscheduled) > 0 {
		b.WriteString("\nNot scheduled:\n")
		for _, u := range p.Unscheduled {
			fmt.Fprintf(b, "  %s, phase %.3f: %s\n", u.Target, u.Goal.Center, u.Detail)
		}
	}
	var notes []string
	seen := map[string]bool{}
	for _, wn := range p.Warnings {
		if wn.Code == planner.WarnUnreachable || wn.Code == planner.WarnSunAvoidApplied {
			continue
		}
		line := wn.Message
		if wn.Target != "" {
			line = wn.Target + ": " + line
		}
		if !seen[line] {
			seen[line] = true
			notes = append(notes, line)
		}
	}
	if len(notes) > 0 {
		b.WriteString("\nWarnings:\n")
		for _, n := range notes {
			b.WriteString("  " + n + "\n")
		}
	}
	state := "optimal"
	if !p.Optimal {
		state = "best found, not proven optimal"
	}
	fmt.Fprintf(b, "\nSchedule value %d (%s; greedy first-fit would give %d), %d candidate blocks.\n", p.Value, state, p.GreedyValue, p.Candidates)
	b.WriteString(planner.SafetyCaution + "\n")
}

// fmtG formats a number without trailing zeros.
func fmtG(x float64) string { return strings.TrimSuffix(strings.TrimRight(f(x, 3), "0"), ".") }

// snrNote is the plan sheet's note of a block's S/N per exposure and the sky
// brightness used.
func snrNote(bl planner.Block) string {
	s := fmt.Sprintf("S/N %.1f, sky %.2f mag/″²", bl.SNR, bl.SkyMag)
	if bl.SizedBySNR {
		s += " (sized)"
	}
	return s
}
