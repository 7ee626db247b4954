package web

import (
	"net/http"

	"phasecast/store"
)

// apiListUpdate renames or redescribes a list (PUT /api/v1/lists/{id})
// from {"name", "description", "version"}; a stale version is 409.
func (s *Server) apiListUpdate(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	var in struct {
		Name        string `json:"name"`
		Description string `json:"description"`
		Version     int64  `json:"version"`
	}
	if err := readJSON(w, r, &in); err != nil {
		s.apiError(w, r, err)
		return
	}
	if in.Version <= 0 {
		s.apiError(w, r, errInvalid("version: give the version you read (GET /api/v1/lists returns it)"))
		return
	}
	l, err := s.store.UpdateList(r.Context(), u.actor, id, in.Version, store.ListInput{Name: in.Name, Description: in.Description})
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	writeJSON(w, http.StatusOK, listToJSON(l))
}
