package web

import (
	"net/http"
	"strconv"
	"time"

	"phasecast/planner/export"
	"phasecast/store"
)

// runMark records what became of a planned block (POST /runs/{id}/mark):
// "done" records its exposures as taken, "lost" records the block as
// failed (clouds, fault); the next replan counts them.
func (s *Server) runMark(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err == nil {
		err = parseForm(w, r)
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	planID, perr := formInt64(r, "plan")
	night, nerr := strconv.Atoi(r.PostFormValue("night"))
	status := r.PostFormValue("status")
	// block=all marks every block of the night not marked yet as lost:
	// the whole night was lost (clouds, fault).
	whole := r.PostFormValue("block") == "all" && status == "lost"
	block, berr := strconv.Atoi(r.PostFormValue("block"))
	if whole {
		berr = nil
	}
	if perr != nil || nerr != nil || berr != nil || (status != "done" && status != "lost") {
		s.renderError(w, r, errMalformed)
		return
	}
	p, err := s.store.GetPlan(r.Context(), u.actor, planID)
	if err != nil || p.RunID != id {
		s.renderError(w, r, errNotFound("There is no such plan of this run."))
		return
	}
	doc, err := loadDoc(p)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	if night < 0 || night >= len(doc.Nights) || (!whole && (block < 0 || block >= len(doc.Nights[night].Blocks))) {
		s.renderError(w, r, errNotFound("There is no such block in the plan."))
		return
	}
	var obs []store.ObservationInput
	if whole {
		if obs, err = s.unmarkedLost(r, u, id, doc.Nights[night].Blocks); err != nil {
			s.renderError(w, r, err)
			return
		}
	} else {
		obs = blockObservations(id, doc.Nights[night].Blocks[block], status)
	}
	if len(obs) == 0 {
		http.Redirect(w, r, "/runs/"+i64s(id)+"?plan="+i64s(planID)+"&m=marked", http.StatusSeeOther)
		return
	}
	if _, err := s.store.AddObservations(r.Context(), u.actor, obs); err != nil {
		s.renderError(w, r, err)
		return
	}
	http.Redirect(w, r, "/runs/"+i64s(id)+"?plan="+i64s(planID)+"&m=marked", http.StatusSeeOther)
}

// blockObservations are the exposures of a block marked done, back to back
// from its start, or one failed record spanning a lost block's first
// exposure.
func blockObservations(runID int64, b export.RunBlock, status string) []store.ObservationInput {
	start := time.Time(b.Start)
	step := time.Duration((b.ExposureS + b.OverheadS) * float64(time.Second))
	var goal *float64
	if b.PhaseGoal != nil {
		g := *b.PhaseGoal
		goal = &g
	}
	mk := func(t time.Time, st store.ObsStatus) store.ObservationInput {
		return store.ObservationInput{TargetID: b.TargetID, RunID: runID, StartUTC: t, ExposureS: b.ExposureS, Status: st,
			Source: store.ObsFromBlock, GoalCenter: goal, Note: "marked " + status + " in the web interface"}
	}
	if status == "lost" {
		return []store.ObservationInput{mk(start, store.ObsFailed)}
	}
	out := make([]store.ObservationInput, b.NExposures)
	for k := range out {
		out[k] = mk(start.Add(time.Duration(k)*step), store.ObsDone)
	}
	return out
}

// unmarkedLost is one failed record for each block of a night that has no
// mark yet, for the "whole night lost" action.
func (s *Server) unmarkedLost(r *http.Request, u *user, runID int64, blocks []export.RunBlock) ([]store.ObservationInput, error) {
	in, err := s.loadRun(r.Context(), u.actor, runID)
	if err != nil {
		return nil, err
	}
	var out []store.ObservationInput
	for bi, b := range blocks {
		if runBlockRow(in, bi, b).State == "" {
			out = append(out, blockObservations(runID, b, "lost")...)
		}
	}
	return out, nil
}
