package web

import (
	"fmt"
	"net/http"
)

// home sends a signed-in user to Tonight and anyone else to sign-in.
func (s *Server) home(w http.ResponseWriter, r *http.Request) {
	if _, ok := s.sessionUser(r); ok {
		http.Redirect(w, r, "/tonight", http.StatusSeeOther)
		return
	}
	http.Redirect(w, r, "/login", http.StatusSeeOther)
}

// notFound answers every path no route matches.
func (s *Server) notFound(w http.ResponseWriter, r *http.Request) {
	s.renderError(w, r, &codedError{code: codeNotFound, msg: "There is no page at this address.", err: fmt.Errorf("no route for %s %s", r.Method, r.URL.Path)})
}
