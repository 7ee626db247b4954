package web

import "net/http"

// apiTargetCreate adds a target to a list (POST /api/v1/lists/{id}/targets).
func (s *Server) apiTargetCreate(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	var in targetJSON
	if err := readJSON(w, r, &in); err != nil {
		s.apiError(w, r, err)
		return
	}
	if err := in.checkIdentity(0, id); err != nil {
		s.apiError(w, r, err)
		return
	}
	ti, err := in.input()
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	t, err := s.store.CreateTarget(r.Context(), u.actor, id, ti)
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	w.Header().Set("Location", "/api/v1/targets/"+i64s(t.ID))
	writeJSON(w, http.StatusCreated, targetToJSON(t))
}
