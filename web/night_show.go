package web

import (
	"net/http"

	"phasecast/web/page"
)

// nightShow is the Night page (GET /night): the request form and, for a
// complete request, the planned night.
func (s *Server) nightShow(w http.ResponseWriter, r *http.Request, u *user) {
	q, err := parseNightQuery(r.URL.Query())
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	n, errs, err := s.loadNight(r.Context(), u.actor, u.team.TeamID, q)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	c := s.chromeFor(r, u, "Night", "night")
	if len(n.sites) == 0 || len(n.lists) == 0 {
		s.render(w, r, http.StatusOK, page.Night(c, page.NightView{NoSite: len(n.sites) == 0, Form: page.NightForm{Errs: errs}}))
		return
	}
	// planIt checks the constraints even after a bad date, so that every
	// message shows at once; it plans only when nothing was refused.
	if err := n.planIt(errs); err != nil {
		s.renderError(w, r, err)
		return
	}
	v := page.NightView{}
	status := http.StatusOK
	if n.plan != nil {
		if v, err = n.view(s.now()); err != nil {
			s.renderError(w, r, err)
			return
		}
	} else {
		status = http.StatusUnprocessableEntity
	}
	v.Form = n.form(errs)
	s.render(w, r, status, page.Night(c, v))
}
