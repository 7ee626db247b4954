package web

import (
	"net/http"

	"phasecast/store"
)

// signInLinkSubmit uses a one-time sign-in link (POST /login/link/{token})
// and opens a new session.
func (s *Server) signInLinkSubmit(w http.ResponseWriter, r *http.Request) {
	if !s.logins.allow(clientKey(r), s.now()) {
		s.renderError(w, r, &codedError{code: codeForbidden, msg: "Too many sign-in attempts; wait a minute."})
		return
	}
	_, token, err := s.store.RedeemSignInLink(r.Context(), r.PathValue("token"))
	if err != nil {
		if store.ErrorCode(err) == store.EFORBIDDEN {
			err = &codedError{code: codeForbidden, msg: "This sign-in link was used already, has expired, or is not valid.", err: err}
		}
		s.renderError(w, r, err)
		return
	}
	s.startSession(w, r, token)
	http.Redirect(w, r, "/tonight?m=link-signed-in", http.StatusSeeOther)
}
