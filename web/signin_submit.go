package web

import (
	"net/http"
	"strings"

	"phasecast/store"
	"phasecast/web/page"
)

// signInSubmit checks an email and password (POST /login), at most a few
// attempts per client and minute, and opens a new session.
func (s *Server) signInSubmit(w http.ResponseWriter, r *http.Request) {
	if err := parseForm(w, r); err != nil {
		s.renderError(w, r, err)
		return
	}
	v := page.SignInView{Email: strings.TrimSpace(r.PostFormValue("email")), Next: safeNext(r.PostFormValue("next"), "/tonight"), Errs: page.Errs{}}
	c := s.chrome(r, "Sign in", "")
	if !s.logins.allow(clientKey(r), s.now()) {
		v.Errs[""] = "Too many sign-in attempts from your address. Wait a minute and try again."
		s.render(w, r, http.StatusTooManyRequests, page.SignIn(c, v))
		return
	}
	password := r.PostFormValue("password")
	if v.Email == "" || password == "" {
		v.Errs[""] = "Enter your email and your password."
		s.render(w, r, http.StatusUnprocessableEntity, page.SignIn(c, v))
		return
	}
	_, token, err := s.store.SignIn(r.Context(), v.Email, password)
	if err != nil {
		if store.ErrorCode(err) != store.EFORBIDDEN {
			s.renderError(w, r, err)
			return
		}
		v.Errs[""] = "That email and password do not match an account."
		s.render(w, r, http.StatusForbidden, page.SignIn(c, v))
		return
	}
	s.startSession(w, r, token)
	http.Redirect(w, r, v.Next, http.StatusSeeOther)
}
