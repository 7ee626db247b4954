package web

import (
	"net/http"

	"phasecast/web/page"
)

// targetUpdate saves a target (POST /targets/{id}); a stale version shows
// the other person's version beside the user's unsaved changes.
func (s *Server) targetUpdate(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err == nil {
		err = parseForm(w, r)
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	version, err := formInt64(r, "version")
	listID, lerr := formInt64(r, "list")
	if err != nil || lerr != nil {
		s.renderError(w, r, errMalformed)
		return
	}
	p := parseTargetForm(r)
	p.form.Title, p.form.Action, p.form.ID, p.form.Version, p.form.ListID = "Edit "+p.form.Name, "/targets/"+i64s(id), id, version, listID
	if len(p.errs) == 0 {
		if _, err = s.store.UpdateTarget(r.Context(), u.actor, id, version, p.in); err == nil {
			http.Redirect(w, r, "/targets/"+i64s(id)+"?m=target-saved", http.StatusSeeOther)
			return
		}
		errs, status, ok := p.storeErrs(err)
		if !ok {
			s.renderError(w, r, err)
			return
		}
		p.form.Errs, p.form.Conflict = errs, conflictLines(err)
		if v := currentVersion(err); v != 0 {
			p.form.Version = v
			delete(p.form.Errs, "")
		}
		s.render(w, r, status, page.TargetEdit(s.chromeFor(r, u, "Edit target", "targets"), withChoices(p.form)))
		return
	}
	p.form.Errs = p.errs
	s.render(w, r, http.StatusUnprocessableEntity, page.TargetEdit(s.chromeFor(r, u, "Edit target", "targets"), withChoices(p.form)))
}
