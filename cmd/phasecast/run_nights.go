package main

// The `run` command (its file is not run.go: that name holds the dispatcher).

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
Every goal wants --n-exposures exposures (0 = as many as fit) on each of
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
what is still missing.`

func runRun(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("run", runSynopsis)
	sf := addSiteFlags(fl)
	tz := fl.text("tz", "ZONE", "", "IANA time zone of the site, e.g. America/Santiago or UTC; required")
	from := fl.text("from", "YYYY-MM-DD", "", "local date of the first night's evening; with --nights")
	nNights := fl.text("nights", "N", "", "number of consecutive full nights from --from, 1..366")
	dates := fl.text("dates", "LIST", "", "allocated nights: dates YYYY-MM-DD[:first|:second], comma-separated, in order")
	targets := fl.text("targets", "FILE.csv", "", "targets file (CSV, as for plan); required")
	observed := fl.text("observed", "LOG.csv", "", "log of exposures already taken (CSV, columns above)")
	past := fl.text("past", "N", "the nights the log reaches", "nights already over, 0..number of nights")
	cf := addConstraintFlags(fl)
	acquire := fl.text("acquire-s", "S", "120", "acquisition overhead per visit (slew, centring), seconds 0..3600")
	nExp := fl.text("n-exposures", "N", "0", "exposures wanted per goal and night (0 = as many as fit)")
	minNights := fl.text("min-nights", "M", "1", "nights each goal wants its exposures on, 1..366")
	bins := fl.text("bins", "N", "0", "also count the coverage in N phase bins, 2..100 (0 = none)")
	binGoals := fl.boolean("bin-goals", "plan for the --bins phase bins instead of the CSV's phases (a light curve)")
	step := fl.text("step-s", "S", "60", "time resolution of the plan, seconds 1..900")
	rounds := fl.text("rounds", "N", "2", "improvement rounds after the greedy pass, 0..100")
	fill := fl.boolean("fill", "fill idle dark time with filler blocks of the most valuable observable target")
	compare := fl.boolean("compare", "also plan every night on its own (as plan does) and show that objective")
	inf := addPlanInstrumentFlags(fl)
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
	nights, err := runNightFlags(from, nNights, dates)
	if err != nil {
		return err
	}
	c, err := cf.constraints()
	if err != nil {
		return err
	}
	acq, err := number(acquire, false, 120, 0, 3600, "seconds 0..3600")
	if err != nil {
		return err
	}
	n, err := wholeNumber(nExp, 0, 0, 10000, "a whole number 0..10000 (0 = as many as fit)")
	if err != nil {
		return err
	}
	m, err := wholeNumber(minNights, 1, 1, planner.MaxRunNights, "a whole number 1..366")
	if err != nil {
		return err
	}
	nb, err := wholeNumber(bins, 0, 0, planner.MaxBins, "0 (none) or a whole number 2..100")
	if err == nil && nb == 1 {
		err = fieldError(bins, "out of range", "0 (none) or a whole number 2..100")
	}
	if err != nil {
		return err
	}
	if *binGoals && nb == 0 {
		return usageErrorf("--bin-goals needs --bins N (2..100): the number of phase bins to plan for")
	}
	stepS, err := number(step, false, 60, 1, 900, "seconds 1..900")
	if err != nil {
		return err
	}
	nr, err := wholeNumber(rounds, 2, 0, 100, "a whole number 0..100")
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
			list[i].Goals[k].NExposures, list[i].Goals[k].MinNights = n, m
		}
		if *binGoals {
			if list[i].Goals, err = planner.PhaseBinGoals(nb, list[i].Goals[0]); err != nil {
				return err
			}
		}
	}
	req := planner.RunRequest{Site: site, Zone: loc, Nights: nights, Targets: list, Constraints: c,
		Options: planner.Options{StepS: stepS, Fill: *fill}, Bins: nb, Rounds: nr, CompareIndependent: *compare, Instrument: inst}
	if nr == 0 {
		req.Rounds = -1
	}
	if req.Observed, req.Past, err = runObserved(observed, past, site, loc, c, nights); err != nil {
		return err
	}
	rp, err := planner.PlanRun(ctx, req, nil)
	if err != nil {
		var te *planner.TableError
		if errors.As(err, &te) {
			return usageErrorf("--observed %s: %s", shown(observed.value), te.Error())
		}
		return fromInputError(err, "not accepted", nil)
	}
	out, err := runOutput(rp, site, loc, acq)
	if err != nil {
		return fromInputError(err, "not accepted", nil)
	}
	if err := checkRunFinite(out); err != nil {
		return err
	}
	if *asJSON {
		return writeJSON(stdout, out)
	}
	return printRun(stdout, rp, out, loc, acq)
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

// runJSONOut is the `run --json` object.
type runJSONOut struct {
	Zone        string            `json:"zone"`
	Nights      []runNightJSON    `json:"nights"`
	Coverage    []runCoverageJSON `json:"coverage"`
	BestNights  []runBestJSON     `json:"best_nights"`
	Objective   runObjectiveJSON  `json:"objective"`
	Constraints constraintsJSON   `json:"constraints"`
	Observed    []runObservedJSON `json:"observed"`
	Caution     string            `json:"caution"`
}

// runNightJSON is one night: its date and part, planning window, whether it
// is over, the night's events, and (for nights still to come) the blocks
// and unscheduled goals exactly as `plan --json` gives them.
type runNightJSON struct {
	Date        string            `json:"date"`
	Part        string            `json:"part"`
	From        planTime          `json:"from"`
	To          planTime          `json:"to"`
	Past        bool              `json:"past"`
	Night       nightJSON         `json:"night"`
	Dark        []intervalJSON    `json:"dark"`
	Blocks      []planBlockJSON   `json:"blocks"`
	Unscheduled []unscheduledJSON `json:"unscheduled"`
	Warnings    []warningJSON     `json:"warnings"`
}

type runNightCountJSON struct {
	Observed int `json:"observed"`
	Planned  int `json:"planned"`
}

// runCoverageJSON is one target's coverage.
type runCoverageJSON struct {
	Target   string        `json:"target"`
	Priority int           `json:"priority"`
	Goals    []runGoalJSON `json:"goals"`
	Bins     []runBinJSON  `json:"bins,omitempty"`
}

type runGoalJSON struct {
	PhaseGoal       float64             `json:"phase_goal"`
	PhaseHalfWidth  float64             `json:"phase_halfwidth"`
	NeedExposures   int                 `json:"need_exposures"`
	NeedNights      int                 `json:"need_nights"`
	Observed        int                 `json:"observed"`
	Planned         int                 `json:"planned"`
	PerNight        []runNightCountJSON `json:"per_night"`
	NightsMet       int                 `json:"nights_met"`
	Status          string              `json:"status"`
	Value           float64             `json:"value"`
	ReachableNights int                 `json:"reachable_nights"`
}

type runBinJSON struct {
	Lo       float64 `json:"phase_lo"`
	Hi       float64 `json:"phase_hi"`
	Observed int     `json:"observed"`
	Planned  int     `json:"planned"`
	Nights   int     `json:"nights"`
}

// runBestJSON is the best-night search for one target.
type runBestJSON struct {
	Target  string            `json:"target"`
	Goals   []runBestGoalJSON `json:"goals"`
	Ranking []runRankJSON     `json:"ranking"`
}

type runBestGoalJSON struct {
	PhaseGoal   float64            `json:"phase_goal"`
	Nights      []runBestNightJSON `json:"nights"`
	Unreachable string             `json:"unreachable,omitempty"`
}

type runBestNightJSON struct {
	Date        string         `json:"date"`
	Capacity    int            `json:"capacity"`
	DurationMin float64        `json:"duration_min"`
	AirmassMin  float64        `json:"airmass_min"`
	AirmassMax  float64        `json:"airmass_max"`
	PhaseErr    float64        `json:"phase_err"`
	Windows     []intervalJSON `json:"windows"`
}

type runRankJSON struct {
	Date       string  `json:"date"`
	Goals      int     `json:"goals"`
	Fraction   float64 `json:"fraction"`
	AirmassMin float64 `json:"airmass_min"`
}

// runObjectiveJSON gives the run objective J (coverage notes of the
// planner), as a fraction of what meeting every requirement exactly is
// worth (required_value; above 1 with coverage beyond the requirements,
// which does not mean every requirement is met), the largest J the run's
// nights allow (max_value, never below value), and the raw values in
// millionths.
type runObjectiveJSON struct {
	Fraction         float64  `json:"fraction"`
	Value            int64    `json:"value"`
	RequiredValue    int64    `json:"required_value"`
	MaxValue         int64    `json:"max_value"`
	GreedyValue      int64    `json:"greedy_value"`
	IndependentValue *int64   `json:"independent_value"`
	IndependentFrac  *float64 `json:"independent_fraction"`
	Rounds           int      `json:"rounds"`
	Solves           int      `json:"solves"`
}

type runObservedJSON struct {
	Target    string   `json:"target"`
	Night     string   `json:"date"`
	Mid       planTime `json:"mid"`
	ExposureS float64  `json:"exposure_s"`
	Phase     float64  `json:"phase"`
	Failed    bool     `json:"failed"`
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

func runOutput(rp *planner.RunPlan, site ephem.Site, loc *time.Location, acq float64) (runJSONOut, error) {
	out := runJSONOut{Zone: loc.String(), Caution: planner.SafetyCaution,
		Nights: []runNightJSON{}, Coverage: []runCoverageJSON{}, BestNights: []runBestJSON{}, Observed: []runObservedJSON{}}
	for _, np := range rp.Nights {
		nt := np.Night
		ev := ephem.Night(site, nt.Year, nt.Month, nt.Day, loc)
		nj := runNightJSON{Date: nightLabel(nt), Part: partName(nt), From: planTime(np.From), To: planTime(np.To), Past: np.Past,
			Night: nightObject(ev), Dark: []intervalJSON{}, Blocks: []planBlockJSON{}, Unscheduled: []unscheduledJSON{}, Warnings: []warningJSON{}}
		if np.Plan != nil {
			po := planOutput(np.Plan, ev, acq)
			nj.Dark, nj.Blocks, nj.Unscheduled, nj.Warnings = po.Dark, po.Blocks, po.Unscheduled, po.Warnings
			out.Constraints = po.Constraints
		}
		out.Nights = append(out.Nights, nj)
	}
	if len(rp.Nights) > 0 && out.Constraints.Twilight == "" {
		rc, err := rp.Request.Constraints.Resolved()
		if err != nil {
			return out, err
		}
		out.Constraints = constraintsJSON{Twilight: string(rc.Twilight), SunAltMaxDeg: rc.SunAltMaxDeg, MaxAirmass: rc.MaxAirmass,
			MinAltDeg: rc.MinAltDeg, MinMoonSepDeg: rc.MinMoonSepDeg, MaxMoonIllum: rc.MaxMoonIllum, ZenithExclDeg: rc.ZenithExclDeg,
			SunAvoidDeg: rc.SunAvoidDeg, HorizonPoints: len(rc.Horizon), AcquireS: acq}
	}
	for _, tc := range rp.Coverage {
		cj := runCoverageJSON{Target: tc.Target, Priority: tc.Priority, Goals: []runGoalJSON{}}
		for _, gc := range tc.Goals {
			gj := runGoalJSON{PhaseGoal: gc.Goal.Center, PhaseHalfWidth: gc.Goal.HalfWidth, NeedExposures: gc.NeedExposures, NeedNights: gc.NeedNights,
				Observed: gc.Observed, Planned: gc.Planned, NightsMet: gc.NightsMet, Status: string(gc.Status), Value: gc.Value,
				ReachableNights: gc.ReachableNights}
			for _, nc := range gc.PerNight {
				gj.PerNight = append(gj.PerNight, runNightCountJSON{nc.Observed, nc.Planned})
			}
			cj.Goals = append(cj.Goals, gj)
		}
		for _, b := range tc.Bins {
			cj.Bins = append(cj.Bins, runBinJSON{Lo: b.Lo, Hi: b.Hi, Observed: b.Observed, Planned: b.Planned, Nights: b.Nights})
		}
		out.Coverage = append(out.Coverage, cj)
	}
	for _, tr := range rp.Reach {
		bj := runBestJSON{Target: tr.Target, Goals: []runBestGoalJSON{}, Ranking: []runRankJSON{}}
		for _, gr := range tr.Goals {
			gj := runBestGoalJSON{PhaseGoal: gr.Goal.Center, Nights: []runBestNightJSON{}, Unreachable: gr.Unreachable}
			for _, gn := range gr.Nights {
				nj := runBestNightJSON{Date: rp.Nights[gn.Night].Night.String(), Capacity: gn.Capacity, DurationMin: gn.Duration.Minutes(),
					AirmassMin: gn.AirmassMin, AirmassMax: gn.AirmassMax, PhaseErr: gn.PhaseErr, Windows: []intervalJSON{}}
				for _, w := range gn.Windows {
					nj.Windows = append(nj.Windows, intervalJSON{Start: planTime(w.Start), End: planTime(w.End)})
				}
				gj.Nights = append(gj.Nights, nj)
			}
			bj.Goals = append(bj.Goals, gj)
		}
		for _, r := range tr.Ranking {
			bj.Ranking = append(bj.Ranking, runRankJSON{Date: rp.Nights[r.Night].Night.String(), Goals: r.Goals, Fraction: r.Fraction, AirmassMin: r.AirmassMin})
		}
		out.BestNights = append(out.BestNights, bj)
	}
	for _, e := range rp.Exposures {
		if !e.Planned {
			out.Observed = append(out.Observed, runObservedJSON{Target: e.Target, Night: rp.Nights[e.Night].Night.String(), Mid: planTime(e.Mid),
				ExposureS: e.ExposureS, Phase: e.Phase, Failed: e.Failed})
		}
	}
	o := runObjectiveJSON{Value: rp.Value, RequiredValue: rp.RequiredValue, MaxValue: rp.MaxValue, GreedyValue: rp.GreedyValue,
		Rounds: rp.Rounds, Solves: rp.Solves}
	if rp.RequiredValue > 0 {
		o.Fraction = float64(rp.Value) / float64(rp.RequiredValue)
	}
	if rp.Request.CompareIndependent {
		v := rp.IndependentValue
		o.IndependentValue = &v
		if rp.RequiredValue > 0 {
			f := float64(v) / float64(rp.RequiredValue)
			o.IndependentFrac = &f
		}
	}
	out.Objective = o
	return out, nil
}

// checkRunFinite makes sure no NaN reaches the output.
func checkRunFinite(out runJSONOut) error {
	for _, n := range out.Nights {
		if err := checkPlanFinite(planJSON{Blocks: n.Blocks, Night: n.Night}); err != nil {
			return fmt.Errorf("night %s: %w", n.Date, err)
		}
	}
	for _, c := range out.Coverage {
		for _, g := range c.Goals {
			if err := checkFinite([]string{"coverage value"}, g.Value); err != nil {
				return fmt.Errorf("%s: %w", c.Target, err)
			}
		}
	}
	for _, b := range out.BestNights {
		for _, g := range b.Goals {
			for _, n := range g.Nights {
				if err := checkFinite([]string{"airmass", "airmass", "phase error"}, n.AirmassMin, n.AirmassMax, n.PhaseErr); err != nil {
					return fmt.Errorf("%s: %w", b.Target, err)
				}
			}
		}
	}
	return nil
}

// printRun writes the human run sheet: the objective, every night's
// blocks, the coverage table and the best nights.
func printRun(w io.Writer, rp *planner.RunPlan, out runJSONOut, loc *time.Location, acq float64) error {
	var b strings.Builder
	req := rp.Request
	first, last := rp.Nights[0].Night, rp.Nights[len(rp.Nights)-1].Night
	fmt.Fprintf(&b, "Run of %d night(s), %s to %s (%s), site %s\n", len(rp.Nights), first, last, loc, siteLine(req.Site))
	c := out.Constraints
	fmt.Fprintf(&b, "Limits: Sun below %s° (%s), airmass ≤ %s", fmtG(c.SunAltMaxDeg), c.Twilight, fmtG(c.MaxAirmass))
	if c.MinMoonSepDeg > 0 {
		fmt.Fprintf(&b, ", Moon ≥ %s° away", fmtG(c.MinMoonSepDeg))
	}
	fmt.Fprintf(&b, ", Sun avoidance %s°; acquisition %s s per visit\n", fmtG(c.SunAvoidDeg), fmtG(acq))
	o := out.Objective
	fmt.Fprintf(&b, "Coverage objective: J = %s, %.1f%% of the %s that meeting every requirement exactly is worth (at most %s; greedy pass %s",
		fmtJ(o.Value), 100*o.Fraction, fmtJ(o.RequiredValue), fmtJ(o.MaxValue), fmtJ(o.GreedyValue))
	if o.IndependentValue != nil {
		fmt.Fprintf(&b, "; each night planned on its own: %s", fmtJ(*o.IndependentValue))
	}
	fmt.Fprintf(&b, "), %d night schedules solved, %d improvement round(s)\n", o.Solves, o.Rounds)
	lt := func(t time.Time) string { return t.In(loc).Format("15:04") }
	ut := func(t time.Time) string { return t.UTC().Format("15:04") }
	for k, np := range rp.Nights {
		nt := np.Night
		label := time.Date(nt.Year, nt.Month, nt.Day, 12, 0, 0, 0, loc).Format("Mon 2006-01-02")
		part := map[string]string{"full": "full night", "first": "first half", "second": "second half"}[partName(nt)]
		fmt.Fprintf(&b, "\nNight %d: %s, %s", k+1, label, part)
		switch partName(nt) {
		case "first":
			fmt.Fprintf(&b, " (until %s local, %s UTC)", lt(np.To), ut(np.To))
		case "second":
			fmt.Fprintf(&b, " (from %s local, %s UTC)", lt(np.From), ut(np.From))
		}
		if np.Past {
			n := 0
			for _, e := range rp.Exposures {
				if !e.Planned && e.Night == k && !e.Failed {
					n++
				}
			}
			fmt.Fprintf(&b, ": over, %d exposure(s) observed\n", n)
			continue
		}
		b.WriteString("\n")
		for _, dk := range np.Plan.Dark {
			fmt.Fprintf(&b, "  Dark time %s–%s local (%s–%s UTC)\n", lt(dk.Start), lt(dk.End), ut(dk.Start), ut(dk.End))
		}
		tb := newTable(&b)
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
		if err := tb.flush(); err != nil {
			return err
		}
	}
	b.WriteString("\nCoverage: exposures in each goal window, night by night (observed+planned):\n")
	tb := newTable(&b)
	head := []string{"  Target", "Goal", "Wants"}
	for k := range rp.Nights {
		head = append(head, fmt.Sprintf("N%d", k+1))
	}
	tb.row(append(head, "Status", "Reachable nights left")...)
	for _, tc := range rp.Coverage {
		for _, gc := range tc.Goals {
			row := []string{"  " + tc.Target, fmt.Sprintf("%.3f", gc.Goal.Center), fmt.Sprintf("%d×%d", gc.NeedExposures, gc.NeedNights)}
			for _, nc := range gc.PerNight {
				switch {
				case nc.Observed > 0 && nc.Planned > 0:
					row = append(row, fmt.Sprintf("%d+%d", nc.Observed, nc.Planned))
				case nc.Observed > 0:
					row = append(row, fmt.Sprintf("%d obs", nc.Observed))
				case nc.Planned > 0:
					row = append(row, fmt.Sprint(nc.Planned))
				default:
					row = append(row, "·")
				}
			}
			tb.row(append(row, string(gc.Status), fmt.Sprint(gc.ReachableNights))...)
		}
	}
	if err := tb.flush(); err != nil {
		return err
	}
	if req.Bins > 0 {
		fmt.Fprintf(&b, "\nPhase bins (%d, exposures per bin from phase 0):\n", req.Bins)
		for _, tc := range rp.Coverage {
			var cells []string
			for _, bc := range tc.Bins {
				cells = append(cells, fmt.Sprint(bc.Observed+bc.Planned))
			}
			fmt.Fprintf(&b, "  %s: %s\n", tc.Target, strings.Join(cells, " "))
		}
	}
	b.WriteString("\nBest nights per goal (most exposures one block can hold; airmass over the windows):\n")
	for _, tr := range rp.Reach {
		for _, gr := range tr.Goals {
			if len(gr.Nights) == 0 {
				fmt.Fprintf(&b, "  %s %.3f: none — %s\n", tr.Target, gr.Goal.Center, gr.Unreachable)
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
			fmt.Fprintf(&b, "  %s %.3f: %s\n", tr.Target, gr.Goal.Center, strings.Join(parts, ", "))
		}
	}
	b.WriteString(planner.SafetyCaution + "\n")
	_, err := io.WriteString(w, b.String())
	return err
}

// fmtJ formats an objective value (millionths) in units.
func fmtJ(v int64) string { return f(float64(v)/1e6, 3) }
