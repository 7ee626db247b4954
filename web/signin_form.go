package web

import (
	"net/http"

	"phasecast/web/page"
)

// signInForm shows the password sign-in form (GET /login).
func (s *Server) signInForm(w http.ResponseWriter, r *http.Request) {
	next := safeNext(r.URL.Query().Get("next"), "/tonight")
	if _, ok := s.sessionUser(r); ok {
		http.Redirect(w, r, next, http.StatusSeeOther)
		return
	}
	s.render(w, r, http.StatusOK, page.SignIn(s.chrome(r, "Sign in", ""), page.SignInView{Next: next, Errs: page.Errs{}}))
}
