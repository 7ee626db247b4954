package store_test

import (
	"context"
	"encoding/json"
	"fmt"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/store"
)

// TestCan checks the policy table entry by entry: what each role may do.
func TestCan(t *testing.T) {
	// For each entity, the roles allowed each action, in the order
	// read, create, update, delete; letters: o owner, e editor, v viewer,
	// s share link. Written out by hand from the rules in policy.go's doc.
	want := map[store.Entity][4]string{
		store.EntTeam:        {"oev", "", "o", "o"},
		store.EntMember:      {"oev", "o", "o", "o"},
		store.EntInvitation:  {"o", "o", "", "o"},
		store.EntSite:        {"oevs", "oe", "oe", "oe"},
		store.EntList:        {"oevs", "oe", "oe", "oe"},
		store.EntTarget:      {"oevs", "oe", "oe", "oe"},
		store.EntEphemeris:   {"oevs", "oe", "", ""},
		store.EntTiming:      {"oevs", "oe", "oe", "oe"},
		store.EntRun:         {"oevs", "oe", "oe", "oe"},
		store.EntPlan:        {"oevs", "oe", "", "oe"},
		store.EntObservation: {"oevs", "oe", "oe", "oe"},
		store.EntShareLink:   {"oe", "oe", "", "oe"},
		store.EntAudit:       {"oev", "", "", ""},
	}
	roles := map[byte]store.Role{'o': store.RoleOwner, 'e': store.RoleEditor, 'v': store.RoleViewer, 's': store.RoleShare}
	for _, ent := range store.Entities {
		w, ok := want[ent]
		if !ok {
			t.Errorf("entity %s has no expectation", ent)
			continue
		}
		for i, act := range store.Actions {
			for _, letter := range []byte("oevs") {
				role := roles[letter]
				t.Run(fmt.Sprintf("%s/%s/%s", ent, act, role), func(t *testing.T) {
					got := store.Can(role, act, ent)
					exp := strings.IndexByte(w[i], letter) >= 0
					if got != exp {
						t.Errorf("Can(%s, %s, %s) = %v, want %v", role, act, ent, got, exp)
					}
				})
			}
			if store.Can(store.RoleNone, act, ent) {
				t.Errorf("Can(none, %s, %s) = true", act, ent)
			}
		}
	}
}

// authzWorld extends world with a run on a second list, a share link to
// the main list, a share link to the run, and a few rows to act on.
type authzWorld struct {
	*world
	runList   store.TargetList
	run       store.Run
	timing    store.Timing
	obs       store.Observation
	plan      store.SavedPlan
	shareList store.Actor
	shareRun  store.Actor
	seq       atomic.Int64
}

func newAuthzWorld(t *testing.T) *authzWorld {
	t.Helper()
	ctx := context.Background()
	w := &authzWorld{world: newWorld(t)}
	s, o := w.s, w.owner
	var err error
	if w.runList, err = s.CreateList(ctx, o, w.team.ID, store.ListInput{Name: "Run list"}); err != nil {
		t.Fatal(err)
	}
	if w.run, err = s.CreateRun(ctx, o, w.team.ID, runInput("Run A", w.site.ID, w.runList.ID)); err != nil {
		t.Fatal(err)
	}
	tms, err := s.AddTimings(ctx, o, w.target.ID, []store.TimingInput{timingInput()})
	if err != nil {
		t.Fatal(err)
	}
	w.timing = tms[0]
	obs, err := s.AddObservations(ctx, o, []store.ObservationInput{obsInput(w.target.ID, 0)})
	if err != nil {
		t.Fatal(err)
	}
	w.obs = obs[0]
	if w.plan, err = s.SavePlan(ctx, o, w.run.ID, planInput()); err != nil {
		t.Fatal(err)
	}
	_, tokL, err := s.CreateShareLink(ctx, o, store.ShareInput{ListID: w.list.ID, TTL: time.Hour})
	if err != nil {
		t.Fatal(err)
	}
	if w.shareList, err = s.ShareActor(ctx, tokL); err != nil {
		t.Fatal(err)
	}
	_, tokR, err := s.CreateShareLink(ctx, o, store.ShareInput{RunID: w.run.ID, TTL: time.Hour})
	if err != nil {
		t.Fatal(err)
	}
	if w.shareRun, err = s.ShareActor(ctx, tokR); err != nil {
		t.Fatal(err)
	}
	return w
}

