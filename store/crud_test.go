package store_test

import (
	"context"
	"encoding/json"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/store"
)

func TestUsersAndSessions(t *testing.T) {
	ctx := context.Background()
	s, clk := newStore(t)
	u, err := s.CreateUser(ctx, store.NewUser{Email: "ada@example.org", Name: "Ada", Password: "correct horse battery"})
	if err != nil {
		t.Fatal(err)
	}
	if !u.HasPassword || u.Version != 1 {
		t.Errorf("user = %+v", u)
	}
	t.Run("DuplicateEmail", func(t *testing.T) {
		_, err := s.CreateUser(ctx, store.NewUser{Email: "ADA@example.org", Name: "Other"})
		wantCode(t, err, store.ECONFLICT)
	})
	t.Run("BadInput", func(t *testing.T) {
		_, err := s.CreateUser(ctx, store.NewUser{Email: "not-an-email", Name: " ", Password: "short"})
		wantCode(t, err, store.EINVALID)
		var fields []string
		if e := asStoreError(err); e != nil {
			if v, ok := e.Err.(*store.ValidationError); ok {
				for _, f := range v.Fields {
					fields = append(fields, f.Field)
				}
			}
		}
		if strings.Join(fields, ",") != "email,name,password" {
			t.Errorf("fields = %v, want email,name,password", fields)
		}
	})
	t.Run("SignIn", func(t *testing.T) {
		_, _, err := s.SignIn(ctx, "ada@example.org", "wrong password!")
		wantCode(t, err, store.EFORBIDDEN)
		_, _, err = s.SignIn(ctx, "nobody@example.org", "correct horse battery")
		wantCode(t, err, store.EFORBIDDEN)
		got, tok, err := s.SignIn(ctx, "ada@example.org", "correct horse battery")
		if err != nil || got.ID != u.ID || !strings.HasPrefix(tok, "pcs_") {
			t.Fatalf("SignIn = %+v, %q, %v", got, tok, err)
		}
		a, err := s.SessionActor(ctx, tok)
		if err != nil || a.UserID != u.ID || a.Kind != store.ActorUser {
			t.Fatalf("SessionActor = %+v, %v", a, err)
		}
		if err := s.SignOut(ctx, tok); err != nil {
			t.Fatal(err)
		}
		_, err = s.SessionActor(ctx, tok)
		wantCode(t, err, store.EFORBIDDEN)
	})
	t.Run("SessionExpires", func(t *testing.T) {
		_, tok, err := s.SignIn(ctx, "ada@example.org", "correct horse battery")
		if err != nil {
			t.Fatal(err)
		}
		clk.add(31 * 24 * time.Hour)
		_, err = s.SessionActor(ctx, tok)
		wantCode(t, err, store.EFORBIDDEN)
	})
	t.Run("ChangePassword", func(t *testing.T) {
		_, tok1, err := s.SignIn(ctx, "ada@example.org", "correct horse battery")
		if err != nil {
			t.Fatal(err)
		}
		_, tok2, err := s.SignIn(ctx, "ada@example.org", "correct horse battery")
		if err != nil {
			t.Fatal(err)
		}
		a, err := s.SessionActor(ctx, tok1)
		if err != nil {
			t.Fatal(err)
		}
		wantCode(t, s.ChangePassword(ctx, a, "wrong", "a new long passphrase"), store.EFORBIDDEN)
		if err := s.ChangePassword(ctx, a, "correct horse battery", "a new long passphrase"); err != nil {
			t.Fatal(err)
		}
		if _, err := s.SessionActor(ctx, tok1); err != nil {
			t.Errorf("the changing session should stay: %v", err)
		}
		_, err = s.SessionActor(ctx, tok2)
		wantCode(t, err, store.EFORBIDDEN) // other sessions signed out
		if _, _, err := s.SignIn(ctx, "ada@example.org", "a new long passphrase"); err != nil {
			t.Errorf("sign in with the new password: %v", err)
		}
	})
	t.Run("UpdateUser", func(t *testing.T) {
		_, tok, err := s.SignIn(ctx, "ada@example.org", "a new long passphrase")
		if err != nil {
			t.Fatal(err)
		}
		a, err := s.SessionActor(ctx, tok)
		if err != nil {
			t.Fatal(err)
		}
		me, err := s.Me(ctx, a)
		if err != nil {
			t.Fatal(err)
		}
		up, err := s.UpdateUser(ctx, a, me.Version, store.UserUpdate{Email: "ada.l@example.org", Name: "Ada L."})
		if err != nil || up.Name != "Ada L." || up.Version != me.Version+1 {
			t.Fatalf("UpdateUser = %+v, %v", up, err)
		}
		_, err = s.UpdateUser(ctx, a, me.Version, store.UserUpdate{Email: "x@example.org", Name: "X"})
		wantCode(t, err, store.ECONFLICT)
	})
}

