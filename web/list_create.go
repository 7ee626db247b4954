package web

import (
	"net/http"
	"strings"

	"phasecast/store"
	"phasecast/web/page"
)

// listCreate makes a target list (POST /lists).
func (s *Server) listCreate(w http.ResponseWriter, r *http.Request, u *user) {
	if err := parseForm(w, r); err != nil {
		s.renderError(w, r, err)
		return
	}
	in := store.ListInput{Name: strings.TrimSpace(r.PostFormValue("name")), Description: strings.TrimSpace(r.PostFormValue("description"))}
	l, err := s.store.CreateList(r.Context(), u.actor, u.team.TeamID, in)
	if err != nil {
		errs, status, ok := formErrs(err)
		v, verr := s.targetsView(r, u)
		if !ok || verr != nil {
			s.renderError(w, r, err)
			return
		}
		v.Errs, v.NewList = errs, in.Name
		s.render(w, r, status, page.Targets(s.chromeFor(r, u, "Targets", "targets"), v))
		return
	}
	http.Redirect(w, r, "/targets?list="+i64s(l.ID)+"&m=list-saved", http.StatusSeeOther)
}
