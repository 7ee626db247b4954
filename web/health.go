package web

import (
	"context"
	"net/http"
	"time"
)

// healthz answers 200 "ok" when the database is reachable and 503 otherwise.
func (s *Server) healthz(w http.ResponseWriter, r *http.Request) {
	ctx, cancel := context.WithTimeout(r.Context(), 2*time.Second)
	defer cancel()
	w.Header().Set("Content-Type", "text/plain; charset=utf-8")
	w.Header().Set("Cache-Control", "no-store")
	if err := s.ping(ctx); err != nil {
		s.log.Error("healthz", "err", err)
		w.WriteHeader(http.StatusServiceUnavailable)
		_, _ = w.Write([]byte("database unreachable\n")) // dropped: the status is sent; a client that has gone cannot be told more
		return
	}
	_, _ = w.Write([]byte("ok\n")) // dropped: the status is sent; a client that has gone cannot be told more
}
