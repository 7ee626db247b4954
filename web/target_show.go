package web

import (
	"net/http"

	"phasecast/web/page"
)

// targetShow is a target's detail page (GET /targets/{id}).
func (s *Server) targetShow(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v, err := s.targetDetail(r.Context(), u, id)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	s.render(w, r, http.StatusOK, page.TargetDetail(s.chromeFor(r, u, v.Name, "targets"), v))
}
