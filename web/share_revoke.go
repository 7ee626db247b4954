package web

import (
	"net/http"
	"strings"
)

// shareRevoke revokes a share link (POST /shares/{id}/revoke) and returns
// to the page the form was on.
func (s *Server) shareRevoke(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	if err := s.store.RevokeShareLink(r.Context(), u.actor, id); err != nil {
		s.renderError(w, r, err)
		return
	}
	back := localReferer(r)
	sep := "?"
	if strings.Contains(back, "?") {
		sep = "&"
	}
	http.Redirect(w, r, back+sep+"m=share-revoked", http.StatusSeeOther)
}
