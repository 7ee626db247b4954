package web

import (
	"fmt"
	"strconv"
	"time"

	"phasecast/planner"
	"phasecast/planner/export"
	"phasecast/web/chart"
	"phasecast/web/page"
)

// chartStep is the sampling step of the night chart's curves.
const chartStep = 2 * time.Minute

// nightForm fills the request form from the resolved request.
func (n *night) form(errs page.Errs) page.NightForm {
	f := page.NightForm{Date: n.q.date, MaxAirmass: n.q.maxAirmass, MinAlt: n.q.minAlt, MinMoonSep: n.q.minMoonSep,
		MaxMoonIllum: n.q.maxMoonIllum, SunAvoid: n.q.sunAvoid, Fill: n.q.fill, Errs: errs}
	if n.run != nil {
		f.Run, f.RunName = i64s(n.run.ID), n.run.Name
	}
	f.Parts = []page.Option{{Value: "", Label: "as the run holds it, else the whole night"}, {Value: "full", Label: "whole night"},
		{Value: "first", Label: "first half"}, {Value: "second", Label: "second half"}}
	for i := range f.Parts {
		f.Parts[i].Selected = f.Parts[i].Value == string(n.q.part)
	}
	for _, st := range n.sites {
		f.Sites = append(f.Sites, page.Option{Value: i64s(st.ID), Label: st.Name, Selected: st.ID == n.site.ID})
	}
	for i, in := range n.site.Instruments {
		sel := in.Name == n.q.instrument || (n.q.instrument == "" && i == 0)
		f.Instruments = append(f.Instruments, page.Option{Value: in.Name, Label: in.Name, Selected: sel})
	}
	for _, l := range n.lists {
		f.Lists = append(f.Lists, page.Option{Value: i64s(l.ID), Label: l.Name, Selected: l.ID == n.list.ID})
	}
	for _, t := range n.all {
		checked := false
		for _, id := range n.q.targetIDs {
			checked = checked || id == t.ID
		}
		f.Targets = append(f.Targets, page.TargetChoice{ID: t.ID, Name: t.Target.Name, Checked: checked})
	}
	f.Twilight = []page.Option{{Value: "", Label: "site default"}, {Value: "civil", Label: "civil (Sun below −6°)"},
		{Value: "nautical", Label: "nautical (−12°)"}, {Value: "astronomical", Label: "astronomical (−18°)"}}
	for i := range f.Twilight {
		f.Twilight[i].Selected = f.Twilight[i].Value == n.q.twilight
	}
	return f
}

// view builds the Night page's result part from the plan.
func (n *night) view(now time.Time) (page.NightView, error) {
	p := n.plan
	at := n.whole.Start
	if len(p.Blocks) > 0 {
		at = p.Blocks[0].Start
	} else if n.events.Sunset != nil {
		at = *n.events.Sunset
	}
	zone := zoneLabel(n.loc, at)
	v := page.NightView{HasPlan: true, Title: n.title(), Zone: zone, Query: n.q.encode(), PartNote: n.partNote()}
	v.Summary = n.summary()
	for _, b := range p.Blocks {
		v.Blocks = append(v.Blocks, n.blockRow(b))
	}
	v.Warnings = warningGroups(p, n.loc)
	for _, u := range p.Unscheduled {
		v.Unscheduled = append(v.Unscheduled, page.UnschedRow{Target: u.Target, Goal: goalLabel(u.Goal), Reason: u.Detail})
	}
	v.Objective = objectiveText(p)
	c, err := n.chart(now)
	if err != nil {
		return v, err
	}
	v.Chart = c
	return v, nil
}

// isBlockWarning reports warnings already shown under their block.
func isBlockWarning(w planner.Warning) bool {
	switch w.Code {
	case planner.WarnSmear, planner.WarnMoonNear, planner.WarnTwilightStart:
		return true
	}
	return false
}

func warningText(w planner.Warning) string {
	if w.Target == "" {
		return w.Message
	}
	return w.Target + ": " + w.Message
}

