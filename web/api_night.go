package web

import "net/http"

// apiNight plans a night (GET /api/v1/night) with the Night page's query
// (site, date, list, t, twilight, max_airmass, …; empty fields take the
// defaults) and returns the JSON of the night export.
func (s *Server) apiNight(w http.ResponseWriter, r *http.Request, u *user) {
	n, err := s.plannedNight(r, u)
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	b, err := n.exportJSON()
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	writeDoc(w, b)
}
