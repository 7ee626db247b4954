package web

import (
	"net/http"
	"net/url"

	"phasecast/store"
	"phasecast/web/page"
)

// shareShow is what a share link opens (GET /share/{token}): a list's
// targets, or a run's nights, read-only and without signing in.
func (s *Server) shareShow(w http.ResponseWriter, r *http.Request) {
	ctx, token := r.Context(), r.PathValue("token")
	a, err := s.store.ShareActor(ctx, token)
	if err != nil {
		s.renderError(w, r, shareErr(err))
		return
	}
	v := page.ShareView{Expires: fmtUTC(a.Share.ExpiresAt)}
	if a.Share.ListID != 0 {
		if err := s.shareList(r, a, &v); err != nil {
			s.renderError(w, r, err)
			return
		}
	} else {
		run, err := s.store.GetRun(ctx, a, a.Share.RunID)
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		v.Heading = "Run " + run.Name
		for _, n := range run.Nights {
			v.Nights = append(v.Nights, page.ShareNight{Label: n.Date + " (" + string(n.Part) + ")",
				Href: "/share/" + url.PathEscape(token) + "/night?date=" + n.Date})
		}
	}
	w.Header().Set("Cache-Control", "no-store")
	w.Header().Set("X-Robots-Tag", "noindex")
	s.render(w, r, http.StatusOK, page.Share(s.chrome(r, v.Heading, ""), v))
}

// shareList fills a share page with a list's targets and their phases now.
func (s *Server) shareList(r *http.Request, a store.Actor, v *page.ShareView) error {
	l, err := s.store.GetList(r.Context(), a, a.Share.ListID)
	if err != nil {
		return err
	}
	targets, err := s.store.ListTargets(r.Context(), a, l.ID)
	if err != nil {
		return err
	}
	site, where := phaseSite(nil)
	now := s.now()
	v.Heading, v.Rows = "Target list "+l.Name, []page.TargetRow{}
	v.PhaseNote = "Phases at " + fmtUTC(now) + " seen from " + where + "."
	for _, t := range targets {
		v.Rows = append(v.Rows, buildTargetRow(t, site, now).view)
	}
	return nil
}

// shareErr gives a dead share link a plain message.
func shareErr(err error) error {
	if store.ErrorCode(err) == store.EFORBIDDEN {
		return &codedError{code: codeNotFound, msg: "This share link has expired, was revoked, or is not valid.", err: err}
	}
	return err
}
