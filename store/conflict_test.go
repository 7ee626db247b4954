package store_test

import (
	"context"
	"testing"

	"phasecast/store"
)

// TestVersionConflicts updates every editable entity twice from the same
// version: the second is ECONFLICT and carries the row as it is now.
func TestVersionConflicts(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	s, e := w.s, w.editor
	r, err := s.CreateRun(ctx, e, w.team.ID, runInput("R", w.site.ID, w.list.ID))
	if err != nil {
		t.Fatal(err)
	}
	tms, err := s.AddTimings(ctx, e, w.target.ID, []store.TimingInput{timingInput()})
	if err != nil {
		t.Fatal(err)
	}
	obs, err := s.AddObservations(ctx, e, []store.ObservationInput{obsInput(w.target.ID, 0)})
	if err != nil {
		t.Fatal(err)
	}
	ms, err := s.ListMembers(ctx, w.owner, w.team.ID)
	if err != nil {
		t.Fatal(err)
	}
	var viewerM store.Membership
	for _, m := range ms {
		if m.UserID == w.viewer.UserID {
			viewerM = m
		}
	}
	tests := []struct {
		name    string
		version int64
		update  func(version int64, n int) (any, error)
		current func(any) int64 // version of the Current row
	}{
		{"team", w.team.Version, func(v int64, n int) (any, error) {
			return s.RenameTeam(ctx, w.owner, w.team.ID, v, w.team.Name+string(rune('A'+n)))
		}, func(x any) int64 { return x.(store.Team).Version }},
		{"member", viewerM.Version, func(v int64, n int) (any, error) {
			role := []store.Role{store.RoleEditor, store.RoleViewer}[n%2]
			return s.SetMemberRole(ctx, w.owner, w.team.ID, w.viewer.UserID, v, role)
		}, func(x any) int64 { return x.(store.Membership).Version }},
		{"site", w.site.Version, func(v int64, n int) (any, error) {
			in := siteInput("Test Peak")
			in.Site.ElevM += float64(n)
			return s.UpdateSite(ctx, e, w.site.ID, v, in)
		}, func(x any) int64 { return x.(store.SiteRecord).Version }},
		{"list", w.list.Version, func(v int64, n int) (any, error) {
			return s.UpdateList(ctx, e, w.list.ID, v, store.ListInput{Name: "Main", Description: string(rune('a' + n))})
		}, func(x any) int64 { return x.(store.TargetList).Version }},
		{"target", w.target.Version, func(v int64, n int) (any, error) {
			in := targetInput(w.target.Target.Name, 10, 20)
			in.Target.Notes = string(rune('a' + n))
			return s.UpdateTarget(ctx, e, w.target.ID, v, in)
		}, func(x any) int64 { return x.(store.StoredTarget).Version }},
		{"timing", tms[0].Version, func(v int64, n int) (any, error) {
			in := timingInput()
			in.Note = string(rune('a' + n))
			return s.UpdateTiming(ctx, e, tms[0].ID, v, in)
		}, func(x any) int64 { return x.(store.Timing).Version }},
		{"run", r.Version, func(v int64, n int) (any, error) {
			in := runInput("R", w.site.ID, w.list.ID)
			in.Notes = string(rune('a' + n))
			return s.UpdateRun(ctx, e, r.ID, v, in)
		}, func(x any) int64 { return x.(store.Run).Version }},
		{"observation", obs[0].Version, func(v int64, n int) (any, error) {
			in := obsInput(w.target.ID, 0)
			in.Note = string(rune('a' + n))
			return s.UpdateObservation(ctx, e, obs[0].ID, v, in)
		}, func(x any) int64 { return x.(store.Observation).Version }},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := tc.update(tc.version, 1); err != nil {
				t.Fatalf("first update: %v", err)
			}
			_, err := tc.update(tc.version, 2)
			wantCode(t, err, store.ECONFLICT)
			e := asStoreError(err)
			if e == nil || e.Current == nil {
				t.Fatalf("conflict carries no current row: %v", err)
			}
			if got := tc.current(e.Current); got != tc.version+1 {
				t.Errorf("current version = %d, want %d", got, tc.version+1)
			}
		})
	}
	t.Run("AddEphemerisStale", func(t *testing.T) {
		_, err := s.AddEphemeris(ctx, e, w.target.ID, w.target.Version, store.EphemerisInput{
			Ephem: w.target.Target.Ephem, T0: w.target.Ephemeris.T0, Source: store.SourceEntered})
		wantCode(t, err, store.ECONFLICT)
	})
	t.Run("DeleteStale", func(t *testing.T) {
		wantCode(t, s.DeleteTarget(ctx, e, w.target.ID, w.target.Version), store.ECONFLICT)
		wantCode(t, s.DeleteSite(ctx, e, w.site.ID, w.site.Version), store.ECONFLICT)
		wantCode(t, s.DeleteTeam(ctx, w.owner, w.team.ID, w.team.Version), store.ECONFLICT)
	})
}
