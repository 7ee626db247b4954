package web

import (
	"net/http"

	"phasecast/web/page"
)

// windowsShow is the queue windows page (GET /windows).
func (s *Server) windowsShow(w http.ResponseWriter, r *http.Request, u *user) {
	win, errs, err := s.loadWindows(r.Context(), u.actor, u.team.TeamID, r.URL.Query())
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	status := http.StatusOK
	if len(errs) > 0 {
		status = http.StatusUnprocessableEntity
	}
	s.render(w, r, status, page.Windows(s.chromeFor(r, u, "Queue windows", "windows"), win.view(errs)))
}