func TestSignInLinkIsOneTime(t *testing.T) {
	ctx := context.Background()
	s, clk := newStore(t)
	if _, err := s.CreateUser(ctx, store.NewUser{Email: "b@example.org", Name: "B"}); err != nil {
		t.Fatal(err)
	}
	tok, err := s.CreateSignInLink(ctx, "b@example.org", time.Hour)
	if err != nil {
		t.Fatal(err)
	}
	if _, _, err := s.RedeemSignInLink(ctx, tok); err != nil {
		t.Fatal(err)
	}
	_, _, err = s.RedeemSignInLink(ctx, tok)
	wantCode(t, err, store.EFORBIDDEN)
	tok2, err := s.CreateSignInLink(ctx, "b@example.org", time.Hour)
	if err != nil {
		t.Fatal(err)
	}
	clk.add(61 * time.Minute)
	_, _, err = s.RedeemSignInLink(ctx, tok2)
	wantCode(t, err, store.EFORBIDDEN)
	_, err = s.CreateSignInLink(ctx, "nobody@example.org", time.Hour)
	wantCode(t, err, store.ENOTFOUND)
	_, err = s.CreateSignInLink(ctx, "b@example.org", 8*24*time.Hour)
	wantCode(t, err, store.EINVALID)
}

func TestAPITokens(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	s := w.s
	k, tok, err := s.CreateAPIToken(ctx, w.editor, "laptop", 0)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(tok, "pca_") || k.Name != "laptop" {
		t.Errorf("token %q, %+v", tok, k)
	}
	a, err := s.APITokenActor(ctx, tok)
	if err != nil || a.UserID != w.editor.UserID || a.Via != "api_token" {
		t.Fatalf("APITokenActor = %+v, %v", a, err)
	}
	if _, err := s.GetList(ctx, a, w.list.ID); err != nil {
		t.Errorf("token actor reads the team's list: %v", err)
	}
	ks, err := s.ListAPITokens(ctx, w.editor)
	if err != nil || len(ks) != 1 || ks[0].LastUsedAt.IsZero() {
		t.Errorf("ListAPITokens = %+v, %v", ks, err)
	}
	wantCode(t, s.RevokeAPIToken(ctx, w.viewer, k.ID), store.ENOTFOUND) // not theirs
	if err := s.RevokeAPIToken(ctx, w.editor, k.ID); err != nil {
		t.Fatal(err)
	}
	_, err = s.APITokenActor(ctx, tok)
	wantCode(t, err, store.EFORBIDDEN)
	_, tok2, err := s.CreateAPIToken(ctx, w.editor, "ci", time.Hour)
	if err != nil {
		t.Fatal(err)
	}
	w.clk.add(2 * time.Hour)
	_, err = s.APITokenActor(ctx, tok2)
	wantCode(t, err, store.EFORBIDDEN)
	_, _, err = s.CreateAPIToken(ctx, store.Anonymous(), "x", 0)
	wantCode(t, err, store.EFORBIDDEN)
}

