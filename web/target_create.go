package web

import (
	"net/http"

	"phasecast/web/page"
)

// targetCreate adds a target to a list (POST /targets).
func (s *Server) targetCreate(w http.ResponseWriter, r *http.Request, u *user) {
	if err := parseForm(w, r); err != nil {
		s.renderError(w, r, err)
		return
	}
	listID, err := formInt64(r, "list")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	p := parseTargetForm(r)
	p.form.Title, p.form.Action, p.form.ListID = "New target", "/targets", listID
	if len(p.errs) > 0 {
		p.form.Errs = p.errs
		s.render(w, r, http.StatusUnprocessableEntity, page.TargetEdit(s.chromeFor(r, u, "New target", "targets"), withChoices(p.form)))
		return
	}
	t, err := s.store.CreateTarget(r.Context(), u.actor, listID, p.in)
	if err != nil {
		errs, status, ok := p.storeErrs(err)
		if !ok {
			s.renderError(w, r, err)
			return
		}
		p.form.Errs = errs
		s.render(w, r, status, page.TargetEdit(s.chromeFor(r, u, "New target", "targets"), withChoices(p.form)))
		return
	}
	http.Redirect(w, r, "/targets/"+i64s(t.ID)+"?m=target-saved", http.StatusSeeOther)
}
