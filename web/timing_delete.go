package web

import "net/http"

// timingDelete deletes a timing (POST /timings/{id}/delete).
func (s *Server) timingDelete(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err == nil {
		err = parseForm(w, r)
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	version, err := formInt64(r, "version")
	target, terr := formInt64(r, "target")
	if err != nil || terr != nil {
		s.renderError(w, r, errMalformed)
		return
	}
	if err := s.store.DeleteTiming(r.Context(), u.actor, id, version); err != nil {
		s.renderError(w, r, err)
		return
	}
	http.Redirect(w, r, "/targets/"+i64s(target)+"?m=target-saved", http.StatusSeeOther)
}
