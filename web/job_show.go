package web

import (
	"net/http"

	"phasecast/web/page"
)

// jobShow is a computation's progress page (GET /jobs/{id}); a finished
// one goes on to its result.
func (s *Server) jobShow(w http.ResponseWriter, r *http.Request, u *user) {
	j, ok := s.jobs.get(r.PathValue("id"), u.actor.UserID)
	if !ok {
		s.renderError(w, r, errNotFound("No such computation (it may have finished long ago)."))
		return
	}
	fraction, msg, finished, next := j.state()
	if finished && j.err == nil {
		http.Redirect(w, r, next, http.StatusSeeOther)
		return
	}
	c := s.chromeFor(r, u, j.title, "runs")
	if !finished {
		c.Refresh = 2
	} else {
		c.Flash, c.FlashErr = msg, true
	}
	s.render(w, r, http.StatusOK, page.Job(c, page.JobView{ID: j.id, Title: j.title, Fraction: fraction, Message: msg, Back: j.back}))
}

// jobProgress reports a computation's progress as JSON for the progress
// bar (GET /jobs/{id}/progress).
func (s *Server) jobProgress(w http.ResponseWriter, r *http.Request, u *user) {
	j, ok := s.jobs.get(r.PathValue("id"), u.actor.UserID)
	if !ok {
		s.apiError(w, r, errNotFound("no such computation"))
		return
	}
	fraction, msg, finished, next := j.state()
	if finished && j.err != nil {
		next = "/jobs/" + j.id
	}
	writeJSON(w, http.StatusOK, map[string]any{"fraction": fraction, "message": msg, "done": finished, "next": next})
}

// jobCancel stops a computation (POST /jobs/{id}/cancel); the previous
// plan is kept.
func (s *Server) jobCancel(w http.ResponseWriter, r *http.Request, u *user) {
	j, ok := s.jobs.get(r.PathValue("id"), u.actor.UserID)
	if !ok {
		s.renderError(w, r, errNotFound("No such computation."))
		return
	}
	j.cancel()
	http.Redirect(w, r, j.back+"?m=optimize-canceled", http.StatusSeeOther)
}
