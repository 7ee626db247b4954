package planner

import (
	"fmt"
	"time"

	"phasecast/ephem"
)

// GoalServed is what the exposures already taken tonight did for one goal
// before a replan: how many lie in its window (mid-time phase, the run's
// coverage test), how many it wanted, and how many it still wants (0: the
// goal is served and is not planned again).
type GoalServed struct {
	Target    string
	GoalIndex int  // in the target's ResolveGoals
	Goal      Goal // resolved
	Done      int
	Wanted    int // Goal.NExposures; 0 = as many as fit
	Remaining int
}

// Replan is the rest of a night planned again from an instant: the plan of
// what is left, the exposures already taken (kept as they were) and what
// they served.
type Replan struct {
	Start time.Time // UTC; no new block starts before it
	Plan  *Plan
	// Targets are the targets planned (with their remaining goals):
	// Plan's blocks index them (Block.TargetIndex).
	Targets []Target
	Done    []Exposure
	Served  []GoalServed
}

// ReplanNight plans the rest of req's night from start: nothing starts
// before start (the planning window begins there, acquisitions included),
// the exposures already taken (done; failed ones are kept and count for
// nothing) stay as they were, and the goals they served are not repeated:
// a goal that wanted N exposures and has k in its window now wants N − k,
// and none when k ≥ N; a goal of "as many as fit" (N = 0) with any
// exposure is served. Targets left without goals are not planned. start
// must lie in [req.From, req.To); done exposures must name targets of the
// request. Bad input gives an *ephem.InputError naming the field.
func ReplanNight(req NightRequest, start time.Time, done []Exposure) (*Replan, error) {
	if start.Before(req.From) || !start.Before(req.To) {
		return nil, &ephem.InputError{Field: "start", Value: start.UTC().Format(time.RFC3339),
			Accepted: fmt.Sprintf("an instant in the night's planning window, %s to %s", req.From.UTC().Format(time.RFC3339), req.To.UTC().Format(time.RFC3339))}
	}
	byName := map[string]int{}
	for i, t := range req.Targets {
		byName[t.Name] = i
	}
	for i, e := range done {
		if _, ok := byName[e.Target]; !ok {
			return nil, &ephem.InputError{Field: fmt.Sprintf("done[%d].target", i), Value: fmt.Sprintf("%q", ClipValue(e.Target)), Accepted: "a target of the night's list"}
		}
	}
	out := &Replan{Start: start.UTC(), Done: done}
	rest := req
	rest.From = start
	rest.Targets = nil
	for _, t := range req.Targets {
		goals, err := t.ResolveGoals()
		if err != nil {
			return nil, err
		}
		var keep []Goal
		for gi, g := range goals {
			rg := newRunGoal(0, gi, t, g)
			k := 0
			for _, e := range done {
				if e.Target == t.Name && !e.Failed && rg.covers(phaseOf(req.Site, t, e.Mid)) {
					k++
				}
			}
			gs := GoalServed{Target: t.Name, GoalIndex: gi, Goal: g, Done: k, Wanted: g.NExposures}
			switch {
			case k == 0:
				gs.Remaining = g.NExposures
				keep = append(keep, g)
			case g.NExposures > k:
				gs.Remaining = g.NExposures - k
				g.NExposures = gs.Remaining
				keep = append(keep, g)
			}
			out.Served = append(out.Served, gs)
		}
		if len(keep) > 0 {
			t.Goals = keep
			rest.Targets = append(rest.Targets, t)
		}
	}
	if len(rest.Targets) == 0 {
		out.Plan = &Plan{Site: req.Site, From: start.UTC(), To: req.To.UTC(), Constraints: req.Constraints, Options: req.Options}
		return out, nil
	}
	p, err := PlanNight(rest)
	if err != nil {
		return nil, err
	}
	out.Plan, out.Targets = p, rest.Targets
	return out, nil
}
