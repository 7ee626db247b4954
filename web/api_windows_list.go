package web

import "net/http"

// apiWindows lists queue windows (GET /api/v1/windows) with the page's
// query: site, list, t (target ids), from and to (local dates).
func (s *Server) apiWindows(w http.ResponseWriter, r *http.Request, u *user) {
	win, errs, err := s.loadWindows(r.Context(), u.actor, u.team.TeamID, r.URL.Query())
	if err == nil && win.groups == nil && len(errs) == 0 {
		err = errInvalid("from and to (local dates YYYY-MM-DD) are required, and the team needs a site and a list")
	}
	for k, v := range errs {
		err = errInvalid(k + ": " + v)
	}
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	b, err := win.exportJSON()
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	writeDoc(w, b)
}
