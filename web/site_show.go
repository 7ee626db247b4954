package web

import (
	"net/http"

	"phasecast/store"
	"phasecast/web/page"
)

// siteShow is a site's page: its form and horizon preview (GET
// /sites/{id}); viewers see it read-only.
func (s *Server) siteShow(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	st, err := s.store.GetSite(r.Context(), u.actor, id)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	f := formFromSite(st)
	f.Title, f.Action, f.CanEdit = st.Name, "/sites/"+i64s(st.ID), u.can(store.ActUpdate, store.EntSite)
	s.render(w, r, http.StatusOK, page.SiteEdit(s.chromeFor(r, u, st.Name, "sites"), f))
}
