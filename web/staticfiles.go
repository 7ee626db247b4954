package web

import (
	"net/http"

	"phasecast/static"
)

// staticFiles serves the embedded stylesheet and script. URLs carry a
// content hash (static.Path), so they may be cached for a year.
func staticFiles() http.Handler {
	fs := http.StripPrefix("/static/", http.FileServerFS(static.FS))
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if r.URL.Query().Get("v") != "" {
			w.Header().Set("Cache-Control", "public, max-age=31536000, immutable")
		}
		fs.ServeHTTP(w, r)
	})
}