// objectiveText states how the schedule was chosen.
func objectiveText(p *planner.Plan) string {
	s := fmt.Sprintf("Schedule value %d (greedy first-fit on the same candidates: %d), from %d candidate blocks", p.Value, p.GreedyValue, p.Candidates)
	if p.Optimal {
		return s + "; optimal for the planner's objective."
	}
	return s + "; the search stopped early, so the schedule may fall short of the optimum."
}

// blockRow formats one block with every figure.
func (n *night) blockRow(b planner.Block) page.BlockRow {
	r := page.BlockRow{Target: b.Target, Goal: goalLabelConv(b.Goal, n.convOf(b.TargetIndex)), Priority: b.Priority, Filler: b.Filler,
		Local:     b.Start.In(n.loc).Format("15:04:05") + "–" + b.End.In(n.loc).Format("15:04:05"),
		UTC:       b.Start.UTC().Format("15:04:05") + "–" + b.End.UTC().Format("15:04:05"),
		Exposures: fmt.Sprintf("%d × %s s + %s s", b.N, num(b.ExposureS), num(b.OverheadS)),
		Phases:    fmt.Sprintf("%.3f → %.3f", b.PhaseStart, b.PhaseEnd),
		MidPhases: fmt.Sprintf("%.3f → %.3f", b.PhaseFirstMid, b.PhaseLastMid),
		Smear:     fmt.Sprintf("%.4f", b.Smear), PhaseErr: fmtPhaseErr(b.PhaseErr),
		Airmass:    fmt.Sprintf("%.2f–%.2f", b.AirmassMin, b.AirmassMax),
		MoonSep:    fmt.Sprintf("%.0f°", b.MoonSepDeg),
		Parallatic: fmt.Sprintf("%.0f°", b.Parallactic), HourAngle: fmt.Sprintf("%+.2f h", b.HourAngle),
		LST:    planner.FormatHours(planner.LocalSiderealHours(n.site.Site, b.Start)),
		SunAlt: fmt.Sprintf("%.1f°", b.SunAltStart), Acquire: num(b.AcquireS) + " s", Cycle: strconv.FormatInt(b.Cycle, 10)}
	if b.SlewS > 0 {
		r.Acquire += fmt.Sprintf(" (slew %.0f s from %s)", b.SlewS, b.PrevTarget)
	}
	if !b.MoonUp {
		r.MoonSep += " (down)"
	}
	r.GoalShort = fmt.Sprintf("φ %s ± %s", export.PhaseText(b.Goal.Center), export.PhaseText(b.Goal.HalfWidth))
	r.ExpShort = fmt.Sprintf("%d×%s s", b.N, num(b.ExposureS))
	if b.SNROK {
		r.SNR = fmt.Sprintf("S/N %.0f per exposure, sky %.2f mag/arcsec²", b.SNR, b.SkyMag)
		if b.SizedBySNR {
			r.SNR += " (exposure sized for this S/N)"
		}
	}
	if b.Filler {
		r.Goal, r.GoalShort = "filler", "filler"
	}
	return r
}

// goalLabel names a goal: "φ 0.25 ± 0.05" or "quadrature (max recession) φ 0.25 ± 0.05".
func goalLabel(g planner.Goal) string { return goalLabelConv(g, "") }

// goalLabelConv is goalLabel with the event named for the target's T0
// convention: an ascending-node (pulsar-timing) ephemeris says whose
// conjunction or quadrature it is (eventName).
func goalLabelConv(g planner.Goal, conv planner.Convention) string {
	return export.GoalLabelNamed(g, eventName(g.Event, conv))
}

// convOf is the T0 convention of the night's target i ("" if unknown).
func (n *night) convOf(i int) planner.Convention {
	if i < 0 || i >= len(n.req.Targets) {
		return ""
	}
	return n.req.Targets[i].Ephem.Convention
}

// num formats a number compactly.
func num(x float64) string { return strconv.FormatFloat(x, 'f', -1, 64) }

