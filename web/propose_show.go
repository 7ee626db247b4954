package web

import (
	"net/http"

	"phasecast/web/page"
)

// proposeShow is the proposal page (GET /propose).
func (s *Server) proposeShow(w http.ResponseWriter, r *http.Request, u *user) {
	pr, errs, err := s.loadProposal(r.Context(), u.actor, u.team.TeamID, r.URL.Query())
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	status := http.StatusOK
	if len(errs) > 0 {
		status = http.StatusUnprocessableEntity
	}
	s.render(w, r, status, page.Propose(s.chromeFor(r, u, "Proposal", "propose"), pr.view(errs)))
}