func runInput(name string, siteID, listID int64) store.RunInput {
	return store.RunInput{Name: name, SiteID: siteID, ListID: listID,
		Nights:      []store.RunNight{{Date: "2026-03-14", Part: store.NightFull}, {Date: "2026-03-15", Part: store.NightFirstHalf}},
		Constraints: siteInput("x").Constraints}
}

func timingInput() store.TimingInput {
	e, err := store.ParseEpoch("2460100.123456", ephem.StdBJDTDB, ephem.FormJD)
	if err != nil {
		panic(err)
	}
	return store.TimingInput{T: e, ErrDays: 0.0001, Observer: "test"}
}

func obsInput(targetID, runID int64) store.ObservationInput {
	return store.ObservationInput{TargetID: targetID, RunID: runID, MidUTC: time.Date(2026, 3, 14, 5, 0, 0, 0, time.UTC),
		ExposureS: 120, Status: store.ObsDone, Source: store.ObsFromManual}
}

func planInput() store.SavedPlanInput {
	return store.SavedPlanInput{Name: "p", EngineVersion: "test-1", Inputs: json.RawMessage(`{"a":1}`), Output: json.RawMessage(`{"blocks":[]}`)}
}

func (w *authzWorld) name(prefix string) string { return fmt.Sprintf("%s %d", prefix, w.seq.Add(1)) }