func TestTeamsMembersInvitations(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	s := w.s
	ms, err := s.ListMembers(ctx, w.viewer, w.team.ID)
	if err != nil || len(ms) != 3 {
		t.Fatalf("ListMembers = %d, %v", len(ms), err)
	}
	mine, err := s.MyTeams(ctx, w.editor)
	if err != nil || len(mine) != 1 || mine[0].Role != store.RoleEditor || mine[0].TeamName != "Binary Lab" {
		t.Errorf("MyTeams = %+v, %v", mine, err)
	}
	t.Run("LastOwnerStays", func(t *testing.T) {
		var own store.Membership
		for _, m := range ms {
			if m.Role == store.RoleOwner {
				own = m
			}
		}
		_, err := s.SetMemberRole(ctx, w.owner, w.team.ID, own.UserID, own.Version, store.RoleViewer)
		wantCode(t, err, store.ECONFLICT)
		wantCode(t, s.RemoveMember(ctx, w.owner, w.team.ID, own.UserID), store.ECONFLICT)
	})
	t.Run("MemberMayLeave", func(t *testing.T) {
		a := signIn(t, s, "leaver@example.org", "Leaver")
		invite(t, s, w.owner, w.team.ID, store.RoleViewer, a)
		if err := s.RemoveMember(ctx, a, w.team.ID, a.UserID); err != nil {
			t.Fatal(err)
		}
	})
	t.Run("InvitationOneTime", func(t *testing.T) {
		iv, tok, err := s.CreateInvitation(ctx, w.owner, w.team.ID, store.RoleEditor, time.Hour, "welcome")
		if err != nil {
			t.Fatal(err)
		}
		info, err := s.InvitationByToken(ctx, tok)
		if err != nil || info.TeamName != "Binary Lab" || info.Role != store.RoleEditor || info.ID != iv.ID {
			t.Fatalf("InvitationByToken = %+v, %v", info, err)
		}
		u, m, sess, err := s.AcceptInvitationNewUser(ctx, tok, store.NewUser{Email: "new@example.org", Name: "Newcomer", Password: "a long enough password"})
		if err != nil {
			t.Fatal(err)
		}
		if m.Role != store.RoleEditor || m.UserID != u.ID || sess == "" {
			t.Errorf("membership = %+v", m)
		}
		_, err = s.InvitationByToken(ctx, tok)
		wantCode(t, err, store.EFORBIDDEN)
		_, err = s.AcceptInvitation(ctx, w.other, tok)
		wantCode(t, err, store.EFORBIDDEN)
	})
	t.Run("InvitationExpiresAndRevokes", func(t *testing.T) {
		_, tok, err := s.CreateInvitation(ctx, w.owner, w.team.ID, store.RoleViewer, time.Hour, "")
		if err != nil {
			t.Fatal(err)
		}
		iv2, tok2, err := s.CreateInvitation(ctx, w.owner, w.team.ID, store.RoleViewer, 3*time.Hour, "")
		if err != nil {
			t.Fatal(err)
		}
		if err := s.RevokeInvitation(ctx, w.owner, iv2.ID); err != nil {
			t.Fatal(err)
		}
		_, err = s.AcceptInvitation(ctx, w.other, tok2)
		wantCode(t, err, store.EFORBIDDEN)
		w.clk.add(2 * time.Hour)
		_, err = s.AcceptInvitation(ctx, w.other, tok)
		wantCode(t, err, store.EFORBIDDEN)
	})
	t.Run("AlreadyMember", func(t *testing.T) {
		_, tok, err := s.CreateInvitation(ctx, w.owner, w.team.ID, store.RoleOwner, time.Hour, "")
		if err != nil {
			t.Fatal(err)
		}
		_, err = s.AcceptInvitation(ctx, w.viewer, tok)
		wantCode(t, err, store.ECONFLICT)
	})
	t.Run("GetUserOnlyTeammates", func(t *testing.T) {
		if _, err := s.GetUser(ctx, w.viewer, w.editor.UserID); err != nil {
			t.Errorf("teammate: %v", err)
		}
		_, err := s.GetUser(ctx, w.viewer, w.other.UserID)
		wantCode(t, err, store.ENOTFOUND)
	})
	t.Run("Rename", func(t *testing.T) {
		tm, err := s.RenameTeam(ctx, w.owner, w.team.ID, w.team.Version, "Binary Lab II")
		if err != nil || tm.Name != "Binary Lab II" || tm.Version != 2 {
			t.Errorf("RenameTeam = %+v, %v", tm, err)
		}
	})
}

