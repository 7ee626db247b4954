package web

import (
	"context"
	"fmt"
	"time"

	"phasecast/planner"
	"phasecast/store"
)

// runInputs is what a run plan is made from, loaded from the store.
type runInputs struct {
	run     store.Run
	site    store.SiteRecord
	loc     *time.Location
	targets []store.StoredTarget
	obs     []store.Observation
	nights  []planner.RunNight
	windows []planner.Interval
	// timings are the measured timings of each target's reference event
	// (BJD_TDB), by target name, for the timing precision.
	timings map[string][]planner.EphemTiming
}

// loadRun loads a run with its site, targets and observations.
func (s *Server) loadRun(ctx context.Context, a store.Actor, id int64) (*runInputs, error) {
	run, err := s.store.GetRun(ctx, a, id)
	if err != nil {
		return nil, err
	}
	site, err := s.store.GetSite(ctx, a, run.SiteID)
	if err != nil {
		return nil, err
	}
	targets, err := s.store.ListTargets(ctx, a, run.ListID)
	if err != nil {
		return nil, err
	}
	obs, err := s.store.ListObservations(ctx, a, store.ObservationFilter{RunID: id})
	if err != nil {
		return nil, err
	}
	in := &runInputs{run: run, site: site, targets: targets, obs: obs, timings: map[string][]planner.EphemTiming{}}
	for _, t := range targets {
		tms, err := s.store.ListTimings(ctx, a, t.ID)
		if err != nil {
			return nil, err
		}
		for _, tm := range tms {
			if tm.Event == "" {
				in.timings[t.Target.Name] = append(in.timings[t.Target.Name], planner.EphemTiming{Value: tm.BJD, Std: planner.StdBJDTDB, ErrDays: tm.ErrDays})
			}
		}
	}
	if in.loc, err = time.LoadLocation(site.Zone); err != nil {
		in.loc = time.UTC
	}
	for _, n := range run.Nights {
		rn, err := planner.ParseRunNights(n.Date + partSuffix(n.Part))
		if err != nil {
			return nil, fmt.Errorf("run %d night %s: %w", id, n.Date, err)
		}
		in.nights = append(in.nights, rn...)
	}
	c := in.constraints()
	if in.windows, err = planner.RunNightWindows(site.Site, in.loc, c, in.nights); err != nil {
		return nil, err
	}
	return in, nil
}

// partSuffix is the ParseRunNights spelling of a stored night part.
func partSuffix(p store.NightPart) string {
	switch p {
	case store.NightFirstHalf:
		return ":first"
	case store.NightSecondHalf:
		return ":second"
	}
	return ""
}

// storeNights converts the planner's nights for the store.
func storeNights(ns []planner.RunNight) []store.RunNight {
	out := make([]store.RunNight, len(ns))
	for i, n := range ns {
		p := store.NightFull
		switch n.Part {
		case planner.PartFirst:
			p = store.NightFirstHalf
		case planner.PartSecond:
			p = store.NightSecondHalf
		}
		out[i] = store.RunNight{Date: fmt.Sprintf("%04d-%02d-%02d", n.Year, n.Month, n.Day), Part: p}
	}
	return out
}

// constraints are the run's constraints with its site's horizon mask.
func (in *runInputs) constraints() planner.Constraints {
	c := in.run.Constraints
	c.Horizon = in.site.Horizon
	return c
}

// nightsOver counts the run's nights whose planning window has ended by now.
func (in *runInputs) nightsOver(now time.Time) int {
	n := 0
	for _, w := range in.windows {
		if !w.End.After(now) {
			n++
		}
	}
	return n
}

// request builds the planner's request with the first past nights over:
// the observations that fall in those nights count as observed (lost
// blocks as failed exposures); later ones are left out.
func (in *runInputs) request(past int) planner.RunRequest {
	req := planner.RunRequest{Site: in.site.Site, Zone: in.loc, Nights: in.nights, Constraints: in.constraints(), Past: past, Bins: 10,
		Options: planner.Options{Telescope: in.site.Telescope}}
	// A run sizes S/N goals' exposures with its site's default (first)
	// instrument.
	req.Instrument, _ = in.site.Instrument("") // dropped: "" names no instrument, so it never fails
	names := map[int64]string{}
	for _, t := range in.targets {
		req.Targets = append(req.Targets, t.Target)
		names[t.ID] = t.Target.Name
	}
	for _, o := range in.obs {
		name, ok := names[o.TargetID]
		if !ok || !in.inPastNight(o.MidUTC, past) {
			continue
		}
		req.Observed = append(req.Observed, planner.Exposure{Target: name, Mid: o.MidUTC, ExposureS: o.ExposureS, Failed: o.Status == store.ObsFailed})
	}
	return req
}

// inPastNight reports whether t falls in one of the first past nights.
func (in *runInputs) inPastNight(t time.Time, past int) bool {
	for i := 0; i < past && i < len(in.windows); i++ {
		if !t.Before(in.windows[i].Start) && t.Before(in.windows[i].End) {
			return true
		}
	}
	return false
}
