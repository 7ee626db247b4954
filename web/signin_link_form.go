package web

import (
	"net/http"

	"phasecast/web/page"
)

// signInLinkForm is the page a one-time sign-in link opens (GET
// /login/link/{token}). It only shows a button: the link is used by the
// POST, so that link previews cannot use it up.
func (s *Server) signInLinkForm(w http.ResponseWriter, r *http.Request) {
	action := "/login/link/" + r.PathValue("token")
	s.render(w, r, http.StatusOK, page.LinkSignIn(s.chrome(r, "Sign in", ""), page.LinkSignInView{Action: action}))
}
