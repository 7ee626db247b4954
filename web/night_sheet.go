package web

import (
	"net/http"

	"phasecast/web/page"
)

// nightSheet is the printable one-page night sheet (GET /night/sheet).
func (s *Server) nightSheet(w http.ResponseWriter, r *http.Request, u *user) {
	n, err := s.plannedNight(r, u)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v, err := n.view(s.now())
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v.Chart.Now = n.req.From.Add(-1) // a printed sheet has no "now"
	switch rows := len(v.Blocks) + (len(v.Unscheduled)+len(v.Warnings))/2; {
	case rows > 34:
		v.Density = "denser"
	case rows > 20:
		v.Density = "dense"
	}
	s.render(w, r, http.StatusOK, page.NightSheet(s.chromeFor(r, u, n.title(), "night"), v))
}
