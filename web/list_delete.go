package web

import "net/http"

// listDelete deletes a list with its targets (POST /lists/{id}/delete).
func (s *Server) listDelete(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err == nil {
		err = parseForm(w, r)
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	version, err := formInt64(r, "version")
	if err == nil {
		err = s.store.DeleteList(r.Context(), u.actor, id, version)
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	http.Redirect(w, r, "/targets?m=list-deleted", http.StatusSeeOther)
}
