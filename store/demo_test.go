package store_test

import (
	"context"
	"slices"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/store"
)

func TestSeedDemo(t *testing.T) {
	ctx := context.Background()
	// The demo is seeded at the store's own "now", as serve does on first
	// start, so that its one-time link is valid when redeemed.
	s, clk := newStore(t)
	now := clk.now()
	info, err := s.SeedDemo(ctx, now)
	if err != nil {
		t.Fatal(err)
	}
	t.Run("SecondSeedRefused", func(t *testing.T) {
		_, err := s.SeedDemo(ctx, now)
		wantCode(t, err, store.ECONFLICT)
	})
	_, sess, err := s.RedeemSignInLink(ctx, info.SignInToken)
	if err != nil {
		t.Fatalf("printed sign-in link: %v", err)
	}
	owner, err := s.SessionActor(ctx, sess)
	if err != nil || owner.UserID != info.Owner.ID || len(owner.Teams) != 1 || owner.Teams[0].Role != store.RoleOwner {
		t.Fatalf("owner actor = %+v, %v", owner, err)
	}
	ms, err := s.ListMembers(ctx, owner, info.Team.ID)
	if err != nil || len(ms) != 3 {
		t.Fatalf("members = %+v, %v", ms, err)
	}
	ts, err := s.ListTargets(ctx, owner, info.List.ID)
	if err != nil {
		t.Fatal(err)
	}
	if n := len(ts); n < 8 || n > 12 {
		t.Errorf("%d demo targets, want 8 to 12", n)
	}
	site := info.Site.Site
	var minP, maxP = 1e9, 0.0
	kinds := map[string]bool{}
	for _, st := range ts {
		e := st.Target.Ephem
		minP, maxP = min(minP, e.PeriodDays), max(maxP, e.PeriodDays)
		if e.Convention == ephem.ConvAscendingNode {
			kinds["ascending-node"] = true
		}
		if e.Ecc > 0 {
			kinds["eccentric"] = true
		}
		if st.Target.DecDeg > 90-site.LatDeg {
			kinds["circumpolar"] = true
		}
		if st.Ephemeris.T0.Standard == ephem.StdHJDUTC {
			kinds["hjd-epoch"] = true
		}
		for _, g := range st.Target.Goals {
			if g.EclipseDurDays > 0 {
				kinds["eclipse-duration"] = true
			}
		}
		if e.PhaseErr(ephem.JDTDB(now)) > 0.1 {
			kinds["drifted"] = true
		}
		if _, err := st.Target.ResolveGoals(); err != nil {
			t.Errorf("%s: goals do not resolve: %v", st.Target.Name, err)
		}
	}
	for _, k := range []string{"ascending-node", "eccentric", "circumpolar", "hjd-epoch", "eclipse-duration", "drifted"} {
		if !kinds[k] {
			t.Errorf("no demo target is %s", k)
		}
	}
	if minP > 15.0/1440 || maxP < 0.5 {
		t.Errorf("periods %.4f..%.4f d; want from about 10 minutes to about a day", minP, maxP)
	}
	t.Logf("periods %.1f min to %.1f h", minP*1440, maxP*24)

	// Several targets are up (altitude > 30°) at local midnight on any
	// night of the year.
	loc, err := time.LoadLocation(info.Site.Zone)
	if err != nil {
		t.Fatal(err)
	}
	fewest := len(ts)
	for m := time.January; m <= time.December; m++ {
		midnight := time.Date(2026, m, 16, 0, 0, 0, 0, loc)
		up := 0
		for _, st := range ts {
			if ephem.Observe(site, st.Target.Star(), midnight).AltDeg > 30 {
				up++
			}
		}
		fewest = min(fewest, up)
		if up < 3 {
			t.Errorf("%s: only %d demo targets above 30° at local midnight", m, up)
		}
	}
	t.Logf("at least %d targets above 30° at local midnight in every month", fewest)

	// Timings and the refined ephemeris with its provenance.
	first := ts[slices.IndexFunc(ts, func(st store.StoredTarget) bool { return st.ID == info.Targets[0].ID })]
	tms, err := s.ListTimings(ctx, owner, first.ID)
	if err != nil || len(tms) != 8 {
		t.Fatalf("timings = %d, %v", len(tms), err)
	}
	hist, err := s.ListEphemerides(ctx, owner, first.ID)
	if err != nil || len(hist) != 2 || hist[0].Source != store.SourceFit || hist[0].Fit == nil || len(hist[0].Fit.TimingIDs) != 8 {
		t.Fatalf("history = %+v, %v", hist, err)
	}
	if d := (hist[0].Ephem.PeriodDays - 0.13521734) * 86400; d*d > 0.01*0.01 {
		t.Errorf("fitted period off the invented truth by %.4f s", d)
	}
	if hist[0].Ephem.PeriodErr >= hist[1].Ephem.PeriodErr {
		t.Errorf("the fit did not tighten σP: %g vs %g", hist[0].Ephem.PeriodErr, hist[1].Ephem.PeriodErr)
	}

	// The run covers the night before now and the next ones; exposures
	// were taken on its first night.
	r := info.Run
	local := now.In(loc)
	if want := local.AddDate(0, 0, -1).Format("2006-01-02"); len(r.Nights) != 4 || r.Nights[0].Date != want {
		t.Errorf("run nights = %+v", r.Nights)
	}
	obs, err := s.ListObservations(ctx, owner, store.ObservationFilter{RunID: r.ID})
	if err != nil || len(obs) == 0 {
		t.Fatalf("observations = %d, %v", len(obs), err)
	}
	failed := 0
	for _, o := range obs {
		if o.Status == store.ObsFailed {
			failed++
		}
		if o.MidUTC.After(now) {
			t.Errorf("observation at %v is after now", o.MidUTC)
		}
	}
	if failed == 0 || failed == len(obs) {
		t.Errorf("%d of %d observations failed; want some of each", failed, len(obs))
	}
}
