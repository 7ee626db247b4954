package web

import "net/http"

// windowsExport downloads queue windows as CSV, JSON or iCalendar (GET
// /windows.csv, .json, .ics with the page's query).
func (s *Server) windowsExport(ext string) func(http.ResponseWriter, *http.Request, *user) {
	return func(w http.ResponseWriter, r *http.Request, u *user) {
		win, errs, err := s.loadWindows(r.Context(), u.actor, u.team.TeamID, r.URL.Query())
		if err == nil && win.groups == nil {
			err = errInvalid("Give the date range (from, to) and a site and list.")
		}
		for k, v := range errs {
			err = errInvalid(k + ": " + v)
		}
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		var body []byte
		switch ext {
		case "csv":
			body, err = win.exportCSV()
		case "json":
			body, err = win.exportJSON()
		default:
			body, err = win.exportICS()
		}
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		ctype := map[string]string{"csv": "text/csv; charset=utf-8", "json": "application/json", "ics": "text/calendar; charset=utf-8"}[ext]
		download(w, ctype, win.exportName(ext), body)
	}
}
