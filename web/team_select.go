package web

import "net/http"

// teamSelect switches the team the pages show (POST /team/select).
func (s *Server) teamSelect(w http.ResponseWriter, r *http.Request, u *user) {
	if err := parseForm(w, r); err != nil {
		s.renderError(w, r, err)
		return
	}
	id, err := formInt64(r, "team_id")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	for _, m := range u.actor.Teams {
		if m.TeamID == id {
			s.setTeamCookie(w, r, id)
			http.Redirect(w, r, "/team?m=team-switched", http.StatusSeeOther)
			return
		}
	}
	s.renderError(w, r, errNotFound("You are not a member of that team."))
}
