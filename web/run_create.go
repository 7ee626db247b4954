package web

import (
	"fmt"
	"net/http"
	"strconv"
	"strings"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/web/page"
)

// runCreate makes a run (POST /runs) with the site's default constraints.
func (s *Server) runCreate(w http.ResponseWriter, r *http.Request, u *user) {
	if err := parseForm(w, r); err != nil {
		s.renderError(w, r, err)
		return
	}
	name, nightsText := strings.TrimSpace(r.PostFormValue("name")), strings.TrimSpace(r.PostFormValue("nights"))
	siteID, err1 := formInt64(r, "site")
	listID, err2 := formInt64(r, "list")
	errs := page.Errs{}
	nights, err := parseNightsField(nightsText)
	if err != nil {
		errs["nights"] = err.Error()
	}
	if err1 != nil || err2 != nil {
		errs[""] = "Choose a site and a target list (add them first if the team has none)."
	}
	if len(errs) == 0 {
		site, err := s.store.GetSite(r.Context(), u.actor, siteID)
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		c := site.Constraints
		c.Horizon = nil
		run, err := s.store.CreateRun(r.Context(), u.actor, u.team.TeamID, store.RunInput{Name: name, SiteID: siteID, ListID: listID,
			Nights: storeNights(nights), Constraints: c})
		if err == nil {
			http.Redirect(w, r, "/runs/"+i64s(run.ID)+"?m=run-saved", http.StatusSeeOther)
			return
		}
		fe, _, ok := formErrs(err)
		if !ok {
			s.renderError(w, r, err)
			return
		}
		errs = fe
	}
	v, err := s.runsView(r, u)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v.Name, v.Nights, v.Errs = name, nightsText, errs
	s.render(w, r, http.StatusUnprocessableEntity, page.Runs(s.chromeFor(r, u, "Runs", "runs"), v))
}

// parseNightsField reads the nights field: a list for ParseRunNights, or
// "YYYY-MM-DD+N" for N consecutive nights.
func parseNightsField(s string) ([]planner.RunNight, error) {
	if start, count, ok := strings.Cut(s, "+"); ok {
		y, m, d, err := planner.ParseDate(strings.TrimSpace(start))
		if err != nil {
			return nil, fmt.Errorf("“%s” is not a date; accepted: YYYY-MM-DD+N", start)
		}
		n, err := strconv.Atoi(strings.TrimSpace(count))
		if err != nil {
			return nil, fmt.Errorf("“%s” is not a number of nights; accepted: YYYY-MM-DD+N with N 1..%d", count, store.MaxRunNights)
		}
		return planner.NightsFrom(y, m, d, n)
	}
	return planner.ParseRunNights(s)
}
