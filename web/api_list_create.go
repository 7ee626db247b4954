package web

import (
	"net/http"

	"phasecast/store"
)

// apiListCreate makes a list (POST /api/v1/lists[?team=ID]) from
// {"name": …, "description": …}.
func (s *Server) apiListCreate(w http.ResponseWriter, r *http.Request, u *user) {
	var in struct {
		Name        string `json:"name"`
		Description string `json:"description"`
	}
	if err := readJSON(w, r, &in); err != nil {
		s.apiError(w, r, err)
		return
	}
	l, err := s.store.CreateList(r.Context(), u.actor, u.team.TeamID, store.ListInput{Name: in.Name, Description: in.Description})
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	w.Header().Set("Location", "/api/v1/lists/"+i64s(l.ID))
	writeJSON(w, http.StatusCreated, listToJSON(l))
}
