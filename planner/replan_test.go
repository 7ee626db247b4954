package planner_test

import (
	"errors"
	"fmt"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
)

// replanNight is the README's night (night_targets.csv at the invented
// Cerro Quilla site, 2026-12-01) with every goal wanting n exposures.
func replanNight(tb testing.TB, n int) planner.NightRequest {
	tb.Helper()
	list := targetsFile(tb, "testdata/night_targets.csv", n)
	loc := time.FixedZone("UTC-3", -3*3600)
	from, to := planner.NightWindow(2026, 12, 1, loc)
	return planner.NightRequest{Site: proposeSite, From: from, To: to, Targets: list, Constraints: planner.DefaultConstraints()}
}

// blockExposures are a block's exposures as taken.
func blockExposures(b planner.Block) []planner.Exposure {
	var out []planner.Exposure
	for j := range b.N {
		mid := b.Start.Add(time.Duration((float64(j)*(b.ExposureS+b.OverheadS) + b.ExposureS/2) * 1e9))
		out = append(out, planner.Exposure{Target: b.Target, Mid: mid, ExposureS: b.ExposureS})
	}
	return out
}

func TestReplanNight(t *testing.T) {
	req := replanNight(t, 4)
	full, err := planner.PlanNight(req)
	if err != nil {
		t.Fatal(err)
	}
	if len(full.Blocks) < 3 {
		t.Fatalf("the full night has %d blocks; the test needs 3", len(full.Blocks))
	}
	// The first block was observed in full, the second only half; the
	// night is replanned from the end of the second block's half.
	b0, b1 := full.Blocks[0], full.Blocks[1]
	done := blockExposures(b0)
	half := blockExposures(b1)[:b1.N/2]
	done = append(done, half...)
	start := half[len(half)-1].Mid.Add(time.Duration(b1.ExposureS/2*1e9) + time.Minute)
	rp, err := planner.ReplanNight(req, start, done)
	if err != nil {
		t.Fatal(err)
	}
	for _, b := range rp.Plan.Blocks {
		if acq := b.Start.Add(-time.Duration(b.AcquireS * 1e9)); acq.Before(start) {
			t.Errorf("block %s at %s (acquisition from %s) starts before %s", b.Target, b.Start, acq, start)
		}
	}
	served := map[string]planner.GoalServed{}
	for _, gs := range rp.Served {
		served[fmt.Sprintf("%s/%.4f", gs.Target, gs.Goal.Center)] = gs
		if gs.Remaining != max(gs.Wanted-gs.Done, 0) {
			t.Errorf("%s goal %.3f: done %d of %d, remaining %d", gs.Target, gs.Goal.Center, gs.Done, gs.Wanted, gs.Remaining)
		}
	}
	key := func(b planner.Block) string {
		return fmt.Sprintf("%s/%.4f", b.Target, b.Goal.Center)
	}
	if gs := served[key(b0)]; gs.Done != b0.N || (b0.N >= 4 && gs.Remaining != 0) {
		t.Errorf("the first block's goal: %+v; want %d done", gs, b0.N)
	}
	if gs := served[key(b1)]; gs.Done != len(half) {
		t.Errorf("the second block's goal: %+v; want %d done", gs, len(half))
	}
	for _, b := range rp.Plan.Blocks {
		if b.Filler {
			continue
		}
		gs := served[key(b)]
		if gs.Remaining == 0 {
			t.Errorf("block %s serves a goal already served: %+v", key(b), gs)
		}
		if b.N > gs.Remaining {
			t.Errorf("block %s has %d exposures; its goal wants %d more", key(b), b.N, gs.Remaining)
		}
	}
	// Nothing done: the rest of the night from start is PlanNight's from
	// start.
	rest := req
	rest.From = start
	want, err := planner.PlanNight(rest)
	if err != nil {
		t.Fatal(err)
	}
	got, err := planner.ReplanNight(req, start, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(got.Plan.Blocks) != len(want.Blocks) {
		t.Fatalf("no exposures done: %d blocks, PlanNight from start %d", len(got.Plan.Blocks), len(want.Blocks))
	}
	for i := range want.Blocks {
		if got.Plan.Blocks[i].Start != want.Blocks[i].Start || got.Plan.Blocks[i].Target != want.Blocks[i].Target {
			t.Errorf("block %d differs: %s %s, want %s %s", i, got.Plan.Blocks[i].Target, got.Plan.Blocks[i].Start, want.Blocks[i].Target, want.Blocks[i].Start)
		}
	}
}

func TestReplanNightAsManyAsFit(t *testing.T) {
	req := replanNight(t, 0)
	full, err := planner.PlanNight(req)
	if err != nil || len(full.Blocks) == 0 {
		t.Fatalf("%v, %d blocks", err, len(full.Blocks))
	}
	b0 := full.Blocks[0]
	rp, err := planner.ReplanNight(req, b0.End, blockExposures(b0)[:1])
	if err != nil {
		t.Fatal(err)
	}
	for _, b := range rp.Plan.Blocks {
		if !b.Filler && b.Target == b0.Target && b.Goal.Center == b0.Goal.Center {
			t.Errorf("an as-many-as-fit goal with an exposure is planned again at %s", b.Start)
		}
	}
}

func TestReplanNightBadInput(t *testing.T) {
	req := replanNight(t, 2)
	var ie *ephem.InputError
	if _, err := planner.ReplanNight(req, req.To, nil); !errors.As(err, &ie) || ie.Field != "start" {
		t.Errorf("start at the window's end: %v", err)
	}
	if _, err := planner.ReplanNight(req, req.From.Add(time.Hour), []planner.Exposure{{Target: "Nobody-0", Mid: req.From.Add(time.Hour), ExposureS: 60}}); !errors.As(err, &ie) || ie.Field != "done[0].target" {
		t.Errorf("unknown target: %v", err)
	}
}