func TestSitesCRUD(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	s := w.s
	got, err := s.GetSite(ctx, w.viewer, w.site.ID)
	if err != nil {
		t.Fatal(err)
	}
	if got.Site.LatDeg != 31.5 || got.Zone != "America/Phoenix" || len(got.Horizon) != 2 || got.Constraints.MaxAirmass != 2 {
		t.Errorf("site = %+v", got)
	}
	if c := got.PlanConstraints(); len(c.Horizon) != 2 {
		t.Errorf("PlanConstraints horizon = %v", c.Horizon)
	}
	t.Run("Invalid", func(t *testing.T) {
		in := siteInput("Bad")
		in.Site.LatDeg = 95
		in.Zone = "Mars/Olympus"
		in.Horizon = append(in.Horizon, planner.HorizonPoint{AzDeg: 400, AltDeg: 5})
		in.Constraints.MaxAirmass = 0.5
		_, err := s.CreateSite(ctx, w.editor, w.team.ID, in)
		wantCode(t, err, store.EINVALID)
		e := asStoreError(err)
		v, _ := e.Err.(*store.ValidationError)
		if v == nil || len(v.Fields) != 4 {
			t.Fatalf("want 4 bad fields, got %v", err)
		}
		for i, f := range []string{"lat", "zone", "horizon[2].az", "max_airmass"} {
			if v.Fields[i].Field != f {
				t.Errorf("field %d = %s, want %s", i, v.Fields[i].Field, f)
			}
		}
	})
	t.Run("DuplicateName", func(t *testing.T) {
		_, err := s.CreateSite(ctx, w.editor, w.team.ID, siteInput("Test Peak"))
		wantCode(t, err, store.ECONFLICT)
	})
	t.Run("Update", func(t *testing.T) {
		in := siteInput("Test Peak North")
		in.Site.ElevM = 2500
		up, err := s.UpdateSite(ctx, w.editor, w.site.ID, w.site.Version, in)
		if err != nil || up.Name != "Test Peak North" || up.Site.ElevM != 2500 || up.Version != 2 {
			t.Fatalf("UpdateSite = %+v, %v", up, err)
		}
	})
	t.Run("Delete", func(t *testing.T) {
		x, err := s.CreateSite(ctx, w.editor, w.team.ID, siteInput("Spare"))
		if err != nil {
			t.Fatal(err)
		}
		if err := s.DeleteSite(ctx, w.editor, x.ID, x.Version); err != nil {
			t.Fatal(err)
		}
		_, err = s.GetSite(ctx, w.editor, x.ID)
		wantCode(t, err, store.ENOTFOUND)
	})
}

