package web

import "net/http"

// signOut ends the session (POST /logout).
func (s *Server) signOut(w http.ResponseWriter, r *http.Request) {
	if tok := cookieValue(r, sessionCookie); tok != "" {
		if err := s.store.SignOut(r.Context(), tok); err != nil {
			s.renderError(w, r, err)
			return
		}
	}
	s.endSession(w, r)
	http.Redirect(w, r, "/login", http.StatusSeeOther)
}
