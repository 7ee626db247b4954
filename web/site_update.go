package web

import (
	"errors"
	"net/http"

	"phasecast/store"
	"phasecast/web/page"
)

// siteUpdate saves a site (POST /sites/{id}), or previews its horizon mask.
// A stale version reloads the other person's version.
func (s *Server) siteUpdate(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err == nil {
		err = parseForm(w, r)
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	version, err := formInt64(r, "version")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	p := parseSiteForm(r)
	p.form.Title, p.form.Action, p.form.ID, p.form.Version, p.form.CanEdit = p.form.Name, "/sites/"+i64s(id), id, version, u.can(store.ActUpdate, store.EntSite)
	c := s.chromeFor(r, u, "Site", "sites")
	if r.PostFormValue("preview") != "" || len(p.errs) > 0 {
		p.form.Errs = p.errs
		status := http.StatusOK
		if len(p.errs) > 0 && r.PostFormValue("preview") == "" {
			status = http.StatusUnprocessableEntity
		}
		s.render(w, r, status, page.SiteEdit(c, p.form))
		return
	}
	if _, err := s.store.UpdateSite(r.Context(), u.actor, id, version, p.in); err != nil {
		var se *store.Error
		if errors.As(err, &se) && se.Code == store.ECONFLICT {
			if cur, ok := se.Current.(store.SiteRecord); ok {
				f := formFromSite(cur)
				f.Title, f.Action, f.CanEdit, f.Conflict = cur.Name, p.form.Action, true, true
				s.render(w, r, http.StatusConflict, page.SiteEdit(c, f))
				return
			}
		}
		errs, status, ok := p.storeErrs(err)
		if !ok {
			s.renderError(w, r, err)
			return
		}
		p.form.Errs = errs
		s.render(w, r, status, page.SiteEdit(c, p.form))
		return
	}
	http.Redirect(w, r, "/sites/"+i64s(id)+"?m=site-saved", http.StatusSeeOther)
}