func TestTargetsAndEphemerisHistory(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	s := w.s
	st := w.target
	// Every digit of the typed epoch is kept.
	if st.Ephemeris.T0.Text != "2460000.1234567890123" || st.Ephemeris.T0.Standard != ephem.StdBJDTDB {
		t.Errorf("T0 as given = %+v", st.Ephemeris.T0)
	}
	if got := ephem.FormatEpoch(st.Target.Ephem.T0, ephem.FormJD, 12); got != "2460000.123456789012" {
		t.Errorf("T0 = %s", got)
	}
	if st.Version != 1 || st.Ephemeris.Source != store.SourceEntered || st.TeamID != w.team.ID {
		t.Errorf("target = %+v", st)
	}
	t.Run("ListAndGet", func(t *testing.T) {
		ts, err := s.ListTargets(ctx, w.viewer, w.list.ID)
		if err != nil || len(ts) != 1 || ts[0].ID != st.ID || ts[0].Target.Goals[0].Center != 0.25 {
			t.Fatalf("ListTargets = %+v, %v", ts, err)
		}
		l, err := s.GetList(ctx, w.viewer, w.list.ID)
		if err != nil || l.NTargets != 1 {
			t.Errorf("GetList = %+v, %v", l, err)
		}
	})
	t.Run("HJDEpochConverted", func(t *testing.T) {
		in := targetInput("PCX J0405+2206", 61.46, 22.1)
		var err error
		in.T0, err = store.ParseEpoch("2455940.61233", ephem.StdHJDUTC, ephem.FormJD)
		if err != nil {
			t.Fatal(err)
		}
		x, err := s.CreateTarget(ctx, w.editor, w.list.ID, in)
		if err != nil {
			t.Fatal(err)
		}
		// BJD_TDB − HJD_UTC is TT−UTC (66.184 s in 2012) plus a few
		// seconds of Sun–barycentre offset along the line of sight.
		d := x.Target.Ephem.T0.SubDays(x.Ephemeris.T0.JD) * 86400
		if d < 60 || d > 72 {
			t.Errorf("BJD_TDB − HJD_UTC = %.3f s, want 66 ± 6 s", d)
		}
		t.Logf("BJD_TDB − HJD_UTC = %.3f s", d)
	})
	t.Run("UpdateKeepsOldEphemeris", func(t *testing.T) {
		in := targetInput(st.Target.Name, st.Target.RADeg, st.Target.DecDeg)
		in.Target.Ephem.PeriodDays = 0.12345
		in.EphemNote = "new period from our 2026 data"
		up, err := s.UpdateTarget(ctx, w.editor, st.ID, st.Version, in)
		if err != nil {
			t.Fatal(err)
		}
		if up.Target.Ephem.PeriodDays != 0.12345 || up.Version != 2 || up.Ephemeris.Note != "new period from our 2026 data" {
			t.Errorf("updated = %+v", up)
		}
		// An update that leaves the ephemeris alone adds no record.
		in.Target.Notes = "just a note"
		up2, err := s.UpdateTarget(ctx, w.editor, st.ID, up.Version, in)
		if err != nil {
			t.Fatal(err)
		}
		hist, err := s.ListEphemerides(ctx, w.viewer, st.ID)
		if err != nil {
			t.Fatal(err)
		}
		if len(hist) != 2 || hist[0].Ephem.PeriodDays != 0.12345 || hist[1].Ephem.PeriodDays != 0.1234 || hist[0].ID != up2.Ephemeris.ID {
			t.Errorf("history = %+v", hist)
		}
		if hist[0].CreatedByName != "Eddi Editor" || hist[1].CreatedByName != "Orla Owner" {
			t.Errorf("provenance: %q, %q", hist[0].CreatedByName, hist[1].CreatedByName)
		}
	})
	t.Run("AddFittedEphemeris", func(t *testing.T) {
		cur, err := s.GetTarget(ctx, w.editor, st.ID)
		if err != nil {
			t.Fatal(err)
		}
		tms, err := s.AddTimings(ctx, w.editor, st.ID, []store.TimingInput{timingInput(), timingInput()})
		if err != nil {
			t.Fatal(err)
		}
		e := cur.Target.Ephem
		e.PeriodErr = 1e-9
		up, err := s.AddEphemeris(ctx, w.editor, st.ID, cur.Version, store.EphemerisInput{
			Ephem: e, T0: store.EpochBJD(e.T0), Source: store.SourceFit,
			Fit: &store.FitProvenance{Method: "test fit", TimingIDs: []int64{tms[0].ID, tms[1].ID}, RedChiSq: 1.1},
		})
		if err != nil {
			t.Fatal(err)
		}
		if up.Ephemeris.Source != store.SourceFit || up.Ephemeris.Fit == nil || up.Ephemeris.Fit.RedChiSq != 1.1 || up.Version != cur.Version+1 {
			t.Errorf("fitted = %+v", up.Ephemeris)
		}
		_, err = s.AddEphemeris(ctx, w.editor, st.ID, up.Version, store.EphemerisInput{
			Ephem: e, T0: store.EpochBJD(e.T0), Source: store.SourceFit, Fit: &store.FitProvenance{Method: "x", TimingIDs: []int64{999}},
		})
		wantCode(t, err, store.EINVALID)
	})
	t.Run("Invalid", func(t *testing.T) {
		in := targetInput("", 360, -91)
		in.T0.Standard = ""
		in.Target.Priority = 9
		in.Target.Goals = append(in.Target.Goals, planner.Goal{Event: "periastron", HalfWidth: 0.1, ExposureS: 10})
		_, err := s.CreateTarget(ctx, w.editor, w.list.ID, in)
		wantCode(t, err, store.EINVALID)
		v, _ := asStoreError(err).Err.(*store.ValidationError)
		var fields []string
		for _, f := range v.Fields {
			fields = append(fields, f.Field)
		}
		if strings.Join(fields, ",") != "name,ra,dec,priority,t0_standard" {
			t.Errorf("fields = %v", fields)
		}
		in = targetInput("Circular", 1, 1)
		in.Target.Goals = []planner.Goal{{Event: "periastron", HalfWidth: 0.1, ExposureS: 10}}
		_, err = s.CreateTarget(ctx, w.editor, w.list.ID, in)
		wantCode(t, err, store.EINVALID)
		if !strings.Contains(err.Error(), "goals[0].event") {
			t.Errorf("periastron of a circular orbit: %v", err)
		}
	})
	t.Run("DuplicateName", func(t *testing.T) {
		_, err := s.CreateTarget(ctx, w.editor, w.list.ID, targetInput(st.Target.Name, 50, 50))
		wantCode(t, err, store.ECONFLICT)
	})
	t.Run("Delete", func(t *testing.T) {
		x, err := s.CreateTarget(ctx, w.editor, w.list.ID, targetInput("Gone", 200, 10))
		if err != nil {
			t.Fatal(err)
		}
		if err := s.DeleteTarget(ctx, w.editor, x.ID, x.Version); err != nil {
			t.Fatal(err)
		}
		_, err = s.GetTarget(ctx, w.editor, x.ID)
		wantCode(t, err, store.ENOTFOUND)
	})
}

