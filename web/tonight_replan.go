package web

import (
	"context"
	"fmt"
	"strings"

	"phasecast/planner"
	"phasecast/planner/export"
	"phasecast/store"
)

// replanTonight plans the rest of tonight again from now
// (planner.ReplanNight): the exposures recorded tonight for the list's
// targets (observations marked done, from the run's marks or its log) stay,
// the goals they served are not planned again, and nothing starts before
// now. It replaces n's plan and returns the sentence that says so. Before
// the night or after it, the plan stays and the sentence says why.
func (s *Server) replanTonight(ctx context.Context, a store.Actor, n *night) (string, error) {
	now := s.now().UTC()
	if now.Before(n.req.From) || !now.Before(n.req.To) {
		return fmt.Sprintf("The night runs from %s to %s UTC: it cannot be replanned from now (%s UTC); the whole night's plan is shown.",
			n.req.From.Format("2006-01-02 15:04"), n.req.To.Format("2006-01-02 15:04"), now.Format("2006-01-02 15:04")), nil
	}
	obs, err := s.store.ListObservations(ctx, a, store.ObservationFilter{ListID: n.list.ID, From: n.req.From, To: now})
	if err != nil {
		return "", err
	}
	names := map[int64]string{}
	for _, t := range n.targets {
		names[t.ID] = t.Target.Name
	}
	var done []planner.Exposure
	for _, o := range obs {
		name, ok := names[o.TargetID]
		if !ok || o.MidUTC.Before(n.req.From) || !o.MidUTC.Before(now) {
			continue
		}
		done = append(done, planner.Exposure{Target: name, Mid: o.MidUTC, ExposureS: o.ExposureS, Failed: o.Status != store.ObsDone})
	}
	rp, err := planner.ReplanNight(n.req, now, done)
	if err != nil {
		return "", err
	}
	n.plan = rp.Plan
	var served []string
	for _, gs := range rp.Served {
		if gs.Done > 0 && gs.Remaining == 0 {
			served = append(served, fmt.Sprintf("%s %s", gs.Target, export.PhaseText(gs.Goal.Center)))
		}
	}
	msg := fmt.Sprintf("Replanned from %s: %d exposure(s) recorded tonight are kept", now.In(n.loc).Format("15:04"), len(done))
	if len(served) > 0 {
		msg += "; served, not planned again: " + strings.Join(served, ", ")
	}
	return msg + ". Mark blocks on the run page (or replan the run) to update its coverage.", nil
}
