package web

import "net/http"

// teamJSON is a membership in the JSON API.
type teamJSON struct {
	ID   int64  `json:"id"`
	Name string `json:"name"`
	Role string `json:"role"`
}

// apiTeams lists the token owner's teams (GET /api/v1/teams).
func (s *Server) apiTeams(w http.ResponseWriter, r *http.Request, u *user) {
	out := []teamJSON{}
	for _, m := range u.actor.Teams {
		out = append(out, teamJSON{ID: m.TeamID, Name: m.TeamName, Role: string(m.Role)})
	}
	writeJSON(w, http.StatusOK, map[string][]teamJSON{"teams": out})
}
