package web

import (
	"context"
	"fmt"
	"net/http"
	"slices"

	"phasecast/planner/export"
	"phasecast/store"
	"phasecast/web/page"
)

// runShow is a run's page (GET /runs/{id}[?plan=ID]): the latest (or the
// chosen) saved plan with its overview, rings, coverage and nights.
func (s *Server) runShow(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	in, err := s.loadRun(r.Context(), u.actor, id)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v, err := s.memberRunView(r, u, in)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	s.render(w, r, http.StatusOK, page.Run(s.chromeFor(r, u, "Run "+in.run.Name, "runs"), v))
}

// memberRunView is a run's page for a member: the plan, the editing
// controls their role allows, a job in progress, the share links.
func (s *Server) memberRunView(r *http.Request, u *user, in *runInputs) (page.RunView, error) {
	want, err := queryID(r.URL.Query(), "plan")
	if err != nil {
		return page.RunView{}, err
	}
	plans, doc, planID, err := s.runPlanDoc(r.Context(), u.actor, in.run.ID, want)
	if err != nil {
		return page.RunView{}, err
	}
	v := runView(in, doc, plans, planID, s.now())
	v.CanEdit = u.can(store.ActCreate, store.EntPlan)
	if j, ok := s.jobs.running(u.actor.UserID, "/runs/"+i64s(in.run.ID)); ok {
		v.Running = "/jobs/" + j.id
	}
	if u.can(store.ActCreate, store.EntShareLink) {
		v.Shares, err = s.shareRows(r, u, func(l store.ShareLink) bool { return l.RunID == in.run.ID })
	}
	return v, err
}

// runPlanDoc returns the run's saved plans and the document of the one
// want names (the newest when want is 0 or unknown; nil when there is none).
func (s *Server) runPlanDoc(ctx context.Context, a store.Actor, runID, want int64) ([]store.SavedPlan, *export.Run, int64, error) {
	plans, err := s.store.ListPlans(ctx, a, runID)
	if err != nil || len(plans) == 0 {
		return plans, nil, 0, err
	}
	planID := plans[0].ID
	if want != 0 {
		if !slices.ContainsFunc(plans, func(p store.SavedPlan) bool { return p.ID == want }) {
			return plans, nil, 0, errNotFound(fmt.Sprintf("plan %d is not a saved plan of this run", want))
		}
		planID = want
	}
	p, err := s.store.GetPlan(ctx, a, planID)
	if err != nil {
		return plans, nil, 0, err
	}
	doc, err := loadDoc(p)
	return plans, doc, planID, err
}
