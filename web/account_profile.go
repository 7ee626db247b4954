package web

import (
	"net/http"
	"strings"

	"phasecast/store"
	"phasecast/web/page"
)

// accountProfile saves the user's name and email (POST /account/profile).
func (s *Server) accountProfile(w http.ResponseWriter, r *http.Request, u *user) {
	if err := parseForm(w, r); err != nil {
		s.renderError(w, r, err)
		return
	}
	version, err := formInt64(r, "version")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	in := store.UserUpdate{Name: strings.TrimSpace(r.PostFormValue("name")), Email: strings.TrimSpace(r.PostFormValue("email"))}
	if _, err := s.store.UpdateUser(r.Context(), u.actor, version, in); err != nil {
		errs, status, ok := formErrs(err)
		v, verr := s.accountView(r, u)
		if !ok || verr != nil {
			s.renderError(w, r, err)
			return
		}
		v.Name, v.Email, v.ProfileErrs = in.Name, in.Email, errs
		s.render(w, r, status, page.Account(s.chromeFor(r, u, "Account", ""), v))
		return
	}
	http.Redirect(w, r, "/account?m=profile-saved", http.StatusSeeOther)
}
