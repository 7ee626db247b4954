package web

import (
	"net/http"

	"phasecast/store"
	"phasecast/web/page"
)

// sitesList lists the team's sites (GET /sites).
func (s *Server) sitesList(w http.ResponseWriter, r *http.Request, u *user) {
	sites, err := s.store.ListSites(r.Context(), u.actor, u.team.TeamID)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v := page.SitesView{CanEdit: u.can(store.ActCreate, store.EntSite)}
	for _, st := range sites {
		pos, cons, hor := siteSummary(st)
		v.Sites = append(v.Sites, page.SiteRow{ID: st.ID, Name: st.Name, Position: pos, Zone: st.Zone,
			Elevation: num(st.Site.ElevM) + " m", Constraints: cons, Horizon: hor})
	}
	s.render(w, r, http.StatusOK, page.Sites(s.chromeFor(r, u, "Sites", "sites"), v))
}
