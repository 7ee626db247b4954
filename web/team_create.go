package web

import (
	"net/http"
	"strings"

	"phasecast/web/page"
)

// teamCreate makes a team with the user as its owner (POST /teams).
func (s *Server) teamCreate(w http.ResponseWriter, r *http.Request, u *user) {
	if err := parseForm(w, r); err != nil {
		s.renderError(w, r, err)
		return
	}
	name := strings.TrimSpace(r.PostFormValue("team_name"))
	t, err := s.store.CreateTeam(r.Context(), u.actor, name)
	if err != nil {
		errs, status, ok := formErrs(err)
		if !ok {
			s.renderError(w, r, err)
			return
		}
		if msg, ok := errs["name"]; ok {
			errs["team_name"] = msg
		}
		s.render(w, r, status, page.NoTeam(s.chromeFor(r, u, "New team", "team"), page.NoTeamView{Errs: errs, NewTeam: name}))
		return
	}
	s.setTeamCookie(w, r, t.ID)
	http.Redirect(w, r, "/team?m=team-created", http.StatusSeeOther)
}
