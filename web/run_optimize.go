package web

import (
	"context"
	"encoding/json"
	"fmt"
	"net/http"
	"strconv"

	"phasecast/planner"
	"phasecast/planner/export"
	"phasecast/store"
)

// runOptimize starts planning the run in the background (POST
// /runs/{id}/optimize) and shows its progress; the first ?past nights are
// over (observations on them count, they are not planned).
func (s *Server) runOptimize(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err == nil {
		err = parseForm(w, r)
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	in, err := s.loadRun(r.Context(), u.actor, id)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	if !u.can(store.ActCreate, store.EntPlan) {
		s.renderError(w, r, errForbidden("Viewers cannot plan runs."))
		return
	}
	past, err := strconv.Atoi(r.PostFormValue("past"))
	if err != nil || past < 0 || past > len(in.nights) {
		s.renderError(w, r, errInvalid(fmt.Sprintf("past: “%s” is not accepted; accepted: 0 to %d nights", r.PostFormValue("past"), len(in.nights))))
		return
	}
	back := "/runs/" + i64s(id)
	actor := u.actor
	j, err := s.jobs.start(u.actor.UserID, "Planning run "+in.run.Name, back, func(ctx context.Context, j *job) (string, error) {
		return s.planRunJob(ctx, actor, in, past, j)
	})
	if err != nil {
		if code, _ := errorCode(err); code == codeBusy || code == codeTooMany {
			w.Header().Set("Retry-After", strconv.Itoa(heavyRetryAfterS))
		}
		s.renderError(w, r, err)
		return
	}
	http.Redirect(w, r, "/jobs/"+j.id, http.StatusSeeOther)
}

// planRunJob plans the run and saves the plan; it returns the page to show.
func (s *Server) planRunJob(ctx context.Context, a store.Actor, in *runInputs, past int, j *job) (string, error) {
	req := in.request(past)
	req.CompareIndependent = true
	rp, err := planner.PlanRun(ctx, req, j.progress)
	if err != nil {
		return "", err
	}
	doc, err := newRunDoc(in, rp)
	if err != nil {
		return "", err
	}
	out, err := json.Marshal(doc)
	if err != nil {
		return "", err
	}
	inputs, err := json.Marshal(map[string]any{"run_id": in.run.ID, "site_id": in.site.ID, "site_version": in.site.Version,
		"list_id": in.run.ListID, "targets": len(in.targets), "observed": len(req.Observed), "past_nights": past,
		"constraints": export.NewConstraintsDoc(req.Constraints, largestAcquire(req.Targets))})
	if err != nil {
		return "", err
	}
	name := fmt.Sprintf("plan with %d of %d nights over", past, len(in.nights))
	p, err := s.store.SavePlan(context.WithoutCancel(ctx), a, in.run.ID, store.SavedPlanInput{Name: name, EngineVersion: engineVersion, Inputs: inputs, Output: out})
	if err != nil {
		return "", err
	}
	return "/runs/" + i64s(in.run.ID) + "?plan=" + i64s(p.ID) + "&m=run-saved", nil
}
