package web

import "net/http"

// routes registers every route of the application. This is the only place
// routes are declared.
func (s *Server) routes(mux *http.ServeMux) {
	mux.HandleFunc("GET /healthz", s.healthz)
	mux.Handle("GET /static/", staticFiles())
	mux.HandleFunc("POST /theme", s.toggleTheme)
	mux.HandleFunc("GET /{$}", s.home)
	mux.HandleFunc("/", s.notFound)
}
