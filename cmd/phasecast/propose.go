package main

import (
	"context"
	"fmt"
	"io"
	"strings"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/planner/export"
)

const proposeSynopsis = `Size an observing proposal: the fewest nights, and the best dates, of a semester
or a date range on which every goal of a target list gets its N exposures, and
how many nights to ask for when some are lost to weather; with the hours per
night each target spends under the airmass limit over the calendar year.

Nights: --semester 2027A (1 February–31 July) or 2027B (1 August–31 January), or
--from DATE --to DATE (local dates of the first and last evening, at most 366
nights). Each night runs from local noon to local noon in --tz.

Targets: the CSV of the plan command (header
  name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority).
Every goal (each phase of a target) wants --n-exposures exposures in all, over
any number of nights.

The model. Each candidate night is planned on its own by the night planner
(every goal wanting its N). Nights are chosen one at a time: first the night
adding the most still-missing exposures (as a share of N, weighted by
priority) until every goal that the range can meet is met: that count is the
minimum with a clear sky. Then, when --loss is above 0, the night adding the
most expected coverage, until every goal reaches N with probability at least
--confidence: the nights to ask for. Each chosen night is clear independently
with probability 1 − loss; the expected coverage E[min(X, N)]/N and P(X ≥ N)
are computed exactly by dynamic programming over the chosen nights.`

func runPropose(ctx context.Context, _ func() time.Time, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("propose", proposeSynopsis)
	sf := addSiteFlags(fl)
	tz := fl.text("tz", "ZONE", "", "IANA time zone of the site, e.g. America/Santiago or UTC; required")
	semester := fl.text("semester", "YYYY[A|B]", "", "the candidate nights: semester A (Feb–Jul) or B (Aug–Jan)")
	from := fl.text("from", "YYYY-MM-DD", "", "local date of the first candidate night's evening; with --to")
	to := fl.text("to", "YYYY-MM-DD", "", "local date of the last candidate night's evening, at most 365 days after --from")
	targets := fl.text("targets", "FILE.csv", "", "targets file (CSV, as for plan); required")
	target := fl.text("target", "NAME", "all", "size the proposal for one target of the file, by name")
	nExp := fl.text("n-exposures", "N", "", "exposures each goal wants in all, 1..10000; required")
	loss := fl.text("loss", "FRAC", "0", "fraction of nights lost to weather, 0..0.95")
	confidence := fl.text("confidence", "P", "0.9", "probability with which every goal should reach N, 0.5..0.999")
	cf := addConstraintFlags(fl)
	acquire := fl.text("acquire-s", "S", "120", "acquisition overhead per visit (slew, centring), seconds 0..3600")
	step := fl.text("step-s", "S", "60", "time resolution of the night plans, seconds 1..900")
	noHours := fl.boolean("no-hours", "leave out the year's hours per night under the airmass limit")
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
	nights, err := proposeNights(semester, from, to)
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
	if !nExp.set {
		return missing(nExp)
	}
	n, err := wholeNumber(nExp, 0, 1, 10000, "a whole number of exposures 1..10000")
	if err != nil {
		return err
	}
	q, err := number(loss, false, 0, 0, planner.MaxProposalLoss, "a fraction of nights lost 0..0.95")
	if err != nil {
		return err
	}
	conf, err := number(confidence, false, planner.DefaultProposalConfidence, 0.5, 0.999, "a probability 0.5..0.999")
	if err != nil {
		return err
	}
	stepS, err := number(step, false, 60, 1, 900, "seconds 1..900")
	if err != nil {
		return err
	}
	list, err := readTargets(targets)
	if err != nil {
		return err
	}
	if list, err = pickTargets(list, target, &textValue{name: "goal"}, &textValue{name: "halfwidth"}); err != nil {
		return err
	}
	for i := range list {
		list[i].AcquireS = acq
		for k := range list[i].Goals {
			list[i].Goals[k].NExposures = n
		}
	}
	req := planner.ProposalRequest{Site: site, Zone: loc, Nights: nights, Targets: list, Constraints: c,
		Options: planner.Options{StepS: stepS}, Loss: q, Confidence: conf}
	p, err := planner.Propose(ctx, req)
	if err != nil {
		return fromInputError(err, "not accepted", nil)
	}
	var hours []planner.YearHours
	year := planner.YearOf(nights[0])
	if !*noHours {
		if hours, err = planner.ObservableHours(ctx, site, loc, c, planner.Options{StepS: stepS}, list, year); err != nil {
			return fromInputError(err, "not accepted", nil)
		}
	}
	doc := export.NewProposalDoc(p, year[0], hours, loc.String(), acq)
	if *asJSON {
		return writeJSON(stdout, doc)
	}
	return printProposal(stdout, site, p, doc, year)
}

// proposeNights reads --semester, or --from with --to.
func proposeNights(semester, from, to *textValue) ([]planner.RunNight, error) {
	switch {
	case semester.set && (from.set || to.set):
		return nil, usageErrorf("give either --semester, or --from with --to, not both")
	case semester.set:
		ns, err := planner.Semester(semester.value)
		if err != nil {
			return nil, fromInputError(err, "not a semester", map[string]*textValue{"semester": semester})
		}
		return ns, nil
	case !from.set || !to.set:
		return nil, usageErrorf("missing the candidate nights: give --semester YYYYA|YYYYB, or --from YYYY-MM-DD with --to YYYY-MM-DD")
	}
	y0, m0, d0, err := ephem.ParseDate(from.value)
	if err != nil {
		return nil, fromInputError(err, "not a date", map[string]*textValue{"date": from})
	}
	y1, m1, d1, err := ephem.ParseDate(to.value)
	if err != nil {
		return nil, fromInputError(err, "not a date", map[string]*textValue{"date": to})
	}
	ns, err := planner.NightsBetween(y0, m0, d0, y1, m1, d1)
	if err != nil {
		return nil, fieldError(to, "out of range", fmt.Sprintf("a date from --from to %d days after it", planner.MaxRunNights-1))
	}
	return ns, nil
}

