package web

import "net/http"

// siteDelete deletes a site (POST /sites/{id}/delete).
func (s *Server) siteDelete(w http.ResponseWriter, r *http.Request, u *user) {
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
		err = s.store.DeleteSite(r.Context(), u.actor, id, version)
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	http.Redirect(w, r, "/sites?m=site-deleted", http.StatusSeeOther)
}
