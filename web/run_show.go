package web

import (
	"net/http"
	"strconv"

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
	plans, doc, planID, err := s.runPlanDoc(r, u, id)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v := runView(in, doc, plans, planID, s.now())
	v.CanEdit = u.can(store.ActCreate, store.EntPlan)
	if j, ok := s.jobs.running(u.actor.UserID, "/runs/"+i64s(id)); ok {
		v.Running = "/jobs/" + j.id
	}
	s.render(w, r, http.StatusOK, page.Run(s.chromeFor(r, u, "Run "+in.run.Name, "runs"), v))
}

// runPlanDoc returns the run's saved plans and the document of the one
// ?plan= names (the newest by default; nil when there is none).
func (s *Server) runPlanDoc(r *http.Request, u *user, runID int64) ([]store.SavedPlan, *runDoc, int64, error) {
	plans, err := s.store.ListPlans(r.Context(), u.actor, runID)
	if err != nil || len(plans) == 0 {
		return plans, nil, 0, err
	}
	want, _ := strconv.ParseInt(r.URL.Query().Get("plan"), 10, 64)
	planID := plans[0].ID
	for _, p := range plans {
		if p.ID == want {
			planID = want
		}
	}
	p, err := s.store.GetPlan(r.Context(), u.actor, planID)
	if err != nil {
		return plans, nil, 0, err
	}
	doc, err := loadDoc(p)
	return plans, doc, planID, err
}
