package web

import (
	"net/http"
)

// nightExport downloads the planned night as CSV, JSON or iCalendar (GET
// /night.csv, /night.json, /night.ics with the Night page's query).
func (s *Server) nightExport(ext string) func(http.ResponseWriter, *http.Request, *user) {
	return func(w http.ResponseWriter, r *http.Request, u *user) {
		n, err := s.plannedNight(r, u)
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		var body []byte
		ctype := map[string]string{"csv": "text/csv; charset=utf-8", "json": "application/json", "ics": "text/calendar; charset=utf-8"}[ext]
		switch ext {
		case "csv":
			body, err = n.exportCSV()
		case "json":
			body, err = n.exportJSON()
		default:
			body, err = n.exportICS()
		}
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		download(w, ctype, n.exportName(ext), body)
	}
}

// plannedNight plans the night of r's query; a request the form would
// reject is EINVALID with the first message.
func (s *Server) plannedNight(r *http.Request, u *user) (*night, error) {
	q, err := parseNightQuery(r.URL.Query())
	if err != nil {
		return nil, err
	}
	n, errs, err := s.loadNight(r.Context(), u.actor, u.team.TeamID, q)
	if err != nil {
		return nil, err
	}
	if len(n.sites) == 0 || len(n.lists) == 0 {
		return nil, errNotFound("The team needs a site and a target list to plan a night.")
	}
	if len(errs) == 0 {
		if err := n.planIt(errs); err != nil {
			return nil, err
		}
	}
	for field, msg := range errs {
		return nil, errInvalid(field + ": " + msg)
	}
	return n, nil
}
