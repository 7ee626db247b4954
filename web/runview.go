package web

import (
	"encoding/json"
	"fmt"
	"net/url"
	"strconv"
	"strings"
	"time"

	"phasecast/planner"
	"phasecast/planner/export"
	"phasecast/store"
	"phasecast/web/chart"
	"phasecast/web/page"
)

// runView builds a run's page from its inputs and a saved plan document
// (nil: not planned yet).
func runView(in *runInputs, doc *export.Run, plans []store.SavedPlan, planID int64, now time.Time) page.RunView {
	run := in.run
	v := page.RunView{ID: run.ID, Name: run.Name, NightsN: len(in.nights), Past: in.nightsOver(now), PlanID: planID}
	v.Zone = zoneLabel(in.loc, now)
	_, cons, _ := siteSummary(store.SiteRecord{Site: in.site.Site, Constraints: run.Constraints})
	v.Summary = fmt.Sprintf("%d nights at %s, %d targets; %s.", len(in.nights), in.site.Name, len(in.targets), cons)
	for _, p := range plans {
		v.Plans = append(v.Plans, page.Option{Value: i64s(p.ID), Label: p.Name + " (" + fmtUTC(p.CreatedAt) + ")", Selected: p.ID == planID})
	}
	if doc == nil {
		v.PlanNote = "Not planned yet: plan the run to spread the goals over its nights."
		return v
	}
	v.HasPlan = true
	v.PlanNote = fmt.Sprintf("Plan made %s with the first %d nights over.", planMade(plans, planID), doc.Past)
	for _, n := range doc.Nights {
		v.Nights = append(v.Nights, nightHeading(n))
	}
	for _, t := range doc.Targets {
		v.Overview = append(v.Overview, reachRow(t, doc))
		v.Rings = append(v.Rings, page.RingView{Target: t.Target, Ring: ringOf(t)})
		for _, g := range t.Goals {
			v.Coverage = append(v.Coverage, page.CoverageRow{Target: t.Target, Goal: export.GoalLabel(planner.Goal{Center: g.PhaseGoal, HalfWidth: g.PhaseHalfWidth, Event: g.Event}),
				Need: fmt.Sprintf("%s on %d night(s)", needText(g.NeedExposures), g.NeedNights), Observed: g.Observed, Planned: g.Planned,
				Nights: fmt.Sprintf("%d (%d wanted)", g.NightsMet, g.NeedNights), Status: statusText(g)})
		}
	}
	v.Precision, v.PrecisionChart = precisionView(doc)
	for k, n := range doc.Nights {
		ns := page.NightSchedule{Index: k, Label: nightHeading(n), Past: n.Past, Href: "/night?" + url.Values{"run": {i64s(run.ID)}, "date": {n.Date}}.Encode()}
		switch {
		case n.Past:
			ns.Empty = "This night was over when the plan was made; what was observed on it counts in the coverage."
		default:
			ns.Empty = "No block on this night."
		}
		for bi, b := range n.Blocks {
			ns.Blocks = append(ns.Blocks, runBlockRow(in, bi, b))
		}
		v.Schedules = append(v.Schedules, ns)
	}
	v.Past = max(v.Past, doc.Past, leadingMarked(v.Schedules))
	o := doc.Objective
	most := ""
	if o.MaxValue > 0 {
		most = fmt.Sprintf(", at most %.3f in all", float64(o.MaxValue)/1e6)
	}
	alone := ""
	if o.IndependentValue != nil {
		alone = fmt.Sprintf("; nights planned on their own %.3f", float64(*o.IndependentValue)/1e6)
	}
	v.Objective = fmt.Sprintf("Run objective %.3f; meeting every requirement exactly is worth %.3f, coverage beyond the requirements adds to it%s (greedy pass %.3f%s).",
		float64(o.Value)/1e6, float64(o.RequiredValue)/1e6, most, float64(o.GreedyValue)/1e6, alone)
	return v
}

// planMade is when the saved plan planID was made (RFC 3339 UTC), "" when
// plans do not hold it.
func planMade(plans []store.SavedPlan, planID int64) string {
	for _, p := range plans {
		if p.ID == planID {
			return utcString(p.CreatedAt)
		}
	}
	return ""
}

func needText(n int) string {
	if n <= 1 {
		return "exposures"
	}
	return strconv.Itoa(n) + " exposures"
}

func statusText(g export.RunGoal) string {
	switch {
	case g.Unreachable != "":
		return g.Status + ": " + g.Unreachable
	case g.Shortfall != "":
		return g.Status + ": " + g.Shortfall
	}
	return g.Status
}

