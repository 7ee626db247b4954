// Package web is phasecast's HTTP interface: server-rendered pages (templ),
// SVG charts, exports (CSV, JSON, iCalendar) and the JSON API under /api/v1.
//
// Handlers parse a request into a struct, validate it, call the store or the
// planner, and render a typed view model. There is no SQL and no astronomy
// here: the store decides who may do what (its single policy function), the
// planner computes the sky.
package web

import (
	"context"
	"errors"
	"log/slog"
	"net/http"
	"strings"
	"time"

	"phasecast/store"
)

// Config is what the server needs from its caller.
type Config struct {
	Logger *slog.Logger
	// Now is the program's one clock (required): sessions, sign-in links,
	// rate limits, jobs, share expiry, the Tonight page and default night
	// dates read "now" from it. cmd/phasecast hands it down; tests pin it.
	Now func() time.Time
	// BaseURL is the externally visible address ("http://127.0.0.1:8080"),
	// used to build sign-in, invitation and share links.
	BaseURL string
	// Store is the team database.
	Store *store.Store
}

// Server holds the dependencies of the handlers.
type Server struct {
	log     *slog.Logger
	now     func() time.Time
	baseURL string
	store   *store.Store
	ping    func(ctx context.Context) error
	logins  *limiter
	jobs    jobs
	plans   planCache
	gate    *heavyGate
}

// New returns a Server for cfg.
func New(cfg Config) (*Server, error) {
	if cfg.Store == nil {
		return nil, errors.New("web: Config.Store is required")
	}
	if cfg.Now == nil {
		return nil, errors.New("web: Config.Now (the clock) is required")
	}
	s := &Server{
		log:     cfg.Logger,
		now:     cfg.Now,
		baseURL: cfg.BaseURL,
		store:   cfg.Store,
		ping:    cfg.Store.Ping,
		logins:  newLimiter(10, 30*time.Second),
		gate:    newHeavyGate(defaultHeavySlots()),
	}
	if s.log == nil {
		s.log = slog.New(slog.DiscardHandler)
	}
	return s, nil
}

// Handler returns the complete HTTP handler: routes wrapped in logging,
// panic recovery, security headers and cross-origin protection (see
// router in routes.go).
func (s *Server) Handler() http.Handler {
	return s.router()
}

// link returns the absolute URL of path on this server: under BaseURL when
// configured, else on the host the request came to.
func (s *Server) link(r *http.Request, path string) string {
	if s.baseURL != "" {
		return strings.TrimSuffix(s.baseURL, "/") + path
	}
	scheme := "http"
	if r.TLS != nil {
		scheme = "https"
	}
	return scheme + "://" + r.Host + path
}
