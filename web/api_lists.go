package web

import (
	"net/http"

	"phasecast/store"
)

// listJSON is a target list in the JSON API.
type listJSON struct {
	ID          int64  `json:"id"`
	TeamID      int64  `json:"team_id"`
	Name        string `json:"name"`
	Description string `json:"description,omitempty"`
	NTargets    int    `json:"n_targets"`
	Version     int64  `json:"version"`
}

func listToJSON(l store.TargetList) listJSON {
	return listJSON{ID: l.ID, TeamID: l.TeamID, Name: l.Name, Description: l.Description, NTargets: l.NTargets, Version: l.Version}
}

// apiLists lists the team's target lists (GET /api/v1/lists[?team=ID]).
func (s *Server) apiLists(w http.ResponseWriter, r *http.Request, u *user) {
	lists, err := s.store.ListLists(r.Context(), u.actor, u.team.TeamID)
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	out := []listJSON{}
	for _, l := range lists {
		out = append(out, listToJSON(l))
	}
	writeJSON(w, http.StatusOK, map[string][]listJSON{"lists": out})
}