// nightHeading labels a night: "2026-03-14" or "2026-03-14 (first half)".
func nightHeading(n export.RunNight) string {
	if n.Part == "" || n.Part == string(planner.PartFull) {
		return n.Date
	}
	return n.Date + " (" + n.Part + " half)"
}

// reachRow is a target's row of the nights × targets overview.
func reachRow(t export.RunTarget, doc *export.Run) page.ReachRow {
	row := page.ReachRow{Target: t.Target}
	for k := range doc.Nights {
		n := 0
		for _, g := range t.Goals {
			if k < len(g.PerNight) {
				n += g.PerNight[k].Observed + g.PerNight[k].Planned
			}
		}
		reach := 0
		if k < len(t.ReachGoals) {
			reach = t.ReachGoals[k]
		}
		row.Cells = append(row.Cells, page.ReachCell{Text: fmt.Sprintf("%d/%d · %d", reach, len(t.Goals), n), Yes: reach > 0,
			Title: fmt.Sprintf("%s: %d of %d goals reachable, %d exposures", doc.Nights[k].Date, reach, len(t.Goals), n)})
	}
	return row
}

// ringOf is a target's phase ring.
func ringOf(t export.RunTarget) chart.Ring {
	r := chart.Ring{Title: "Phase coverage of " + t.Target, Planned: t.Planned, Observed: t.Observed}
	for _, g := range t.Goals {
		label := export.PhaseText(g.PhaseGoal)
		if g.Event != "" {
			label = strings.ReplaceAll(g.Event, "_", " ")
		}
		r.Goals = append(r.Goals, chart.Arc{From: g.PhaseGoal - g.PhaseHalfWidth, To: g.PhaseGoal + g.PhaseHalfWidth, Label: label, Met: g.Status == string(planner.CoverageMet)})
	}
	for _, b := range t.Bins {
		r.Bins = append(r.Bins, chart.Bin{From: b.Lo, To: b.Hi, Count: b.Observed + b.Planned})
	}
	return r
}

// runBlockRow formats a block of a run night with its outcome.
func runBlockRow(in *runInputs, i int, b export.RunBlock) page.RunBlockRow {
	start, end := time.Time(b.Start), time.Time(b.End)
	goal := "filler"
	if b.PhaseGoal != nil {
		goal = export.GoalLabel(planner.Goal{Center: *b.PhaseGoal, HalfWidth: *b.PhaseHalfWidth, Event: b.Event})
	}
	row := page.RunBlockRow{Index: i, Target: b.Target, Goal: goal,
		Local: start.In(in.loc).Format("15:04") + "–" + end.In(in.loc).Format("15:04"), UTC: start.UTC().Format("15:04") + "–" + end.UTC().Format("15:04"),
		Exposures: fmt.Sprintf("%d × %s s", b.NExposures, num(b.ExposureS)), Phases: fmt.Sprintf("%.3f → %.3f", b.PhaseStart, b.PhaseEnd),
		Airmass: fmt.Sprintf("%.2f–%.2f", b.AirmassMin, b.AirmassMax)}
	if b.SNR != nil && b.SkyMag != nil {
		row.Exposures += fmt.Sprintf(" (S/N %.0f, sky %.2f mag/arcsec²)", *b.SNR, *b.SkyMag)
	}
	for _, o := range in.obs {
		if o.TargetID == b.TargetID && o.Source == store.ObsFromBlock && !o.MidUTC.Before(start) && o.MidUTC.Before(end) {
			row.State = string(o.Status)
			if o.Status == store.ObsFailed {
				row.State = "lost"
			}
			break
		}
	}
	return row
}

// loadDoc reads a saved plan's document.
func loadDoc(p store.SavedPlan) (*export.Run, error) {
	var d export.Run
	if err := json.Unmarshal(p.Output, &d); err != nil {
		return nil, fmt.Errorf("saved plan %d: %w", p.ID, err)
	}
	if o := &d.Objective; o.RequiredValue == 0 && o.MaxValue > 0 {
		// A plan saved before required_value: its max_value was what
		// meeting every requirement is worth; its true maximum is unknown.
		o.RequiredValue, o.MaxValue = o.MaxValue, 0
	}
	return &d, nil
}

// leadingMarked counts the run's first nights whose every block has an
// outcome (done or lost): those nights are over, so the replan form
// proposes them as such. A night over in the plan counts as well.
func leadingMarked(ns []page.NightSchedule) int {
	k := 0
	for _, n := range ns {
		if !n.Past && len(n.Blocks) == 0 {
			break
		}
		for _, b := range n.Blocks {
			if b.State == "" {
				return k
			}
		}
		k++
	}
	return k
}
