package web

import "net/http"

// tonightShow is a placeholder until the Tonight page lands.
func (s *Server) tonightShow(w http.ResponseWriter, r *http.Request, u *user) {
	r.URL.RawQuery = r.URL.RawQuery + "&"
	s.targetsList(w, r, u)
}
