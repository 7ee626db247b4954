package web

import (
	"net/http"
	"strconv"
)

// apiTargetDelete deletes a target (DELETE /api/v1/targets/{id}?version=N).
func (s *Server) apiTargetDelete(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	version, err := strconv.ParseInt(r.URL.Query().Get("version"), 10, 64)
	if err != nil || version <= 0 {
		s.apiError(w, r, errInvalid("version: give ?version=N, the version you read"))
		return
	}
	if err := s.store.DeleteTarget(r.Context(), u.actor, id, version); err != nil {
		s.apiError(w, r, err)
		return
	}
	w.WriteHeader(http.StatusNoContent)
}
