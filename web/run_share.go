package web

import (
	"net/http"
	"strconv"
	"strings"
	"time"

	"phasecast/store"
	"phasecast/web/page"
)

// runShare makes a read-only share link of a run (POST /runs/{id}/share)
// and shows it once on the run's page.
func (s *Server) runShare(w http.ResponseWriter, r *http.Request, u *user) {
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
	_, token, err := s.store.CreateShareLink(r.Context(), u.actor, store.ShareInput{RunID: id,
		Label: strings.TrimSpace(r.PostFormValue("label")), TTL: time.Duration(days) * 24 * time.Hour})
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	in, err := s.loadRun(r.Context(), u.actor, id)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	r.URL.RawQuery = ""
	v, err := s.memberRunView(r, u, in)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v.NewShare = s.link(r, "/share/"+token)
	w.Header().Set("Cache-Control", "no-store")
	s.render(w, r, http.StatusOK, page.Run(s.chromeFor(r, u, "Run "+in.run.Name, "runs"), v))
}
