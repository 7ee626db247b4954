package web

import (
	"fmt"
	"net/http"
	"strconv"

	"phasecast/web/page"
)

// shareNight is one night of a shared run, read-only (GET
// /share/{token}/night?n=INDEX): the chart, the blocks and the goals left
// out, planned now with the run's site, list and constraints.
func (s *Server) shareNight(w http.ResponseWriter, r *http.Request) {
	ctx := r.Context()
	a, err := s.store.ShareActor(ctx, r.PathValue("token"))
	if err != nil {
		s.renderError(w, r, shareErr(err))
		return
	}
	if a.Share.RunID == 0 {
		s.renderError(w, r, errNotFound("This share link shows a list, not a run."))
		return
	}
	in, err := s.loadRun(ctx, a, a.Share.RunID)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	k, err := strconv.Atoi(r.URL.Query().Get("n"))
	if err != nil || k < 0 || k >= len(in.run.Nights) {
		s.renderError(w, r, errNotFound("The run has no such night."))
		return
	}
	n, errs, err := s.loadNight(ctx, a, a.Share.TeamID, nightQuery{runID: in.run.ID, date: in.run.Nights[k].Date})
	if err == nil && len(errs) == 0 && (len(n.sites) == 0 || len(n.lists) == 0) {
		err = errNotFound("The shared run's site or list is no longer there.")
	}
	if err == nil && len(errs) == 0 {
		err = n.planIt(errs)
	}
	for f, msg := range errs {
		err = errInvalid(fmt.Sprintf("%s: %s", f, msg))
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	nv, err := n.view(s.now())
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v := page.ShareView{Heading: "Run " + in.run.Name, Expires: fmtUTC(a.Share.ExpiresAt), Night: &nv}
	shareHeaders(w)
	s.render(w, r, http.StatusOK, page.Share(s.chrome(r, nv.Title, ""), v))
}
