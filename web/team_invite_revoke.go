package web

import "net/http"

// teamInviteRevoke revokes an unused invitation (POST
// /team/invitations/{id}/revoke; owners).
func (s *Server) teamInviteRevoke(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	if err := s.store.RevokeInvitation(r.Context(), u.actor, id); err != nil {
		s.renderError(w, r, err)
		return
	}
	http.Redirect(w, r, "/team?m=invite-revoked", http.StatusSeeOther)
}
