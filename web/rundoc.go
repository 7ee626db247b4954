package web

import (
	"phasecast/planner"
	"phasecast/planner/export"
)

// engineVersion names the planner that made a saved run plan.
const engineVersion = "phasecast planner.PlanRun (web)"

// newRunDoc is the document of a planned run (export.Run), as the web saves
// it (store.SavedPlan.Output) and exports it; blocks and targets carry the
// targets' ids.
func newRunDoc(in *runInputs, rp *planner.RunPlan) (export.Run, error) {
	ids := make([]int64, len(in.targets))
	for i, t := range in.targets {
		ids[i] = t.ID
	}
	return export.NewRun(export.RunInput{Name: in.run.Name, Site: export.NewSite(in.site.Name, in.site.Site), Loc: in.loc,
		AcquireS: largestAcquire(rp.Request.Targets), TargetIDs: ids, Timings: in.timings}, rp)
}