func TestTimingsCRUD(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	s := w.s
	bad := timingInput()
	bad.ErrDays = 0
	bad.Event = "sunrise"
	_, err := s.AddTimings(ctx, w.editor, w.target.ID, []store.TimingInput{timingInput(), bad})
	wantCode(t, err, store.EINVALID)
	if !strings.Contains(err.Error(), "timings[1].") {
		t.Errorf("error names the row: %v", err)
	}
	if tms, _ := s.ListTimings(ctx, w.editor, w.target.ID); len(tms) != 0 {
		t.Errorf("a rejected batch left %d timings", len(tms))
	}
	tms, err := s.AddTimings(ctx, w.editor, w.target.ID, []store.TimingInput{timingInput()})
	if err != nil {
		t.Fatal(err)
	}
	in := timingInput()
	in.T, err = store.ParseEpoch("60099.623456", ephem.StdBJDTDB, ephem.FormMJD)
	if err != nil {
		t.Fatal(err)
	}
	up, err := s.UpdateTiming(ctx, w.editor, tms[0].ID, tms[0].Version, in)
	if err != nil {
		t.Fatal(err)
	}
	if up.T.Form != ephem.FormMJD || up.BJD != tms[0].BJD || up.Version != 2 {
		t.Errorf("MJD 60099.623456 and JD 2460100.123456 are one instant: %+v vs %+v", up, tms[0])
	}
	if err := s.DeleteTiming(ctx, w.editor, up.ID, up.Version); err != nil {
		t.Fatal(err)
	}
}

