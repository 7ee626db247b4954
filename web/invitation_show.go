package web

import (
	"net/http"

	"phasecast/web/page"
)

// invitationShow shows what an invitation link offers (GET /invite/{token}).
func (s *Server) invitationShow(w http.ResponseWriter, r *http.Request) {
	inv, err := s.store.InvitationByToken(r.Context(), r.PathValue("token"))
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	u, signedIn := s.sessionUser(r)
	c := s.chrome(r, "Invitation", "")
	if signedIn {
		c = s.chromeFor(r, u, "Invitation", "")
	}
	s.render(w, r, http.StatusOK, page.Invitation(c, page.InvitationView{
		Action: "/invite/" + r.PathValue("token"), TeamName: inv.TeamName, Role: string(inv.Role),
		Expires: fmtUTC(inv.ExpiresAt), SignedIn: signedIn, Errs: page.Errs{},
	}))
}
