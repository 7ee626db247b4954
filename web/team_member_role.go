package web

import (
	"net/http"

	"phasecast/store"
)

// teamMemberRole changes a member's role (POST
// /team/members/{id}/role; owners).
func (s *Server) teamMemberRole(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	if err := parseForm(w, r); err != nil {
		s.renderError(w, r, err)
		return
	}
	version, err := formInt64(r, "version")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	if _, err := s.store.SetMemberRole(r.Context(), u.actor, u.team.TeamID, id, version, store.Role(r.PostFormValue("role"))); err != nil {
		s.renderError(w, r, err)
		return
	}
	http.Redirect(w, r, "/team?m=role-changed", http.StatusSeeOther)
}
