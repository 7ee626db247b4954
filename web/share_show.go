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
		in, err := s.loadRun(ctx, a, a.Share.RunID)
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		plans, doc, planID, err := s.runPlanDoc(ctx, a, in.run.ID, 0)
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		rv := runView(in, doc, plans, planID, s.now())
		rv.Share = url.PathEscape(token)
		shareHeaders(w)
		s.render(w, r, http.StatusOK, page.Run(s.chrome(r, "Run "+in.run.Name, ""), rv))
		return
	}
	shareHeaders(w)
	s.render(w, r, http.StatusOK, page.Share(s.chrome(r, v.Heading, ""), v))
}

// shareHeaders keep share pages out of caches and search engines.
func shareHeaders(w http.ResponseWriter) {
	w.Header().Set("Cache-Control", "no-store")
	w.Header().Set("X-Robots-Tag", "noindex")
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