// TestAuthorizationMatrix runs every entity × action through the real
// store methods as every kind of caller: owner, editor, viewer, a member of
// another team, anonymous, a share link to the main list, a share link to
// a run (on another list). Expected: y allowed, n ENOTFOUND (cannot see it),
// f EFORBIDDEN (can see it, may not do this).
func TestAuthorizationMatrix(t *testing.T) {
	ctx := context.Background()
	w := newAuthzWorld(t)
	s, o := w.s, w.owner
	actors := []struct {
		name string
		a    store.Actor
	}{
		{"owner", w.owner}, {"editor", w.editor}, {"viewer", w.viewer}, {"other-team", w.other},
		{"anonymous", store.Anonymous()}, {"share-list", w.shareList}, {"share-run", w.shareRun},
	}
	must := func(t *testing.T, err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	cur := func(t *testing.T, id int64) store.StoredTarget {
		st, err := s.GetTarget(ctx, o, id)
		must(t, err)
		return st
	}
	freshMember := func(t *testing.T) store.Actor {
		a := signIn(t, s, fmt.Sprintf("m%d@example.org", w.seq.Add(1)), "Member")
		invite(t, s, o, w.team.ID, store.RoleViewer, a)
		return a
	}
	freshTeam := func(t *testing.T) store.Team {
		tm, err := s.CreateTeam(ctx, o, w.name("Team"))
		must(t, err)
		invite(t, s, o, tm.ID, store.RoleEditor, w.editor)
		invite(t, s, o, tm.ID, store.RoleViewer, w.viewer)
		return tm
	}
	ops := []struct {
		entity store.Entity
		action store.Action
		want   string // owner editor viewer other anon share-list share-run
		do     func(t *testing.T, a store.Actor) error
	}{
		{store.EntTeam, store.ActRead, "yyynnnn", func(t *testing.T, a store.Actor) error { _, err := s.GetTeam(ctx, a, w.team.ID); return err }},
		{store.EntTeam, store.ActUpdate, "yffnnnn", func(t *testing.T, a store.Actor) error {
			tm, err := s.GetTeam(ctx, o, w.team.ID)
			must(t, err)
			_, err = s.RenameTeam(ctx, a, tm.ID, tm.Version, w.name("Binary Lab"))
			return err
		}},
		{store.EntTeam, store.ActDelete, "yffnnnn", func(t *testing.T, a store.Actor) error {
			tm := freshTeam(t)
			return s.DeleteTeam(ctx, a, tm.ID, tm.Version)
		}},
		{store.EntMember, store.ActRead, "yyynnnn", func(t *testing.T, a store.Actor) error { _, err := s.ListMembers(ctx, a, w.team.ID); return err }},
		{store.EntMember, store.ActUpdate, "yffnnnn", func(t *testing.T, a store.Actor) error {
			m := freshMember(t)
			ms, err := s.ListMembers(ctx, o, w.team.ID)
			must(t, err)
			for _, x := range ms {
				if x.UserID == m.UserID {
					_, err = s.SetMemberRole(ctx, a, w.team.ID, x.UserID, x.Version, store.RoleEditor)
					return err
				}
			}
			t.Fatal("fresh member not listed")
			return nil
		}},
		{store.EntMember, store.ActDelete, "yffnnnn", func(t *testing.T, a store.Actor) error {
			m := freshMember(t)
			return s.RemoveMember(ctx, a, w.team.ID, m.UserID)
		}},
		{store.EntInvitation, store.ActRead, "yffnnnn", func(t *testing.T, a store.Actor) error { _, err := s.ListInvitations(ctx, a, w.team.ID); return err }},
		{store.EntInvitation, store.ActCreate, "yffnnnn", func(t *testing.T, a store.Actor) error {
			_, _, err := s.CreateInvitation(ctx, a, w.team.ID, store.RoleViewer, time.Hour, "")
			return err
		}},
		{store.EntInvitation, store.ActDelete, "yffnnnn", func(t *testing.T, a store.Actor) error {
			iv, _, err := s.CreateInvitation(ctx, o, w.team.ID, store.RoleViewer, time.Hour, "")
			must(t, err)
			return s.RevokeInvitation(ctx, a, iv.ID)
		}},
		{store.EntSite, store.ActRead, "yyynnny", func(t *testing.T, a store.Actor) error { _, err := s.GetSite(ctx, a, w.site.ID); return err }},
		{store.EntSite, store.ActCreate, "yyfnnnn", func(t *testing.T, a store.Actor) error {
			_, err := s.CreateSite(ctx, a, w.team.ID, siteInput(w.name("Site")))
			return err
		}},
		{store.EntSite, store.ActUpdate, "yyfnnnf", func(t *testing.T, a store.Actor) error {
			cur, err := s.GetSite(ctx, o, w.site.ID)
			must(t, err)
			in := siteInput(cur.Name)
			in.Notes = w.name("note")
			_, err = s.UpdateSite(ctx, a, cur.ID, cur.Version, in)
			return err
		}},
		{store.EntSite, store.ActDelete, "yyfnnnn", func(t *testing.T, a store.Actor) error {
			x, err := s.CreateSite(ctx, o, w.team.ID, siteInput(w.name("Site")))
			must(t, err)
			return s.DeleteSite(ctx, a, x.ID, x.Version)
		}},
		{store.EntList, store.ActRead, "yyynnyn", func(t *testing.T, a store.Actor) error { _, err := s.GetList(ctx, a, w.list.ID); return err }},
		{store.EntList, store.ActCreate, "yyfnnnn", func(t *testing.T, a store.Actor) error {
			_, err := s.CreateList(ctx, a, w.team.ID, store.ListInput{Name: w.name("List")})
			return err
		}},
		{store.EntList, store.ActUpdate, "yyfnnfn", func(t *testing.T, a store.Actor) error {
			l, err := s.GetList(ctx, o, w.list.ID)
			must(t, err)
			_, err = s.UpdateList(ctx, a, l.ID, l.Version, store.ListInput{Name: l.Name, Description: w.name("d")})
			return err
		}},
		{store.EntList, store.ActDelete, "yyfnnnn", func(t *testing.T, a store.Actor) error {
			l, err := s.CreateList(ctx, o, w.team.ID, store.ListInput{Name: w.name("List")})
			must(t, err)
			return s.DeleteList(ctx, a, l.ID, l.Version)
		}},
		{store.EntTarget, store.ActRead, "yyynnyn", func(t *testing.T, a store.Actor) error { _, err := s.GetTarget(ctx, a, w.target.ID); return err }},
		{store.EntTarget, store.ActCreate, "yyfnnfn", func(t *testing.T, a store.Actor) error {
			_, err := s.CreateTarget(ctx, a, w.list.ID, targetInput(w.name("T"), float64(w.seq.Add(1)), 10))
			return err
		}},
		{store.EntTarget, store.ActUpdate, "yyfnnfn", func(t *testing.T, a store.Actor) error {
			st := cur(t, w.target.ID)
			in := targetInput(st.Target.Name, st.Target.RADeg, st.Target.DecDeg)
			in.Target.Notes = w.name("n")
			_, err := s.UpdateTarget(ctx, a, st.ID, st.Version, in)
			return err
		}},
		{store.EntTarget, store.ActDelete, "yyfnnfn", func(t *testing.T, a store.Actor) error {
			st, err := s.CreateTarget(ctx, o, w.list.ID, targetInput(w.name("T"), float64(w.seq.Add(1)), -10))
			must(t, err)
			return s.DeleteTarget(ctx, a, st.ID, st.Version)
		}},
		{store.EntEphemeris, store.ActRead, "yyynnyn", func(t *testing.T, a store.Actor) error { _, err := s.ListEphemerides(ctx, a, w.target.ID); return err }},
		{store.EntEphemeris, store.ActCreate, "yyfnnfn", func(t *testing.T, a store.Actor) error {
			st := cur(t, w.target.ID)
			e := st.Target.Ephem
			e.PeriodErr *= 0.5
			_, err := s.AddEphemeris(ctx, a, st.ID, st.Version, store.EphemerisInput{Ephem: e, T0: st.Ephemeris.T0, Source: store.SourceEntered})
			return err
		}},
		{store.EntTiming, store.ActRead, "yyynnyn", func(t *testing.T, a store.Actor) error { _, err := s.ListTimings(ctx, a, w.target.ID); return err }},
		{store.EntTiming, store.ActCreate, "yyfnnfn", func(t *testing.T, a store.Actor) error {
			_, err := s.AddTimings(ctx, a, w.target.ID, []store.TimingInput{timingInput()})
			return err
		}},
		{store.EntTiming, store.ActUpdate, "yyfnnfn", func(t *testing.T, a store.Actor) error {
			tms, err := s.ListTimings(ctx, o, w.target.ID)
			must(t, err)
			in := timingInput()
			in.Note = w.name("n")
			_, err = s.UpdateTiming(ctx, a, tms[0].ID, tms[0].Version, in)
			return err
		}},
		{store.EntTiming, store.ActDelete, "yyfnnfn", func(t *testing.T, a store.Actor) error {
			tms, err := s.AddTimings(ctx, o, w.target.ID, []store.TimingInput{timingInput()})
			must(t, err)
			return s.DeleteTiming(ctx, a, tms[0].ID, tms[0].Version)
		}},
		{store.EntRun, store.ActRead, "yyynnny", func(t *testing.T, a store.Actor) error { _, err := s.GetRun(ctx, a, w.run.ID); return err }},
		{store.EntRun, store.ActCreate, "yyfnnnn", func(t *testing.T, a store.Actor) error {
			_, err := s.CreateRun(ctx, a, w.team.ID, runInput(w.name("Run"), w.site.ID, w.runList.ID))
			return err
		}},
		{store.EntRun, store.ActUpdate, "yyfnnnf", func(t *testing.T, a store.Actor) error {
			r, err := s.GetRun(ctx, o, w.run.ID)
			must(t, err)
			in := runInput(r.Name, r.SiteID, r.ListID)
			in.Notes = w.name("n")
			_, err = s.UpdateRun(ctx, a, r.ID, r.Version, in)
			return err
		}},
		{store.EntRun, store.ActDelete, "yyfnnnn", func(t *testing.T, a store.Actor) error {
			r, err := s.CreateRun(ctx, o, w.team.ID, runInput(w.name("Run"), w.site.ID, w.runList.ID))
			must(t, err)
			return s.DeleteRun(ctx, a, r.ID, r.Version)
		}},
		{store.EntPlan, store.ActRead, "yyynnny", func(t *testing.T, a store.Actor) error { _, err := s.GetPlan(ctx, a, w.plan.ID); return err }},
		{store.EntPlan, store.ActCreate, "yyfnnnf", func(t *testing.T, a store.Actor) error {
			_, err := s.SavePlan(ctx, a, w.run.ID, planInput())
			return err
		}},
		{store.EntPlan, store.ActDelete, "yyfnnnf", func(t *testing.T, a store.Actor) error {
			p, err := s.SavePlan(ctx, o, w.run.ID, planInput())
			must(t, err)
			return s.DeletePlan(ctx, a, p.ID)
		}},
		{store.EntObservation, store.ActRead, "yyynnyn", func(t *testing.T, a store.Actor) error {
			_, err := s.ListObservations(ctx, a, store.ObservationFilter{TargetID: w.target.ID})
			return err
		}},
		{store.EntObservation, store.ActCreate, "yyfnnfn", func(t *testing.T, a store.Actor) error {
			_, err := s.AddObservations(ctx, a, []store.ObservationInput{obsInput(w.target.ID, 0)})
			return err
		}},
		{store.EntObservation, store.ActUpdate, "yyfnnfn", func(t *testing.T, a store.Actor) error {
			os, err := s.ListObservations(ctx, o, store.ObservationFilter{TargetID: w.target.ID})
			must(t, err)
			in := obsInput(w.target.ID, 0)
			in.Note = w.name("n")
			_, err = s.UpdateObservation(ctx, a, os[0].ID, os[0].Version, in)
			return err
		}},
		{store.EntObservation, store.ActDelete, "yyfnnfn", func(t *testing.T, a store.Actor) error {
			os, err := s.AddObservations(ctx, o, []store.ObservationInput{obsInput(w.target.ID, 0)})
			must(t, err)
			return s.DeleteObservation(ctx, a, os[0].ID, os[0].Version)
		}},
		{store.EntShareLink, store.ActRead, "yyfnnnn", func(t *testing.T, a store.Actor) error { _, err := s.ListShareLinks(ctx, a, w.team.ID); return err }},
		{store.EntShareLink, store.ActCreate, "yyfnnnn", func(t *testing.T, a store.Actor) error {
			_, _, err := s.CreateShareLink(ctx, a, store.ShareInput{ListID: w.list.ID, TTL: time.Hour})
			return err
		}},
		{store.EntShareLink, store.ActDelete, "yyfnnnn", func(t *testing.T, a store.Actor) error {
			l, _, err := s.CreateShareLink(ctx, o, store.ShareInput{RunID: w.run.ID, TTL: time.Hour})
			must(t, err)
			return s.RevokeShareLink(ctx, a, l.ID)
		}},
		{store.EntAudit, store.ActRead, "yyynnnn", func(t *testing.T, a store.Actor) error {
			_, err := s.ListAudit(ctx, a, w.team.ID, store.AuditQuery{})
			return err
		}},
	}
	covered := map[string]bool{}
	for _, op := range ops {
		covered[string(op.entity)+"/"+string(op.action)] = true
		for i, ac := range actors {
			t.Run(fmt.Sprintf("%s/%s/%s", op.entity, op.action, ac.name), func(t *testing.T) {
				err := op.do(t, ac.a)
				switch op.want[i] {
				case 'y':
					if err != nil {
						t.Fatalf("want allowed, got %v", err)
					}
				case 'n':
					wantCode(t, err, store.ENOTFOUND)
				case 'f':
					wantCode(t, err, store.EFORBIDDEN)
				}
			})
		}
	}
	// Every action the policy grants to someone is exercised above.
	for _, ent := range store.Entities {
		for _, act := range store.Actions {
			granted := store.Can(store.RoleOwner, act, ent) || store.Can(store.RoleShare, act, ent)
			if granted && !covered[string(ent)+"/"+string(act)] && !(ent == store.EntMember && act == store.ActCreate) {
				t.Errorf("%s/%s is granted but not in the matrix", ent, act)
			}
		}
	}
}

// TestTeamWideListsAreScoped checks the listings that span a team: members
// see all, share links only what they show, others nothing.
func TestTeamWideListsAreScoped(t *testing.T) {
	ctx := context.Background()
	w := newAuthzWorld(t)
	s := w.s
	tests := []struct {
		name               string
		a                  store.Actor
		lists, sites, runs int
		code               string
	}{
		{"viewer", w.viewer, 2, 1, 1, ""},
		{"share-list", w.shareList, 1, 0, 0, ""},
		{"share-run", w.shareRun, 1, 1, 1, ""}, // the run, its site and its list
		{"other-team", w.other, 0, 0, 0, store.ENOTFOUND},
		{"anonymous", store.Anonymous(), 0, 0, 0, store.ENOTFOUND},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			ls, err := s.ListLists(ctx, tc.a, w.team.ID)
			if tc.code != "" {
				wantCode(t, err, tc.code)
				_, err = s.ListSites(ctx, tc.a, w.team.ID)
				wantCode(t, err, tc.code)
				_, err = s.ListRuns(ctx, tc.a, w.team.ID)
				wantCode(t, err, tc.code)
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			ss, err := s.ListSites(ctx, tc.a, w.team.ID)
			if err != nil {
				t.Fatal(err)
			}
			rs, err := s.ListRuns(ctx, tc.a, w.team.ID)
			if err != nil {
				t.Fatal(err)
			}
			if len(ls) != tc.lists || len(ss) != tc.sites || len(rs) != tc.runs {
				t.Errorf("lists, sites, runs = %d, %d, %d; want %d, %d, %d", len(ls), len(ss), len(rs), tc.lists, tc.sites, tc.runs)
			}
		})
	}
	t.Run("ShareRunSeesRunListTargets", func(t *testing.T) {
		if _, err := s.ListTargets(ctx, w.shareRun, w.runList.ID); err != nil {
			t.Errorf("share-run reading the run's list: %v", err)
		}
		_, err := s.ListTargets(ctx, w.shareRun, w.list.ID)
		wantCode(t, err, store.ENOTFOUND)
	})
}

