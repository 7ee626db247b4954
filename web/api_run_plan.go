package web

import (
	"net/http"
	"strconv"

	"phasecast/planner/export"
	"phasecast/store"
)

// apiRunPlan returns a run's saved plan (GET /api/v1/runs/{id}/plan
// [?plan=ID], the newest by default): every night's blocks, each goal's
// coverage, the best nights and the exposure phases.
func (s *Server) apiRunPlan(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	want, err := queryID(r.URL.Query(), "plan")
	var doc *export.Run
	if err == nil {
		_, doc, _, err = s.runPlanDoc(r.Context(), u.actor, id, want)
	}
	if err == nil && doc == nil {
		err = errNotFound("the run has no saved plan yet: POST /api/v1/runs/{id}/plan makes one")
	}
	var b []byte
	if err == nil {
		b, err = export.JSON(doc)
	}
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	writeDoc(w, b)
}

// apiRunCoverage returns only the coverage part of a run's saved plan
// (GET /api/v1/runs/{id}/coverage[?plan=ID]).
func (s *Server) apiRunCoverage(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	want, err := queryID(r.URL.Query(), "plan")
	var doc *export.Run
	var plans []store.SavedPlan
	var planID int64
	if err == nil {
		plans, doc, planID, err = s.runPlanDoc(r.Context(), u.actor, id, want)
	}
	if err == nil && doc == nil {
		err = errNotFound("the run has no saved plan yet: POST /api/v1/runs/{id}/plan makes one")
	}
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	writeJSON(w, http.StatusOK, map[string]any{"run": doc.Run, "made_at": planMade(plans, planID), "past_nights": doc.Past,
		"targets": doc.Targets, "objective": doc.Objective})
}

// apiRunPlanCreate plans the run now and saves the plan (POST
// /api/v1/runs/{id}/plan[?past=N], N the nights already over; default: the
// nights whose window has ended). It answers when the plan is saved; a
// client that disconnects cancels it.
func (s *Server) apiRunPlanCreate(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	in, err := s.loadRun(r.Context(), u.actor, id)
	if err == nil && !u.can(store.ActCreate, store.EntPlan) {
		err = errForbidden("viewers cannot plan runs")
	}
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	past := in.nightsOver(s.now())
	if q := r.URL.Query().Get("past"); q != "" {
		if past, err = strconv.Atoi(q); err != nil || past < 0 || past > len(in.nights) {
			s.apiError(w, r, errInvalid("past: "+strconv.Quote(q)+" is not accepted; accepted: 0 to "+strconv.Itoa(len(in.nights))))
			return
		}
	}
	j := &job{}
	if _, err := s.planRunJob(r.Context(), u.actor, in, past, j); err != nil {
		s.apiError(w, r, err)
		return
	}
	_, doc, _, err := s.runPlanDoc(r.Context(), u.actor, id, 0)
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	writeJSON(w, http.StatusCreated, doc)
}
