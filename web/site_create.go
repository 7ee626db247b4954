package web

import (
	"net/http"

	"phasecast/store"
	"phasecast/web/page"
)

// siteCreate adds a site (POST /sites), or shows the horizon preview when
// the preview button was pressed.
func (s *Server) siteCreate(w http.ResponseWriter, r *http.Request, u *user) {
	if err := parseForm(w, r); err != nil {
		s.renderError(w, r, err)
		return
	}
	p := parseSiteForm(r)
	p.form.Title, p.form.Action, p.form.CanEdit = "New site", "/sites", u.can(store.ActCreate, store.EntSite)
	c := s.chromeFor(r, u, "New site", "sites")
	if r.PostFormValue("preview") != "" || len(p.errs) > 0 {
		p.form.Errs = p.errs
		status := http.StatusOK
		if len(p.errs) > 0 && r.PostFormValue("preview") == "" {
			status = http.StatusUnprocessableEntity
		}
		s.render(w, r, status, page.SiteEdit(c, p.form))
		return
	}
	st, err := s.store.CreateSite(r.Context(), u.actor, u.team.TeamID, p.in)
	if err != nil {
		errs, status, ok := p.storeErrs(err)
		if !ok {
			s.renderError(w, r, err)
			return
		}
		p.form.Errs = errs
		s.render(w, r, status, page.SiteEdit(c, p.form))
		return
	}
	http.Redirect(w, r, "/sites/"+i64s(st.ID)+"?m=site-saved", http.StatusSeeOther)
}
