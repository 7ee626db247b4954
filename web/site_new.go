package web

import (
	"net/http"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/web/page"
)

// siteNew shows an empty site form with the default constraints (GET
// /sites/new).
func (s *Server) siteNew(w http.ResponseWriter, r *http.Request, u *user) {
	d := planner.DefaultConstraints()
	f := page.SiteForm{Title: "New site", Action: "/sites", CanEdit: u.can(store.ActCreate, store.EntSite), Zone: "UTC",
		Twilight: twilightOptions(string(d.Twilight)), MaxAirmass: num(d.MaxAirmass), SunAvoid: num(d.SunAvoidDeg),
		Preview: horizonChart(nil, 0), Errs: page.Errs{}}
	s.render(w, r, http.StatusOK, page.SiteEdit(s.chromeFor(r, u, "New site", "sites"), f))
}
