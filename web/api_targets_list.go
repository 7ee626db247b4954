package web

import "net/http"

// apiTargetsList returns a list with its targets (GET
// /api/v1/lists/{id}/targets).
func (s *Server) apiTargetsList(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	l, err := s.store.GetList(r.Context(), u.actor, id)
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	ts, err := s.store.ListTargets(r.Context(), u.actor, id)
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	out := struct {
		List    listJSON     `json:"list"`
		Targets []targetJSON `json:"targets"`
	}{List: listToJSON(l), Targets: []targetJSON{}}
	for _, t := range ts {
		out.Targets = append(out.Targets, targetToJSON(t))
	}
	writeJSON(w, http.StatusOK, out)
}
