package web

import "net/http"

// accountTokenRevoke revokes one of the user's API tokens (POST
// /account/tokens/{id}/revoke).
func (s *Server) accountTokenRevoke(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	if err := s.store.RevokeAPIToken(r.Context(), u.actor, id); err != nil {
		s.renderError(w, r, err)
		return
	}
	http.Redirect(w, r, "/account?m=token-revoked", http.StatusSeeOther)
}
