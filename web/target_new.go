package web

import (
	"net/http"
	"strconv"

	"phasecast/web/page"
)

// targetNew shows an empty target form (GET /targets/new?list=ID).
func (s *Server) targetNew(w http.ResponseWriter, r *http.Request, u *user) {
	listID, err := strconv.ParseInt(r.URL.Query().Get("list"), 10, 64)
	if err != nil {
		s.renderError(w, r, errNotFound("Choose a list first."))
		return
	}
	l, err := s.store.GetList(r.Context(), u.actor, listID)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	f := withChoices(page.TargetForm{Title: "New target in " + l.Name, Action: "/targets", ListID: l.ID, Priority: "3"})
	s.render(w, r, http.StatusOK, page.TargetEdit(s.chromeFor(r, u, "New target", "targets"), f))
}