func TestRunsPlansObservations(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	s := w.s
	t.Run("BadNights", func(t *testing.T) {
		in := runInput("Bad", w.site.ID, w.list.ID)
		in.Nights = []store.RunNight{{Date: "2026-03-15", Part: store.NightFull}, {Date: "2026-03-14", Part: store.NightFull},
			{Date: "2026-03-14", Part: store.NightFull}, {Date: "2026-02-30", Part: store.NightFull}, {Date: "2026-03-20", Part: "most"}}
		_, err := s.CreateRun(ctx, w.editor, w.team.ID, in)
		wantCode(t, err, store.EINVALID)
		v, _ := asStoreError(err).Err.(*store.ValidationError)
		if v == nil || len(v.Fields) != 4 {
			t.Errorf("want 4 bad nights, got %v", err)
		}
	})
	t.Run("ForeignSite", func(t *testing.T) {
		x, err := s.CreateSite(ctx, w.other, w.otherTeam.ID, siteInput("Theirs"))
		if err != nil {
			t.Fatal(err)
		}
		_, err = s.CreateRun(ctx, w.editor, w.team.ID, runInput("R", x.ID, w.list.ID))
		wantCode(t, err, store.EINVALID)
	})
	r, err := s.CreateRun(ctx, w.editor, w.team.ID, runInput("March", w.site.ID, w.list.ID))
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Nights) != 2 || r.Nights[1].Part != store.NightFirstHalf {
		t.Errorf("run = %+v", r)
	}
	in := runInput("March", w.site.ID, w.list.ID)
	in.Nights = append(in.Nights, store.RunNight{Date: "2026-03-15", Part: store.NightSecondHalf})
	r2, err := s.UpdateRun(ctx, w.editor, r.ID, r.Version, in)
	if err != nil || len(r2.Nights) != 3 {
		t.Fatalf("UpdateRun = %+v, %v", r2, err)
	}
	p, err := s.SavePlan(ctx, w.editor, r.ID, planInput())
	if err != nil {
		t.Fatal(err)
	}
	ps, err := s.ListPlans(ctx, w.viewer, r.ID)
	if err != nil || len(ps) != 1 || ps[0].Output != nil || ps[0].EngineVersion != "test-1" {
		t.Errorf("ListPlans = %+v, %v", ps, err)
	}
	full, err := s.GetPlan(ctx, w.viewer, p.ID)
	if err != nil || string(full.Output) != `{"blocks":[]}` {
		t.Errorf("GetPlan = %+v, %v", full, err)
	}
	_, err = s.SavePlan(ctx, w.editor, r.ID, store.SavedPlanInput{EngineVersion: "x", Inputs: json.RawMessage("{"), Output: json.RawMessage("{}")})
	wantCode(t, err, store.EINVALID)

	start := time.Date(2026, 3, 15, 4, 0, 0, 0, time.UTC)
	obs, err := s.AddObservations(ctx, w.editor, []store.ObservationInput{
		{TargetID: w.target.ID, RunID: r.ID, StartUTC: start, ExposureS: 120, Status: store.ObsDone, Source: store.ObsFromLog},
		{TargetID: w.target.ID, RunID: r.ID, MidUTC: start.Add(5 * time.Minute), ExposureS: 120, Status: store.ObsFailed, Source: store.ObsFromBlock},
	})
	if err != nil {
		t.Fatal(err)
	}
	if !obs[0].MidUTC.Equal(start.Add(time.Minute)) || !obs[0].Start().Equal(start) {
		t.Errorf("start + length: mid = %v", obs[0].MidUTC)
	}
	t.Run("RejectedWhole", func(t *testing.T) {
		_, err := s.AddObservations(ctx, w.editor, []store.ObservationInput{
			{TargetID: w.target.ID, MidUTC: start, Status: store.ObsDone, Source: store.ObsFromLog},
			{TargetID: w.target.ID, MidUTC: start, StartUTC: start, Status: "meh", Source: store.ObsFromLog, ExposureS: -1},
		})
		wantCode(t, err, store.EINVALID)
		v, _ := asStoreError(err).Err.(*store.ValidationError)
		if v == nil || len(v.Fields) != 3 || !strings.HasPrefix(v.Fields[0].Field, "observations[1].") {
			t.Errorf("want 3 bad fields of row 1, got %v", err)
		}
	})
	byRun, err := s.ListObservations(ctx, w.viewer, store.ObservationFilter{RunID: r.ID})
	if err != nil || len(byRun) != 2 {
		t.Fatalf("by run: %d, %v", len(byRun), err)
	}
	byList, err := s.ListObservations(ctx, w.viewer, store.ObservationFilter{ListID: w.list.ID, From: start.Add(3 * time.Minute)})
	if err != nil || len(byList) != 1 || byList[0].Status != store.ObsFailed {
		t.Fatalf("by list from: %+v, %v", byList, err)
	}
	in2 := store.ObservationInput{RunID: r.ID, MidUTC: obs[1].MidUTC, ExposureS: 120, Status: store.ObsDone, Source: store.ObsFromBlock, Note: "recovered"}
	o2, err := s.UpdateObservation(ctx, w.editor, obs[1].ID, obs[1].Version, in2)
	if err != nil || o2.Status != store.ObsDone || o2.Version != 2 {
		t.Errorf("UpdateObservation = %+v, %v", o2, err)
	}
	if err := s.DeleteObservation(ctx, w.editor, o2.ID, o2.Version); err != nil {
		t.Fatal(err)
	}
	if err := s.DeletePlan(ctx, w.editor, p.ID); err != nil {
		t.Fatal(err)
	}
	if err := s.DeleteRun(ctx, w.editor, r2.ID, r2.Version); err != nil {
		t.Fatal(err)
	}
}