// chart builds the night chart: sampled curves from the planner, blocks
// from the plan, drawn from an hour before sunset to an hour after sunrise.
func (n *night) chart(now time.Time) (chart.Night, error) {
	from, to := n.chartSpan()
	samples, err := planner.SampleNight(n.site.Site, from, to, n.req.Targets, chartStep)
	if err != nil {
		return chart.Night{}, err
	}
	c := chart.Night{Title: n.title(), Start: from, End: to, Zone: n.loc, Now: now,
		MoonLabel: fmt.Sprintf("Moon %.0f%% lit", samples.MoonIllum*100)}
	if n.half() {
		if n.req.From.After(from) {
			c.Unallocated = append(c.Unallocated, chart.Span{Start: from, End: n.req.From, Label: "not allocated"})
		}
		if n.req.To.Before(to) {
			c.Unallocated = append(c.Unallocated, chart.Span{Start: n.req.To, End: to, Label: "not allocated"})
		}
	}
	for _, b := range samples.Bands {
		c.Bands = append(c.Bands, chart.Band{Start: b.Start, End: b.End, Kind: b.Kind})
	}
	for i, t := range samples.Times {
		c.Moon = append(c.Moon, chart.AltPoint{T: t, AltDeg: samples.MoonAltDeg[i]})
		c.Sun = append(c.Sun, chart.AltPoint{T: t, AltDeg: samples.SunAltDeg[i]})
	}
	for k, ts := range samples.Targets {
		tr := chart.Track{Name: ts.Name, Points: make([]chart.TrackPoint, len(samples.Times))}
		if k < len(n.req.Targets) {
			tr.Events = trackEvents(n.req.Targets[k])
		}
		for i, t := range samples.Times {
			tr.Points[i] = chart.TrackPoint{T: t, AltDeg: ts.AltDeg[i], Phase: ts.Phase[i]}
		}
		for _, w := range ts.Windows {
			tr.Goals = append(tr.Goals, chart.Span{Start: w.Start, End: w.End, Label: num(w.Center)})
		}
		c.Tracks = append(c.Tracks, tr)
	}
	for _, b := range n.plan.Blocks {
		label := fmt.Sprintf("φ%s ×%d", num(b.Goal.Center), b.N)
		if b.Filler {
			label = fmt.Sprintf("fill ×%d", b.N)
		}
		c.Blocks = append(c.Blocks, chart.Block{Target: b.Target, Start: b.Start, End: b.End, Label: label, Filler: b.Filler,
			Detail: blockDetail(n.blockRow(b), zoneLabel(n.loc, b.Start))})
	}
	for _, x := range []float64{1.0, 1.2, 1.5, 2.0, 3.0} {
		c.Airmass = append(c.Airmass, chart.Tick{AltDeg: planner.AirmassAltDeg(x), Label: strconv.FormatFloat(x, 'f', 1, 64)})
	}
	cons := n.plan.Constraints
	if cons.MaxAirmass > 0 {
		c.LimitAltDeg, c.LimitLabel = planner.AirmassAltDeg(cons.MaxAirmass), "airmass "+num(cons.MaxAirmass)
	}
	if cons.MinAltDeg > c.LimitAltDeg {
		c.LimitAltDeg, c.LimitLabel = cons.MinAltDeg, "altitude "+num(cons.MinAltDeg)+"°"
	}
	return c, nil
}

// chartSpan is an hour before sunset to an hour after sunrise, within the
// whole night's planning window (the whole window when the Sun does not set
// or rise); for half a night the other half is shown, shaded.
func (n *night) chartSpan() (time.Time, time.Time) {
	from, to := n.whole.Start, n.whole.End
	if n.events.Sunset != nil && n.events.Sunset.Add(-time.Hour).After(from) {
		from = n.events.Sunset.Add(-time.Hour).Truncate(30 * time.Minute)
	}
	if n.events.Sunrise != nil && n.events.Sunrise.Add(time.Hour).Before(to) {
		to = n.events.Sunrise.Add(90 * time.Minute).Truncate(30 * time.Minute)
	}
	return from, to
}
