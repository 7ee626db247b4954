package web

import (
	"net/http"
	"slices"

	"phasecast/planner"
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
	// The sheet at the telescope leaves out the shortfall notes (how many
	// exposures a goal misses and why): they are for planning, on the
	// Night page.
	sp := *n.plan
	sp.Warnings = slices.DeleteFunc(slices.Clone(sp.Warnings), func(w planner.Warning) bool { return w.Code == planner.WarnShortfall })
	v.Warnings = warningGroups(&sp, n.loc)
	switch rows := len(v.Blocks) + len(v.Unscheduled)/2; {
	case rows > 34:
		v.Density = "denser"
	case rows > 20:
		v.Density = "dense"
	}
	s.render(w, r, http.StatusOK, page.NightSheet(s.chromeFor(r, u, n.title(), "night"), v))
}
