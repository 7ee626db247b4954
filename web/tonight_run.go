package web

import (
	"context"
	"fmt"
	"time"

	"phasecast/planner"
	"phasecast/planner/export"
	"phasecast/store"
)

// followSavedPlan makes Tonight follow the run's newest saved plan: the
// freshly planned blocks are replaced by the saved plan's blocks of
// tonight's night, without those marked done or lost. It returns the
// sentence that says what Tonight shows. With no run, or a run with no
// saved plan for tonight, the fresh plan stays.
func (s *Server) followSavedPlan(ctx context.Context, a store.Actor, n *night, run *store.Run) (string, error) {
	if run == nil {
		return "No run holds tonight: planned now from " + n.site.Name + "'s constraints for the list " + n.list.Name + ".", nil
	}
	in, err := s.loadRun(ctx, a, run.ID)
	if err != nil {
		return "", err
	}
	plans, doc, _, err := s.runPlanDoc(ctx, a, run.ID, 0)
	if err != nil {
		return "", err
	}
	if doc == nil {
		return "Run " + run.Name + " has no saved plan yet: planned now with the run's constraints.", nil
	}
	var nd *export.RunNight
	for k := range doc.Nights {
		d := &doc.Nights[k]
		if d.Date == n.q.date && (planner.NightPart(d.Part) == n.part || (d.Part == "" && n.part == planner.PartFull)) {
			nd = d
		}
	}
	if nd == nil {
		return "Run " + run.Name + " does not hold tonight: planned now with the run's constraints.", nil
	}
	index := map[int64]int{}
	for i, t := range n.targets {
		index[t.ID] = i
	}
	var blocks []planner.Block
	marked := 0
	for bi, b := range nd.Blocks {
		if runBlockRow(in, bi, b).State != "" {
			marked++
			continue
		}
		ti, ok := index[b.TargetID]
		if !ok {
			continue // the target left the list since the plan was made
		}
		blocks = append(blocks, savedBlock(b, ti))
	}
	p := planner.Plan{}
	if n.plan != nil {
		p = *n.plan // a copy: the cached plan is shared
	}
	p.Blocks = blocks
	n.plan = &p
	note := fmt.Sprintf("Following the saved plan “%s” of run %s (made %s)", plans[0].Name, run.Name, planMade(plans, plans[0].ID))
	switch marked {
	case 0:
		return note + "; blocks marked done or lost there drop out of this page.", nil
	case 1:
		return note + "; 1 block marked done or lost is left out.", nil
	}
	return note + fmt.Sprintf("; %d blocks marked done or lost are left out.", marked), nil
}

// savedBlock is a saved plan's block as the planner's, for the Tonight
// page; ti is the target's index in the night's targets.
func savedBlock(b export.RunBlock, ti int) planner.Block {
	out := planner.Block{Target: b.Target, TargetIndex: ti, GoalIndex: -1, Filler: b.Filler || b.PhaseGoal == nil, Priority: b.Priority,
		Cycle: b.Cycle, Start: time.Time(b.Start), End: time.Time(b.End), AcquireS: b.AcquireS, N: b.NExposures,
		ExposureS: b.ExposureS, OverheadS: b.OverheadS, PhaseStart: b.PhaseStart, PhaseMid: b.PhaseMid, PhaseEnd: b.PhaseEnd,
		PhaseFirstMid: b.PhaseFirstMid, PhaseLastMid: b.PhaseLastMid, Smear: b.Smear, PhaseErr: b.PhaseErr,
		AirmassMin: b.AirmassMin, AirmassMax: b.AirmassMax, MoonSepDeg: b.MoonSepDeg, MoonUp: b.MoonUp}
	if b.PhaseGoal != nil {
		out.Goal = planner.Goal{Center: *b.PhaseGoal, Event: b.Event}
		if b.PhaseHalfWidth != nil {
			out.Goal.HalfWidth = *b.PhaseHalfWidth
		}
	}
	return out
}
