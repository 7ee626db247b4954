package web

import "net/http"

// apiTargetUpdate replaces a target (PUT /api/v1/targets/{id}). The body's
// "version" must be the current one; a stale version is 409 with the
// current target under "current".
func (s *Server) apiTargetUpdate(w http.ResponseWriter, r *http.Request, u *user) {
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
	if in.Version <= 0 {
		s.apiError(w, r, errInvalid("version: give the version you read (GET returns it); it guards against overwriting someone else's change"))
		return
	}
	if in.ID != 0 || in.ListID != 0 {
		cur, err := s.store.GetTarget(r.Context(), u.actor, id)
		if err == nil {
			err = in.checkIdentity(id, cur.ListID)
		}
		if err != nil {
			s.apiError(w, r, err)
			return
		}
	}
	ti, err := in.input()
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	t, err := s.store.UpdateTarget(r.Context(), u.actor, id, in.Version, ti)
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	writeJSON(w, http.StatusOK, targetToJSON(t))
}
