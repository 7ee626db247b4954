package web

import "net/http"

// apiTargetGet returns one target (GET /api/v1/targets/{id}).
func (s *Server) apiTargetGet(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	t, err := s.store.GetTarget(r.Context(), u.actor, id)
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	writeJSON(w, http.StatusOK, targetToJSON(t))
}
