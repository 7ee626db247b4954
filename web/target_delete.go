package web

import "net/http"

// targetDelete deletes a target (POST /targets/{id}/delete).
func (s *Server) targetDelete(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err == nil {
		err = parseForm(w, r)
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	version, err := formInt64(r, "version")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	t, err := s.store.GetTarget(r.Context(), u.actor, id)
	if err == nil {
		err = s.store.DeleteTarget(r.Context(), u.actor, id, version)
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	http.Redirect(w, r, "/targets?list="+i64s(t.ListID)+"&m=target-deleted", http.StatusSeeOther)
}
