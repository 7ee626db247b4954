package store_test

import (
	"context"
	"testing"
	"time"

	"phasecast/store"
)

// TestCrossTeamReferences: a member of another team, acting on their own
// team's things, names this team's site, list, target or run inside an
// input (a run's site or list, an observation's target or run, a share
// link's list, a plan's run): every call is refused with ENOTFOUND or
// EINVALID, and nothing of this team is written.
func TestCrossTeamReferences(t *testing.T) {
	ctx := context.Background()
	w := newAuthzWorld(t)
	s, o := w.s, w.other
	site, err := s.CreateSite(ctx, o, w.otherTeam.ID, siteInput("Their Peak"))
	if err != nil {
		t.Fatal(err)
	}
	list, err := s.CreateList(ctx, o, w.otherTeam.ID, store.ListInput{Name: "Theirs"})
	if err != nil {
		t.Fatal(err)
	}
	tg, err := s.CreateTarget(ctx, o, list.ID, targetInput("PCX J0002+0002", 30, 40))
	if err != nil {
		t.Fatal(err)
	}
	run, err := s.CreateRun(ctx, o, w.otherTeam.ID, runInput("Their run", site.ID, list.ID))
	if err != nil {
		t.Fatal(err)
	}
	calls := []struct {
		name string
		do   func() error
	}{
		{"RunOnOurSite", func() error {
			_, err := s.CreateRun(ctx, o, w.otherTeam.ID, runInput("X", w.site.ID, list.ID))
			return err
		}},
		{"RunOnOurList", func() error {
			_, err := s.CreateRun(ctx, o, w.otherTeam.ID, runInput("X", site.ID, w.list.ID))
			return err
		}},
		{"RunMovedToOurSite", func() error {
			_, err := s.UpdateRun(ctx, o, run.ID, run.Version, runInput("Their run", w.site.ID, list.ID))
			return err
		}},
		{"RunInOurTeam", func() error {
			_, err := s.CreateRun(ctx, o, w.team.ID, runInput("X", site.ID, list.ID))
			return err
		}},
		{"ObservationOfOurTarget", func() error {
			_, err := s.AddObservations(ctx, o, []store.ObservationInput{obsInput(w.target.ID, run.ID)})
			return err
		}},
		{"ObservationInOurRun", func() error {
			_, err := s.AddObservations(ctx, o, []store.ObservationInput{obsInput(tg.ID, w.run.ID)})
			return err
		}},
		{"ShareOurList", func() error {
			_, _, err := s.CreateShareLink(ctx, o, store.ShareInput{ListID: w.list.ID, TTL: time.Hour})
			return err
		}},
		{"PlanOfOurRun", func() error {
			_, err := s.SavePlan(ctx, o, w.run.ID, planInput())
			return err
		}},
		{"TimingOfOurTarget", func() error {
			_, err := s.AddTimings(ctx, o, w.target.ID, []store.TimingInput{timingInput()})
			return err
		}},
	}
	for _, c := range calls {
		t.Run(c.name, func(t *testing.T) {
			err := c.do()
			if code := store.ErrorCode(err); code != store.ENOTFOUND && code != store.EINVALID {
				t.Errorf("err = %v, want ENOTFOUND or EINVALID", err)
			}
		})
	}
	runs, err := s.ListRuns(ctx, w.owner, w.team.ID)
	if err != nil || len(runs) != 1 {
		t.Errorf("this team has %d runs (%v), want 1", len(runs), err)
	}
	obs, err := s.ListObservations(ctx, w.owner, store.ObservationFilter{TargetID: w.target.ID})
	if err != nil || len(obs) != 1 {
		t.Errorf("this team's target has %d observations (%v), want 1", len(obs), err)
	}
	plans, err := s.ListPlans(ctx, w.owner, w.run.ID)
	if err != nil || len(plans) != 1 {
		t.Errorf("this team's run has %d plans (%v), want 1", len(plans), err)
	}
	tms, err := s.ListTimings(ctx, w.owner, w.target.ID)
	if err != nil || len(tms) != 1 {
		t.Errorf("this team's target has %d timings (%v), want 1", len(tms), err)
	}
	got, err := s.GetRun(ctx, o, run.ID)
	if err != nil || got.SiteID != site.ID {
		t.Errorf("their run: %+v, %v", got, err)
	}
}
