package store_test

import (
	"context"
	"testing"
	"time"

	"phasecast/store"
)

// count returns the rows of table (from the raw file).
func count(tb testing.TB, s *store.Store, table string) int {
	tb.Helper()
	var n int
	if err := rawDB(tb, s.Path()).QueryRow("SELECT count(*) FROM " + table).Scan(&n); err != nil {
		tb.Fatal(err)
	}
	return n
}

func TestCascades(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	s, e := w.s, w.editor
	runList, err := s.CreateList(ctx, e, w.team.ID, store.ListInput{Name: "Run list"})
	if err != nil {
		t.Fatal(err)
	}
	rt, err := s.CreateTarget(ctx, e, runList.ID, targetInput("In run", 100, 10))
	if err != nil {
		t.Fatal(err)
	}
	r, err := s.CreateRun(ctx, e, w.team.ID, runInput("R", w.site.ID, runList.ID))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := s.AddTimings(ctx, e, w.target.ID, []store.TimingInput{timingInput()}); err != nil {
		t.Fatal(err)
	}
	if _, err := s.AddObservations(ctx, e, []store.ObservationInput{obsInput(w.target.ID, 0), obsInput(rt.ID, r.ID)}); err != nil {
		t.Fatal(err)
	}
	if _, err := s.SavePlan(ctx, e, r.ID, planInput()); err != nil {
		t.Fatal(err)
	}
	if _, _, err := s.CreateShareLink(ctx, e, store.ShareInput{RunID: r.ID, TTL: time.Hour}); err != nil {
		t.Fatal(err)
	}
	if _, _, err := s.CreateShareLink(ctx, e, store.ShareInput{ListID: w.list.ID, TTL: time.Hour}); err != nil {
		t.Fatal(err)
	}

	t.Run("ListUsedByRunIsKept", func(t *testing.T) {
		err := s.DeleteList(ctx, e, runList.ID, runList.Version)
		wantCode(t, err, store.ECONFLICT)
		err = s.DeleteSite(ctx, e, w.site.ID, w.site.Version)
		wantCode(t, err, store.ECONFLICT)
	})
	t.Run("DeleteTargetTakesItsHistory", func(t *testing.T) {
		if err := s.DeleteTarget(ctx, e, w.target.ID, w.target.Version); err != nil {
			t.Fatal(err)
		}
		for table, want := range map[string]int{"timings": 0, "observations": 1, "ephemerides": 1} {
			if n := count(t, s, table); n != want {
				t.Errorf("%s rows = %d, want %d", table, n, want)
			}
		}
	})
	t.Run("DeleteListTakesItsShareLinks", func(t *testing.T) {
		l, err := s.GetList(ctx, e, w.list.ID)
		if err != nil {
			t.Fatal(err)
		}
		if err := s.DeleteList(ctx, e, l.ID, l.Version); err != nil {
			t.Fatal(err)
		}
		if n := count(t, s, "share_links"); n != 1 {
			t.Errorf("share_links = %d, want 1 (the run's)", n)
		}
	})
	t.Run("DeleteRunKeepsObservations", func(t *testing.T) {
		r, err := s.GetRun(ctx, e, r.ID)
		if err != nil {
			t.Fatal(err)
		}
		if err := s.DeleteRun(ctx, e, r.ID, r.Version); err != nil {
			t.Fatal(err)
		}
		for table, want := range map[string]int{"saved_plans": 0, "share_links": 0, "observations": 1} {
			if n := count(t, s, table); n != want {
				t.Errorf("%s rows = %d, want %d", table, n, want)
			}
		}
		os, err := s.ListObservations(ctx, e, store.ObservationFilter{TargetID: rt.ID})
		if err != nil || len(os) != 1 || os[0].RunID != 0 {
			t.Errorf("observation after its run went: %+v, %v", os, err)
		}
	})
	t.Run("DeleteTeamTakesEverything", func(t *testing.T) {
		if _, err := s.CreateRun(ctx, e, w.team.ID, runInput("R2", w.site.ID, runList.ID)); err != nil {
			t.Fatal(err)
		}
		auditBefore := count(t, s, "audit_log")
		tm, err := s.GetTeam(ctx, w.owner, w.team.ID)
		if err != nil {
			t.Fatal(err)
		}
		if err := s.DeleteTeam(ctx, w.owner, tm.ID, tm.Version); err != nil {
			t.Fatal(err)
		}
		for _, table := range []string{"sites", "target_lists", "targets", "ephemerides", "observations", "runs", "invitations"} {
			if n := count(t, s, table); n != 0 {
				t.Errorf("%s rows = %d after the team went, want 0", table, n)
			}
		}
		if n := count(t, s, "memberships"); n != 1 { // the other team's owner
			t.Errorf("memberships = %d, want 1", n)
		}
		if n := count(t, s, "users"); n != 4 {
			t.Errorf("users = %d, want 4 (people outlive teams)", n)
		}
		if n := count(t, s, "audit_log"); n != auditBefore+1 {
			t.Errorf("audit rows = %d, want %d (kept, plus the deletion)", n, auditBefore+1)
		}
	})
}