// TestShareLinkRevokedAndExpired checks that a share actor loses access the
// moment its link is revoked or expires, even with an actor made before.
func TestShareLinkRevokedAndExpired(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	s := w.s
	l, tok, err := s.CreateShareLink(ctx, w.editor, store.ShareInput{ListID: w.list.ID, TTL: time.Hour, Label: "for the referee"})
	if err != nil {
		t.Fatal(err)
	}
	a, err := s.ShareActor(ctx, tok)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := s.GetList(ctx, a, w.list.ID); err != nil {
		t.Fatalf("live link: %v", err)
	}
	w.clk.add(2 * time.Hour)
	_, err = s.GetList(ctx, a, w.list.ID)
	wantCode(t, err, store.ENOTFOUND)
	_, err = s.ShareActor(ctx, tok)
	wantCode(t, err, store.EFORBIDDEN)

	l2, tok2, err := s.CreateShareLink(ctx, w.editor, store.ShareInput{ListID: w.list.ID, TTL: time.Hour})
	if err != nil {
		t.Fatal(err)
	}
	a2, err := s.ShareActor(ctx, tok2)
	if err != nil {
		t.Fatal(err)
	}
	if err := s.RevokeShareLink(ctx, w.owner, l2.ID); err != nil {
		t.Fatal(err)
	}
	_, err = s.GetList(ctx, a2, w.list.ID)
	wantCode(t, err, store.ENOTFOUND)
	_, err = s.ShareActor(ctx, tok2)
	wantCode(t, err, store.EFORBIDDEN)
	if l.Label != "for the referee" || l.ExpiresAt.Sub(l.CreatedAt) != time.Hour {
		t.Errorf("link = %+v", l)
	}
}

// TestRemovedMemberLosesAccess: membership is read in every transaction,
// so an actor made before removal is refused after it.
func TestRemovedMemberLosesAccess(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	if err := w.s.RemoveMember(ctx, w.owner, w.team.ID, w.viewer.UserID); err != nil {
		t.Fatal(err)
	}
	_, err := w.s.GetList(ctx, w.viewer, w.list.ID)
	wantCode(t, err, store.ENOTFOUND)
}

func TestCreateTeamNeedsUser(t *testing.T) {
	ctx := context.Background()
	w := newAuthzWorld(t)
	for _, a := range []store.Actor{store.Anonymous(), w.shareList} {
		_, err := w.s.CreateTeam(ctx, a, "x")
		wantCode(t, err, store.EFORBIDDEN)
	}
	if _, err := w.s.CreateTeam(ctx, w.viewer, "Viewer's own team"); err != nil {
		t.Errorf("a viewer elsewhere may still make a team: %v", err)
	}
}
