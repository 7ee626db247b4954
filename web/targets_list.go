package web

import (
	"net/http"

	"phasecast/store"
	"phasecast/web/page"
)

// targetsList shows the team's lists and one list's table, sorted and
// filtered on the server from the query (?list=&sort=&dir=&q=&tag=).
func (s *Server) targetsList(w http.ResponseWriter, r *http.Request, u *user) {
	v, err := s.targetsView(r, u)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	s.render(w, r, http.StatusOK, page.Targets(s.chromeFor(r, u, "Targets", "targets"), v))
}

// targetsView loads the Targets page for the query of r.
func (s *Server) targetsView(r *http.Request, u *user) (page.TargetsView, error) {
	ctx, q := r.Context(), r.URL.Query()
	lists, err := s.store.ListLists(ctx, u.actor, u.team.TeamID)
	if err != nil {
		return page.TargetsView{}, err
	}
	v := page.TargetsView{CanEdit: u.can(store.ActCreate, store.EntTarget), Sort: q.Get("sort"), Desc: q.Get("dir") == "desc",
		Q: q.Get("q"), Tag: q.Get("tag"), Errs: page.Errs{}}
	if v.Sort == "" {
		v.Sort = "name"
	}
	want, err := queryID(q, "list")
	if err != nil {
		return page.TargetsView{}, err
	}
	var cur *store.TargetList
	for i, l := range lists {
		if l.ID == want || (want == 0 && i == 0) {
			cur = &lists[i]
		}
	}
	for _, l := range lists {
		v.Lists = append(v.Lists, page.ListTab{ID: l.ID, Name: l.Name, N: l.NTargets, Active: cur != nil && l.ID == cur.ID})
	}
	if cur == nil {
		if want != 0 {
			return v, errNotFound("There is no such list in this team.")
		}
		return v, nil
	}
	v.List, v.ListDesc, v.ListVer = page.ListTab{ID: cur.ID, Name: cur.Name, N: cur.NTargets}, cur.Description, cur.Version
	targets, err := s.store.ListTargets(ctx, u.actor, cur.ID)
	if err != nil {
		return v, err
	}
	sites, err := s.store.ListSites(ctx, u.actor, u.team.TeamID)
	if err != nil {
		return v, err
	}
	site, where := phaseSite(sites)
	now := s.now()
	v.PhaseNote = "Phases at " + fmtUTC(now) + " seen from " + where + "."
	var rows []targetRow
	for _, t := range targets {
		if matchFilter(t.Target, v.Q, v.Tag) {
			rows = append(rows, buildTargetRow(t, site, now))
		}
	}
	sortRows(rows, v.Sort, v.Desc)
	for _, row := range rows {
		v.Rows = append(v.Rows, row.view)
	}
	v.Total = len(targets)
	if v.CanEdit {
		v.Shares, err = s.shareRows(r, u, func(l store.ShareLink) bool { return l.ListID == cur.ID })
	}
	return v, err
}

// shareRows lists the team's share links that keep says to show.
func (s *Server) shareRows(r *http.Request, u *user, keep func(store.ShareLink) bool) ([]page.ShareRow, error) {
	links, err := s.store.ListShareLinks(r.Context(), u.actor, u.team.TeamID)
	if err != nil {
		return nil, err
	}
	var out []page.ShareRow
	for _, l := range links {
		if !keep(l) {
			continue
		}
		state := "live"
		switch {
		case !l.RevokedAt.IsZero():
			state = "revoked"
		case s.now().After(l.ExpiresAt):
			state = "expired"
		}
		out = append(out, page.ShareRow{ID: l.ID, Label: l.Label, Expires: fmtUTC(l.ExpiresAt), State: state})
	}
	return out, nil
}