// printProposal writes the proposal as text.
func printProposal(w io.Writer, site ephem.Site, p *planner.Proposal, doc export.ProposalDoc, year []planner.RunNight) error {
	var b strings.Builder
	req := p.Request
	fmt.Fprintf(&b, "Proposal %s to %s (%d nights), site %s, zone %s\n", doc.From, doc.To, doc.Nights, siteLine(site), doc.Zone)
	rc := doc.Constraints
	fmt.Fprintf(&b, "Limits: Sun below %s° (%s), airmass ≤ %s, Sun avoidance %s°\n", fmtG(rc.SunAltMaxDeg), rc.Twilight, fmtG(rc.MaxAirmass), fmtG(rc.SunAvoidDeg))
	fmt.Fprintf(&b, "Weather: %s of nights lost (each night clear with probability %s); confidence %s\n",
		fmtG(100*req.Loss)+" %", fmtG(1-req.Loss), fmtG(req.Confidence))
	fmt.Fprintf(&b, "Model: %s\n\n", export.ProposalModel)
	switch {
	case len(p.Picks) == 0:
		b.WriteString("No candidate night gives any goal an exposure.\n")
	default:
		fmt.Fprintf(&b, "Minimum with a clear sky: %d night(s): %s\n", doc.ClearNights, strings.Join(doc.ClearDates, ", "))
		if req.Loss > 0 {
			if doc.WeatherMet {
				fmt.Fprintf(&b, "To reach N with probability ≥ %s: %d night(s): %s\n", fmtG(req.Confidence), doc.WeatherNights, strings.Join(doc.WeatherDates, ", "))
			} else {
				fmt.Fprintf(&b, "Probability %s is out of reach in this range: every useful night (%d) gives %s\n", fmtG(req.Confidence), doc.WeatherNights,
					minReach(doc))
			}
		}
	}
	if len(p.Unmet) > 0 {
		b.WriteString("Not coverable in this range even with a clear sky:")
		for _, g := range p.Unmet {
			pg := p.Goals[g]
			fmt.Fprintf(&b, " %s %.3f (%d of %d);", pg.Target, pg.Goal.Center, pg.Available, pg.Need)
		}
		b.WriteString("\n")
	}
	b.WriteString("\nGoals (after the nights above):\n")
	tb := newTable(&b)
	tb.row("  Target", "Phase", "N", "Nights offering", "Available", "Clear", "Expected", "P(≥N)")
	for _, gd := range doc.Goals {
		tb.row("  "+gd.Target, fmt.Sprintf("%.3f", gd.PhaseGoal), fmt.Sprint(gd.Need), fmt.Sprint(gd.NightsOffering), fmt.Sprint(gd.Available),
			fmt.Sprint(gd.Clear), f(gd.ExpectedCoverage, 3), f(gd.ReachProbability, 3))
	}
	if err := tb.flush(); err != nil {
		return err
	}
	if len(doc.Picks) > 0 {
		b.WriteString("\nNights in the order chosen (exposures each goal gets, in the goals' order):\n")
		tb = newTable(&b)
		tb.row("  #", "Night", "For", "Gives", "Clear cov.", "Expected cov.", "P(all ≥ N)")
		for _, pd := range doc.Picks {
			why := "clear sky"
			if pd.Margin {
				why = "weather"
			}
			var gives []string
			for _, n := range pd.Gives {
				gives = append(gives, fmt.Sprint(n))
			}
			all := "—"
			if pd.AllReachProbability != nil {
				all = f(*pd.AllReachProbability, 3)
			}
			tb.row(fmt.Sprintf("  %d", pd.Order), pd.Date, why, strings.Join(gives, " "), f(pd.ClearCoverage, 3), f(pd.ExpectedCoverage, 3), all)
		}
		if err := tb.flush(); err != nil {
			return err
		}
	}
	if len(doc.Hours) > 0 {
		fmt.Fprintf(&b, "\nHours per night in dark time at airmass ≤ %s, %d (night of the 15th):\n", fmtG(rc.MaxAirmass), year[0].Year)
		tb = newTable(&b)
		head := []string{"  Target"}
		for m := time.January; m <= time.December; m++ {
			head = append(head, m.String()[:3])
		}
		tb.row(head...)
		for _, hd := range doc.Hours {
			row := []string{"  " + hd.Target}
			for m := time.January; m <= time.December; m++ {
				k := time.Date(year[0].Year, m, 15, 12, 0, 0, 0, time.UTC).YearDay() - 1
				row = append(row, f(hd.Hours[k], 1))
			}
			tb.row(row...)
		}
		if err := tb.flush(); err != nil {
			return err
		}
	}
	b.WriteString("\n" + planner.SafetyCaution + "\n")
	_, err := io.WriteString(w, b.String())
	return err
}

// minReach names the lowest probability of reaching N among the goals the
// range can meet.
func minReach(doc export.ProposalDoc) string {
	lo, who := 2.0, ""
	for _, gd := range doc.Goals {
		if gd.Reachable && gd.ReachProbability < lo {
			lo, who = gd.ReachProbability, fmt.Sprintf("%s %.3f", gd.Target, gd.PhaseGoal)
		}
	}
	return fmt.Sprintf("%s a probability of %s", who, f(lo, 3))
}
