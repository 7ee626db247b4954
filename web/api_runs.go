package web

import (
	"net/http"

	"phasecast/store"
)

// runJSON is a run in the JSON API.
type runJSON struct {
	ID      int64            `json:"id"`
	Name    string           `json:"name"`
	SiteID  int64            `json:"site_id"`
	ListID  int64            `json:"list_id"`
	Nights  []store.RunNight `json:"nights"`
	Version int64            `json:"version"`
}

// apiRuns lists the team's runs (GET /api/v1/runs[?team=ID]).
func (s *Server) apiRuns(w http.ResponseWriter, r *http.Request, u *user) {
	runs, err := s.store.ListRuns(r.Context(), u.actor, u.team.TeamID)
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	out := []runJSON{}
	for _, run := range runs {
		out = append(out, runJSON{ID: run.ID, Name: run.Name, SiteID: run.SiteID, ListID: run.ListID, Nights: run.Nights, Version: run.Version})
	}
	writeJSON(w, http.StatusOK, map[string][]runJSON{"runs": out})
}
