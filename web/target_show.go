package web

import "net/http"

// targetShow is a placeholder until the detail page lands.
func (s *Server) targetShow(w http.ResponseWriter, r *http.Request, u *user) {
	http.Redirect(w, r, "/targets/"+r.PathValue("id")+"/edit", http.StatusSeeOther)
}
