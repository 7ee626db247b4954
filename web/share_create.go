package web

import (
	"net/http"
	"strconv"
	"strings"
	"time"

	"phasecast/store"
	"phasecast/web/page"
)

// shareCreate makes a read-only share link of a list (POST
// /lists/{id}/share) and shows it once on the Targets page.
func (s *Server) shareCreate(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err == nil {
		err = parseForm(w, r)
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	days, err := strconv.Atoi(r.PostFormValue("ttl_days"))
	if err != nil || days < 1 || days > 366 {
		s.renderError(w, r, errInvalid("Choose one of the offered durations."))
		return
	}
	in := store.ShareInput{ListID: id, Label: strings.TrimSpace(r.PostFormValue("label")), TTL: time.Duration(days) * 24 * time.Hour}
	_, token, err := s.store.CreateShareLink(r.Context(), u.actor, in)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	r.URL.RawQuery = "list=" + i64s(id)
	v, err := s.targetsView(r, u)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v.NewShare = s.link(r, "/share/"+token)
	w.Header().Set("Cache-Control", "no-store")
	s.render(w, r, http.StatusOK, page.Targets(s.chromeFor(r, u, "Targets", "targets"), v))
}
