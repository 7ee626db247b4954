package web

import (
	"net/http"

	"phasecast/web/page"
)

// targetEdit shows the form of a target (GET /targets/{id}/edit).
func (s *Server) targetEdit(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	t, err := s.store.GetTarget(r.Context(), u.actor, id)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	f := formFromTarget(t)
	f.Title, f.Action = "Edit "+t.Target.Name, "/targets/"+i64s(t.ID)
	s.render(w, r, http.StatusOK, page.TargetEdit(s.chromeFor(r, u, "Edit target", "targets"), withChoices(f)))
}
