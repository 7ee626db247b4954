package web

import (
	"net/http"
	"strconv"
	"time"

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
	block, berr := strconv.Atoi(r.PostFormValue("block"))
	status := r.PostFormValue("status")
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
	if night < 0 || night >= len(doc.Nights) || block < 0 || block >= len(doc.Nights[night].Blocks) {
		s.renderError(w, r, errNotFound("There is no such block in the plan."))
		return
	}
	if _, err := s.store.AddObservations(r.Context(), u.actor, blockObservations(id, doc.Nights[night].Blocks[block], status)); err != nil {
		s.renderError(w, r, err)
		return
	}
	http.Redirect(w, r, "/runs/"+i64s(id)+"?plan="+i64s(planID)+"&m=marked", http.StatusSeeOther)
}

// blockObservations are the exposures of a block marked done, back to back
// from its start, or one failed record spanning a lost block's first
// exposure.
func blockObservations(runID int64, b runBlockDoc, status string) []store.ObservationInput {
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
