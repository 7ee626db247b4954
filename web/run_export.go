package web

import (
	"net/http"
	"time"

	"phasecast/planner/export"
)

// runExport downloads a saved run plan as CSV (every block of every night),
// JSON (the whole document) or iCalendar (GET /runs/{id}/plan.csv, .json,
// .ics[?plan=ID]).
func (s *Server) runExport(ext string) func(http.ResponseWriter, *http.Request, *user) {
	return func(w http.ResponseWriter, r *http.Request, u *user) {
		id, err := pathID(r, "id")
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		want, err := queryID(r.URL.Query(), "plan")
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		plans, doc, planID, err := s.runPlanDoc(r.Context(), u.actor, id, want)
		if err == nil && doc == nil {
			err = errNotFound("This run has no saved plan yet.")
		}
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		var stamp time.Time
		for _, p := range plans {
			if p.ID == planID {
				stamp = p.CreatedAt
			}
		}
		var body []byte
		switch ext {
		case "json":
			body, err = export.JSON(doc)
		case "csv":
			var loc *time.Location
			if loc, err = time.LoadLocation(doc.Zone); err == nil {
				body, err = export.RunCSV(*doc, loc)
			}
		default:
			body, err = export.RunICS(*doc, i64s(id), stamp)
		}
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		ctype := map[string]string{"csv": "text/csv; charset=utf-8", "json": "application/json", "ics": "text/calendar; charset=utf-8"}[ext]
		download(w, ctype, fileName(doc.Run, "run-plan", ext), body)
	}
}
