package web

import (
	"net/http"

	"phasecast/web/page"
)

// tonightShow is the Tonight page (GET /tonight).
func (s *Server) tonightShow(w http.ResponseWriter, r *http.Request, u *user) {
	n, runs, run, err := s.tonightNight(r.Context(), u, r.URL.Query())
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v := s.tonightView(n, runs, run, s.now())
	v.Refresh = "/tonight/body?" + r.URL.RawQuery
	s.render(w, r, http.StatusOK, page.Tonight(s.chromeFor(r, u, "Tonight", "tonight"), v))
}

// tonightBody is the part of the Tonight page that reloads itself every
// minute (GET /tonight/body).
func (s *Server) tonightBody(w http.ResponseWriter, r *http.Request, u *user) {
	n, runs, run, err := s.tonightNight(r.Context(), u, r.URL.Query())
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	w.Header().Set("Cache-Control", "no-store")
	s.render(w, r, http.StatusOK, page.TonightBody(s.tonightView(n, runs, run, s.now())))
}
