package web

import (
	"net/http"
	"strings"

	"phasecast/store"
	"phasecast/web/page"
)

// importCommit imports a previewed file, all or nothing (POST
// /lists/{id}/import).
func (s *Server) importCommit(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	content, format, err := readImport(w, r)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	_, err = s.store.ImportTargets(r.Context(), u.actor, id, strings.NewReader(content), store.FileFormat(format))
	if err == nil {
		http.Redirect(w, r, "/targets?list="+i64s(id)+"&m=imported", http.StatusSeeOther)
		return
	}
	cells, errs, status, ok := importProblems(err)
	l, lerr := s.store.GetList(r.Context(), u.actor, id)
	if !ok || lerr != nil {
		s.renderError(w, r, err)
		return
	}
	v := page.ImportView{ListID: l.ID, ListName: l.Name, Content: content, Format: format, Formats: importFormats(format), CellErrs: cells, Errs: errs}
	s.render(w, r, status, page.Import(s.chromeFor(r, u, "Import targets", "targets"), v))
}