func TestListsCRUD(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	s := w.s
	l, err := s.CreateList(ctx, w.editor, w.team.ID, store.ListInput{Name: "Spring", Description: "d"})
	if err != nil {
		t.Fatal(err)
	}
	ls, err := s.ListLists(ctx, w.viewer, w.team.ID)
	if err != nil || len(ls) != 2 || ls[0].Name != "Main" || ls[1].Name != "Spring" {
		t.Fatalf("ListLists = %+v, %v", ls, err)
	}
	_, err = s.CreateList(ctx, w.editor, w.team.ID, store.ListInput{Name: "Spring"})
	wantCode(t, err, store.ECONFLICT)
	up, err := s.UpdateList(ctx, w.editor, l.ID, l.Version, store.ListInput{Name: "Spring 2026"})
	if err != nil || up.Name != "Spring 2026" {
		t.Fatalf("UpdateList = %+v, %v", up, err)
	}
	if err := s.DeleteList(ctx, w.editor, up.ID, up.Version); err != nil {
		t.Fatal(err)
	}
}

// TestSiteTelescope: a site's telescope is stored and read back, removed
// with nil, and a bad one is refused naming the field, value and accepted.
func TestSiteTelescope(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	s := w.s
	tel := planner.Telescope{Mount: planner.MountAltAz, Axis1: planner.Axis{RateDegS: 3, AccelDegS2: 1},
		Axis2: planner.Axis{RateDegS: 2, AccelDegS2: 1}, Dome: planner.Axis{RateDegS: 2, AccelDegS2: 0.5},
		SettleS: 10, AcquireS: 60, WrapMinDeg: -270, WrapMaxDeg: 270}
	in := siteInput("Scope Hill")
	in.Telescope = &tel
	r, err := s.CreateSite(ctx, w.editor, w.team.ID, in)
	if err != nil {
		t.Fatal(err)
	}
	got, err := s.GetSite(ctx, w.viewer, r.ID)
	if err != nil || got.Telescope == nil || *got.Telescope != tel {
		t.Fatalf("telescope read back %+v, %v; want %+v", got.Telescope, err, tel)
	}
	in.Telescope = nil
	up, err := s.UpdateSite(ctx, w.editor, r.ID, r.Version, in)
	if err != nil || up.Telescope != nil {
		t.Fatalf("after removing it: %+v, %v", up.Telescope, err)
	}
	bad := tel
	bad.Mount = "fork"
	in.Telescope = &bad
	_, err = s.UpdateSite(ctx, w.editor, r.ID, up.Version, in)
	wantCode(t, err, store.EINVALID)
	v, _ := asStoreError(err).Err.(*store.ValidationError)
	if v == nil || len(v.Fields) != 1 || v.Fields[0].Field != "telescope.mount" || v.Fields[0].Value != "fork" || !strings.Contains(v.Fields[0].Accepted, "altaz or equatorial") {
		t.Fatalf("bad mount: %v", err)
	}
}
