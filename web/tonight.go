package web

import (
	"context"
	"fmt"
	"math"
	"net/url"
	"slices"
	"time"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/web/page"
)

// tonightNight loads tonight's night for the user: the chosen run (?run=),
// else the first run with tonight among its nights, else the team's first
// site and list with the site's constraints.
func (s *Server) tonightNight(ctx context.Context, u *user, q url.Values) (*night, []store.Run, *store.Run, error) {
	runs, err := s.store.ListRuns(ctx, u.actor, u.team.TeamID)
	if err != nil {
		return nil, nil, nil, err
	}
	want, err := optID(q.Get("run"))
	if err != nil {
		return nil, nil, nil, err
	}
	var run *store.Run
	for i, r := range runs {
		if r.ID == want {
			run = &runs[i]
		}
	}
	nq := nightQuery{}
	if run == nil && want == 0 {
		for i, r := range runs {
			if st, err := s.store.GetSite(ctx, u.actor, r.SiteID); err == nil {
				loc, err := time.LoadLocation(st.Zone)
				if err != nil { // a zone this binary cannot load: the site's date in UTC
					s.log.Warn("tonight: site zone", "site", st.ID, "zone", st.Zone, "err", err)
					loc = time.UTC
				}
				today := tonight(s.now(), loc)
				if slices.ContainsFunc(r.Nights, func(n store.RunNight) bool { return n.Date == today }) {
					run = &runs[i]
					break
				}
			}
		}
	}
	if run != nil {
		nq.runID = run.ID // its site, list, constraints and tonight's part
	}
	n, errs, err := s.loadNight(ctx, u.actor, u.team.TeamID, nq)
	if err != nil {
		return nil, nil, nil, err
	}
	if len(n.sites) > 0 && len(n.lists) > 0 && len(errs) == 0 {
		if err := n.planIt(errs); err != nil {
			return nil, nil, nil, err
		}
		switch {
		case len(errs) > 0:
		case q.Get("replan") == "1":
			n.replanned = true
			if n.source, err = s.replanTonight(ctx, u.actor, n); err != nil {
				return nil, nil, nil, err
			}
		default:
			if n.source, err = s.followSavedPlan(ctx, u.actor, n, run); err != nil {
				return nil, nil, nil, err
			}
		}
	}
	return n, runs, run, nil
}

// tonightView builds the Tonight page at now.
func (s *Server) tonightView(n *night, runs []store.Run, run *store.Run, now time.Time) page.TonightView {
	v := page.TonightView{}
	for _, r := range runs {
		v.Runs = append(v.Runs, page.Option{Value: i64s(r.ID), Label: r.Name, Selected: run != nil && r.ID == run.ID})
	}
	if len(n.sites) == 0 || len(n.lists) == 0 {
		v.Heading, v.NoPlan = "Tonight", "The team needs a site and a target list first."
		return v
	}
	v.Heading = "Tonight at " + n.site.Name + ", list " + n.list.Name
	if run != nil {
		v.Heading = "Tonight: run " + run.Name + " at " + n.site.Name
	}
	v.Clock = now.In(n.loc).Format("15:04") + " " + zoneLabel(n.loc, now) + " · " + now.UTC().Format("15:04 UTC") + " · LST " +
		planner.FormatHours(planner.LocalSiderealHours(n.site.Site, now)) + " · night of " + n.q.date
	if n.half() && n.plan != nil {
		v.Clock += " · " + n.partNote()
	}
	if n.plan == nil {
		v.NoPlan = "No plan could be made for tonight; open the Night page for details."
		return v
	}
	v.Source = n.source
	v.Replanned, v.CanReplan = n.replanned, true
	if run != nil {
		v.Replan = "run=" + i64s(run.ID)
	}
	q := n.q
	v.NightLink = "/night?" + q.encode()
	zone := zoneLabel(n.loc, now)
	for _, b := range n.plan.Blocks {
		nb := &page.NowBlock{Target: b.Target, Goal: goalLabelConv(b.Goal, n.convOf(b.TargetIndex)), Exposures: fmt.Sprintf("%d × %s s", b.N, num(b.ExposureS)),
			Span: b.Start.In(n.loc).Format("15:04") + "–" + b.End.In(n.loc).Format("15:04") + " " + zone}
		if b.Filler {
			nb.Goal = "filler"
		}
		switch {
		case !now.Before(b.Start) && now.Before(b.End) && v.NowBlock == nil:
			nb.Until, nb.UntilText = b.End.UTC().Format(time.RFC3339), fmtDuration(b.End.Sub(now))
			v.NowBlock = nb
		case b.Start.After(now) && v.NextBlock == nil:
			nb.Until, nb.UntilText = b.Start.UTC().Format(time.RFC3339), fmtDuration(b.Start.Sub(now))
			v.NextBlock = nb
		}
	}
	if v.NowBlock == nil && v.NextBlock == nil {
		v.NoPlan = "No planned block is left tonight."
	}
	for i, t := range n.targets {
		v.Rows = append(v.Rows, tonightRow(n, i, t, now))
	}
	v.Note = "Phases and altitudes at " + fmtUTC(now) + " seen from " + n.site.Name + "; the page reloads its figures every minute and the countdowns tick in the browser."
	return v
}

// tonightRow is one target's phase, altitude and next window and block.
func tonightRow(n *night, i int, t store.StoredTarget, now time.Time) page.TonightRow {
	tg := n.req.Targets[i]
	r := page.TonightRow{Name: tg.Name, Href: "/targets/" + i64s(t.ID)}
	_, ph, phErr := planner.PhaseNow(n.site.Site, tg.Star(), tg.Ephem, now)
	r.Phase, r.PhaseErr = fmt.Sprintf("%.3f", ph), "± "+fmtPhaseErr(phErr)
	sky := planner.SkyAt(n.site.Site, tg.Star(), now)
	r.Altitude = altitudeText(sky)
	goals, err := tg.ResolveGoals()
	if err == nil {
		best := time.Time{}
		label := ""
		for _, g := range goals {
			start := math.Mod(g.Center-g.HalfWidth+1, 1)
			ts := planner.UpcomingEvents(n.site.Site, tg.Star(), tg.Ephem, start, now, now.Add(time.Duration(tg.Ephem.PeriodDays*24*float64(time.Hour))+time.Minute))
			if len(ts) > 0 && (best.IsZero() || ts[0].Before(best)) {
				best, label = ts[0], goalLabelConv(g, tg.Ephem.Convention)
			}
		}
		if !best.IsZero() {
			r.NextWindow = label + " opens " + best.In(n.loc).Format("15:04")
			r.NextAt, r.NextIn = best.UTC().Format(time.RFC3339), "in "+fmtDuration(best.Sub(now))
		}
	}
	for _, b := range n.plan.Blocks {
		if b.TargetIndex == i && b.End.After(now) {
			r.NextBlock = b.Start.In(n.loc).Format("15:04") + "–" + b.End.In(n.loc).Format("15:04") + ", " + goalLabelConv(b.Goal, tg.Ephem.Convention)
			if b.Start.After(now) {
				r.BlockAt, r.BlockIn = b.Start.UTC().Format(time.RFC3339), "in "+fmtDuration(b.Start.Sub(now))
			} else {
				r.BlockIn = "now"
			}
			break
		}
	}
	if r.NextBlock == "" {
		r.NextBlock = "none left tonight"
	}
	return r
}
