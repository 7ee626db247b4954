package web

import (
	"net/http"

	"phasecast/web/page"
)

// importForm shows the import page of a list (GET /lists/{id}/import).
func (s *Server) importForm(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	l, err := s.store.GetList(r.Context(), u.actor, id)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v := page.ImportView{ListID: l.ID, ListName: l.Name, Formats: importFormats(""), Errs: page.Errs{}}
	s.render(w, r, http.StatusOK, page.Import(s.chromeFor(r, u, "Import targets", "targets"), v))
}
