package web

import (
	"net/http"

	"phasecast/store"
	"phasecast/web/page"
)

// accountPassword sets a new password (POST /account/password); the store
// signs out the user's other sessions.
func (s *Server) accountPassword(w http.ResponseWriter, r *http.Request, u *user) {
	if err := parseForm(w, r); err != nil {
		s.renderError(w, r, err)
		return
	}
	current, next, confirm := r.PostFormValue("current"), r.PostFormValue("new_password"), r.PostFormValue("confirm")
	errs := page.Errs{}
	if next != confirm {
		errs["confirm"] = "The two new passwords differ; type the same one twice."
	}
	if len(errs) == 0 {
		err := s.store.ChangePassword(r.Context(), u.actor, current, next)
		if err == nil {
			http.Redirect(w, r, "/account?m=password-set", http.StatusSeeOther)
			return
		}
		if store.ErrorCode(err) == store.EFORBIDDEN {
			errs["current"] = "That is not your current password."
		} else if fe, _, ok := formErrs(err); ok {
			errs = fe
		} else {
			s.renderError(w, r, err)
			return
		}
	}
	v, err := s.accountView(r, u)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v.PassErrs = errs
	s.render(w, r, http.StatusUnprocessableEntity, page.Account(s.chromeFor(r, u, "Account", ""), v))
}
