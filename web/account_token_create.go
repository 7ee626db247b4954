package web

import (
	"net/http"
	"strconv"
	"strings"
	"time"

	"phasecast/web/page"
)

// accountTokenCreate makes an API token and shows it once (POST
// /account/tokens).
func (s *Server) accountTokenCreate(w http.ResponseWriter, r *http.Request, u *user) {
	if err := parseForm(w, r); err != nil {
		s.renderError(w, r, err)
		return
	}
	name := strings.TrimSpace(r.PostFormValue("token_name"))
	days, err := strconv.Atoi(r.PostFormValue("ttl_days"))
	errs := page.Errs{}
	if err != nil || days < 0 || days > 366 {
		errs["ttl_days"] = "Choose one of the offered durations."
	}
	var tok string
	if len(errs) == 0 {
		_, tok, err = s.store.CreateAPIToken(r.Context(), u.actor, name, time.Duration(days)*24*time.Hour)
		if err != nil {
			fe, _, ok := formErrs(err)
			if !ok {
				s.renderError(w, r, err)
				return
			}
			errs = fe
			if msg, ok := errs["name"]; ok {
				errs["token_name"] = msg
			}
		}
	}
	v, verr := s.accountView(r, u)
	if verr != nil {
		s.renderError(w, r, verr)
		return
	}
	v.TokenErrs, v.TokenName = errs, name
	status := http.StatusOK
	if len(errs) > 0 {
		status = http.StatusUnprocessableEntity
	} else {
		v.NewToken, v.NewTokenFor, v.TokenName = tok, name, ""
	}
	w.Header().Set("Cache-Control", "no-store")
	s.render(w, r, status, page.Account(s.chromeFor(r, u, "Account", ""), v))
}
