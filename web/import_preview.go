package web

import (
	"net/http"
	"strings"

	"phasecast/store"
	"phasecast/web/page"
)

// importPreview shows what importing a file would change, writing nothing
// (POST /lists/{id}/import/preview): each row's action, or every bad cell
// by line and column.
func (s *Server) importPreview(w http.ResponseWriter, r *http.Request, u *user) {
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
	l, err := s.store.GetList(r.Context(), u.actor, id)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v := page.ImportView{ListID: l.ID, ListName: l.Name, Content: content, Format: format, Formats: importFormats(format), Errs: page.Errs{}}
	status := http.StatusOK
	if strings.TrimSpace(content) == "" {
		v.Errs[""], status = "Choose a file or paste its text.", http.StatusUnprocessableEntity
	} else if res, err := s.store.PreviewImport(r.Context(), u.actor, l.ID, strings.NewReader(content), store.FileFormat(format)); err != nil {
		var ok bool
		if v.CellErrs, v.Errs, status, ok = importProblems(err); !ok {
			s.renderError(w, r, err)
			return
		}
	} else {
		v.Previewed, v.Rows, v.Assumptions = true, importRows(res), res.Assumptions
		v.Added, v.Updated, v.Unchanged = res.Added, res.Updated, res.Unchanged
	}
	s.render(w, r, status, page.Import(s.chromeFor(r, u, "Import targets", "targets"), v))
}
