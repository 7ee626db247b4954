package web

import (
	"net/http"
	"strconv"
	"strings"

	"phasecast/store"
	"phasecast/web/page"
)

// invitationAccept joins the team of an invitation (POST /invite/{token}):
// with the signed-in account, or with a new account made from the form.
func (s *Server) invitationAccept(w http.ResponseWriter, r *http.Request) {
	token := r.PathValue("token")
	if u, ok := s.sessionUser(r); ok {
		m, err := s.store.AcceptInvitation(r.Context(), u.actor, token)
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		s.setTeamCookie(w, r, m.TeamID)
		http.Redirect(w, r, "/team?m=joined", http.StatusSeeOther)
		return
	}
	if err := parseForm(w, r); err != nil {
		s.renderError(w, r, err)
		return
	}
	nu := store.NewUser{Name: strings.TrimSpace(r.PostFormValue("name")), Email: strings.TrimSpace(r.PostFormValue("email")), Password: r.PostFormValue("password")}
	_, m, session, err := s.store.AcceptInvitationNewUser(r.Context(), token, nu)
	if err != nil {
		errs, status, ok := formErrs(err)
		inv, ierr := s.store.InvitationByToken(r.Context(), token)
		if !ok || ierr != nil {
			s.renderError(w, r, err)
			return
		}
		s.render(w, r, status, page.Invitation(s.chrome(r, "Invitation", ""), page.InvitationView{
			Action: "/invite/" + token, TeamName: inv.TeamName, Role: string(inv.Role), Expires: fmtUTC(inv.ExpiresAt),
			Name: nu.Name, Email: nu.Email, Errs: errs,
		}))
		return
	}
	s.startSession(w, r, session)
	s.setTeamCookie(w, r, m.TeamID)
	http.Redirect(w, r, "/team?m=joined", http.StatusSeeOther)
}

// setTeamCookie remembers the team the pages show.
func (s *Server) setTeamCookie(w http.ResponseWriter, r *http.Request, teamID int64) {
	http.SetCookie(w, &http.Cookie{Name: teamCookie, Value: strconv.FormatInt(teamID, 10), Path: "/", HttpOnly: true,
		SameSite: http.SameSiteLaxMode, Secure: s.secure(r), MaxAge: 365 * 24 * 3600})
}
