package web

import (
	"net/http"
	"strings"

	"phasecast/store"
	"phasecast/web/page"
)

// runsList lists the team's runs and the new-run form (GET /runs).
func (s *Server) runsList(w http.ResponseWriter, r *http.Request, u *user) {
	v, err := s.runsView(r, u)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	s.render(w, r, http.StatusOK, page.Runs(s.chromeFor(r, u, "Runs", "runs"), v))
}

// runsView loads the runs page.
func (s *Server) runsView(r *http.Request, u *user) (page.RunsView, error) {
	ctx := r.Context()
	runs, err := s.store.ListRuns(ctx, u.actor, u.team.TeamID)
	if err != nil {
		return page.RunsView{}, err
	}
	sites, err := s.store.ListSites(ctx, u.actor, u.team.TeamID)
	if err != nil {
		return page.RunsView{}, err
	}
	lists, err := s.store.ListLists(ctx, u.actor, u.team.TeamID)
	if err != nil {
		return page.RunsView{}, err
	}
	v := page.RunsView{CanEdit: u.can(store.ActCreate, store.EntRun), Errs: page.Errs{}}
	siteName, listName := map[int64]string{}, map[int64]string{}
	for _, st := range sites {
		siteName[st.ID] = st.Name
		v.Sites = append(v.Sites, page.Option{Value: i64s(st.ID), Label: st.Name})
	}
	for _, l := range lists {
		listName[l.ID] = l.Name
		v.Lists = append(v.Lists, page.Option{Value: i64s(l.ID), Label: l.Name})
	}
	for _, run := range runs {
		plans, err := s.store.ListPlans(ctx, u.actor, run.ID)
		if err != nil {
			return v, err
		}
		var dates []string
		for _, n := range run.Nights {
			dates = append(dates, n.Date+partSuffix(n.Part))
		}
		v.Runs = append(v.Runs, page.RunRow{ID: run.ID, Name: run.Name, Site: siteName[run.SiteID], List: listName[run.ListID],
			Nights: strings.Join(dates, ", "), Plans: len(plans)})
	}
	return v, nil
}
