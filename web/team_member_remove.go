package web

import "net/http"

// teamMemberRemove removes a member, or lets the user leave (POST
// /team/members/{id}/remove).
func (s *Server) teamMemberRemove(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	if err := s.store.RemoveMember(r.Context(), u.actor, u.team.TeamID, id); err != nil {
		s.renderError(w, r, err)
		return
	}
	if id == u.actor.UserID {
		http.Redirect(w, r, "/team?m=left-team", http.StatusSeeOther)
		return
	}
	http.Redirect(w, r, "/team?m=member-removed", http.StatusSeeOther)
}
