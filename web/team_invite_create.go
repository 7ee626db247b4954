package web

import (
	"net/http"
	"strconv"
	"strings"
	"time"

	"phasecast/store"
	"phasecast/web/page"
)

// teamInviteCreate makes an invitation link and shows it once (POST
// /team/invitations; owners).
func (s *Server) teamInviteCreate(w http.ResponseWriter, r *http.Request, u *user) {
	if err := parseForm(w, r); err != nil {
		s.renderError(w, r, err)
		return
	}
	role := store.Role(r.PostFormValue("role"))
	days, err := strconv.Atoi(r.PostFormValue("ttl_days"))
	if err != nil || days < 1 || days > 30 {
		s.renderError(w, r, errInvalid("Choose one of the offered durations (1 to 30 days)."))
		return
	}
	_, token, err := s.store.CreateInvitation(r.Context(), u.actor, u.team.TeamID, role, time.Duration(days)*24*time.Hour,
		strings.TrimSpace(r.PostFormValue("note")))
	v, verr := s.teamView(r, u)
	if verr != nil {
		s.renderError(w, r, verr)
		return
	}
	status := http.StatusOK
	if err != nil {
		errs, st, ok := formErrs(err)
		if !ok {
			s.renderError(w, r, err)
			return
		}
		v.Errs, status = errs, st
	} else {
		v.NewInvite = s.link(r, "/invite/"+token)
	}
	w.Header().Set("Cache-Control", "no-store")
	s.render(w, r, status, page.Team(s.chromeFor(r, u, "Team", "team"), v))
}
