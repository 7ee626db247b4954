package web

import (
	"net/http"
	"strings"

	"phasecast/store"
)

// listUpdate renames or redescribes a list (POST /lists/{id}).
func (s *Server) listUpdate(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err == nil {
		err = parseForm(w, r)
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	version, err := formInt64(r, "version")
	if err == nil {
		_, err = s.store.UpdateList(r.Context(), u.actor, id, version,
			store.ListInput{Name: strings.TrimSpace(r.PostFormValue("name")), Description: strings.TrimSpace(r.PostFormValue("description"))})
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	http.Redirect(w, r, "/targets?list="+i64s(id)+"&m=list-saved", http.StatusSeeOther)
}
