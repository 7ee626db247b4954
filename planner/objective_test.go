package planner

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
)

// scheduledGoals returns the (target, goal) pairs with a block in p.
func scheduledGoals(p *Plan) map[[2]int]bool {
	out := map[[2]int]bool{}
	for _, b := range p.Blocks {
		if !b.Filler {
			out[[2]int{b.TargetIndex, b.GoalIndex}] = true
		}
	}
	return out
}

// TestPriorityNeverDisplaced is the priority invariant on 200 random
// nights: adding a target of lower priority than a goal's never removes
// that goal from the schedule (same night, site and targets before, so the
// goal's windows are unchanged).
func TestPriorityNeverDisplaced(t *testing.T) {
	r := rand.New(rand.NewPCG(12, 200))
	checked, kept := 0, 0
	for n := range 200 {
		req := randomNight(r, 4)
		extra := randomNight(r, 1).Targets[0]
		extra.Name = "ADDED"
		extra.Priority = 2 + r.IntN(4)
		// Half of the added targets sit where the others are, so that they
		// compete for the same time.
		if r.IntN(2) == 0 {
			other := req.Targets[r.IntN(len(req.Targets))]
			extra.RADeg, extra.DecDeg = other.RADeg, other.DecDeg
		}
		before, err := PlanNight(req)
		if err != nil {
			t.Fatalf("night %d: %v", n, err)
		}
		more := req
		more.Targets = append(append([]Target(nil), req.Targets...), extra)
		after, err := PlanNight(more)
		if err != nil {
			t.Fatalf("night %d with the added target: %v", n, err)
		}
		if !before.Optimal || !after.Optimal {
			t.Fatalf("night %d: not proven optimal", n)
		}
		now := scheduledGoals(after)
		for k := range scheduledGoals(before) {
			if req.Targets[k[0]].Priority >= extra.Priority {
				continue
			}
			checked++
			if !now[k] {
				t.Errorf("night %d: %s (priority %d) goal %d lost its block when a priority-%d target was added",
					n, req.Targets[k[0]].Name, req.Targets[k[0]].Priority, k[1], extra.Priority)
				continue
			}
			kept++
		}
		if after.Objective.Less(before.Objective) {
			t.Errorf("night %d: the objective fell from %v to %v when a target was added", n, before.Objective, after.Objective)
		}
	}
	if checked < 100 {
		t.Fatalf("only %d higher-priority goals scheduled over 200 nights: the invariant was barely exercised", checked)
	}
	t.Logf("200 nights: %d higher-priority goals scheduled, %d kept with the added target", checked, kept)
}

// scenarioNight is an invented 8 m-class site at 30° S on an invented night
// in December, with a priority-1 redback (P = 5.85 h, 900 s spectra + 45 s
// readout, four goals of ±0.03 in phase: 1,264 s windows) and, when dwd is
// set, a priority-2 double white dwarf of P = 9.3 min with 30 s exposures at
// four phases, both near the meridian at midnight.
func scenarioNight(dwd bool) NightRequest {
	site := ephem.Site{LatDeg: -30.1, LonEastDeg: -70.6, ElevM: 2700}
	from, to := NightWindow(2026, 12, 3, time.FixedZone("UTC-3", -3*3600))
	mid := from.Add(to.Sub(from) / 2)
	ra := math.Mod(ephem.GMSTHours(mid)*15+site.LonEastDeg+720, 360)
	req := NightRequest{Site: site, From: from, To: to, Constraints: DefaultConstraints()}
	jd := 2461300.5
	spec := func(c float64, ev string) Goal {
		return Goal{Center: c, Event: ev, HalfWidth: 0.03, ExposureS: 900, OverheadS: 45}
	}
	req.Targets = append(req.Targets, Target{
		Name: "RB-1", RADeg: ra, DecDeg: -25, Priority: 1, AcquireS: 300,
		Ephem: ephem.Ephemeris{T0: ephem.NewJD2(jd), PeriodDays: 5.85 / 24, Convention: ephem.ConvInferiorConjunction},
		Goals: []Goal{spec(0, EventQuadratures), spec(0, "inferior_conjunction"), spec(0, "superior_conjunction")},
	})
	if dwd {
		t := Target{
			Name: "DWD-1", RADeg: math.Mod(ra+8, 360), DecDeg: -33, Priority: 2, AcquireS: 300,
			Ephem: ephem.Ephemeris{T0: ephem.NewJD2(jd + 0.0031), PeriodDays: 9.3 / 1440, Convention: ephem.ConvInferiorConjunction},
		}
		for _, c := range []float64{0, 0.25, 0.5, 0.75} {
			t.Goals = append(t.Goals, Goal{Center: c, HalfWidth: 0.06, ExposureS: 30, OverheadS: 5})
		}
		req.Targets = append(req.Targets, t)
	}
	return req
}

// TestScenarioRedbackKeepsItsGoals: the priority-1 redback gets all four of
// its goals with or without the priority-2 9.3-minute binary, whose many
// windows a night no longer lets outweigh it.
func TestScenarioRedbackKeepsItsGoals(t *testing.T) {
	for _, dwd := range []bool{false, true} {
		t.Run(fmt.Sprintf("DWD%v", dwd), func(t *testing.T) {
			req := scenarioNight(dwd)
			p, err := PlanNight(req)
			if err != nil {
				t.Fatal(err)
			}
			goals, err := req.Targets[0].ResolveGoals()
			if err != nil {
				t.Fatal(err)
			}
			if len(goals) != 4 {
				t.Fatalf("the redback has %d goals, want 4", len(goals))
			}
			got := scheduledGoals(p)
			for gi, g := range goals {
				if !got[[2]int{0, gi}] {
					t.Errorf("redback goal %d (%s, phase %.3f) has no block", gi, g.Event, g.Center)
				}
			}
			dwdBlocks := 0
			for _, b := range p.Blocks {
				if b.TargetIndex == 0 && b.N != 2 {
					t.Errorf("redback block at %s holds %d spectra, want 2 (enough to cover the 1,264 s window once)", b.Start.Format(time.TimeOnly), b.N)
				}
				if b.TargetIndex == 1 {
					dwdBlocks++
				}
			}
			if dwd && dwdBlocks == 0 {
				t.Error("the binary got no block at all: the scenario does not compete")
			}
			t.Logf("%d blocks (%d of the binary), objective %v", len(p.Blocks), dwdBlocks, p.Objective.Value)
		})
	}
}

// TestPlanNightExhaustive: on small random nights (coarse start grid so
// that the candidates stay few), PlanNight's objective equals the best value
// bruteForce finds over the same candidates by exhaustive search.
func TestPlanNightExhaustive(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 12))
	tried := 0
	for n := 0; n < 400 && tried < 40; n++ {
		req := randomNight(r, 3)
		req.Options.StepS = 900
		for i := range req.Targets {
			for k := range req.Targets[i].Goals {
				req.Targets[i].Goals[k].NExposures = 1 + r.IntN(2)
			}
		}
		m, err := newNightModel(req)
		if err != nil {
			t.Fatal(err)
		}
		if len(m.pr.cands) < 3 || len(m.pr.cands) > 28 {
			continue
		}
		tried++
		p, err := PlanNight(req)
		if err != nil {
			t.Fatal(err)
		}
		m.strict = true
		m.setWeights(m.priorityWeights())
		want := bruteForce(t, m.pr).objective()
		if p.Objective != want || !p.Optimal {
			t.Fatalf("night %d (%d candidates): PlanNight %v (optimal %v), exhaustive %v", n, len(m.pr.cands), p.Objective, p.Optimal, want)
		}
	}
	if tried < 20 {
		t.Fatalf("only %d small nights: the check barely ran", tried)
	}
	t.Logf("%d small nights: PlanNight's objective = exhaustive search", tried)
}

// TestShortfallInNumbers: the redback asked for 3 spectra of 900 + 45 s in
// a ±0.03 window of its 5.85-hour orbit (1,264 s) gets 2 per block, and the
// plan says why in numbers: their mid-times would span 1,890 s.
func TestShortfallInNumbers(t *testing.T) {
	req := scenarioNight(false)
	for k := range req.Targets[0].Goals {
		req.Targets[0].Goals[k].NExposures = 3
	}
	p, err := PlanNight(req)
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, w := range p.Warnings {
		if w.Code != WarnShortfall {
			continue
		}
		n++
		for _, want := range []string{"2 of 3 exposures wanted", "span 1,890 s", "the window is 1,264 s", "too short"} {
			if !strings.Contains(w.Message, want) {
				t.Errorf("shortfall %q lacks %q", w.Message, want)
			}
		}
	}
	if n != 4 {
		t.Errorf("%d shortfall warnings, want one per goal (4)", n)
	}
	if got := fmtSeconds(1263.6); got != "1,264" {
		t.Errorf("fmtSeconds(1263.6) = %q, want 1,264", got)
	}
}

// TestCoverageShortfall: a run goal short of its requirement says why in
// numbers, for each of the three causes.
func TestCoverageShortfall(t *testing.T) {
	P := 5.85 / 24
	g := Goal{Center: 0.25, HalfWidth: 0.03, ExposureS: 900, OverheadS: 45, NExposures: 3}
	gc := GoalCoverage{Goal: g, NeedExposures: g.Wanted(P), NeedNights: 2, NightsMet: 1, Status: CoveragePartial}
	tests := []struct {
		name          string
		goal          Goal
		bestCap, full int
		want          []string
	}{
		{"WindowTooShort", g, 2, 0, []string{"3 exposures of 900 s + 45 s readout have mid-times over 1,890 s", "the window is 1,264 s", "at most 2 fit one window"}},
		{"SkyTooShort", Goal{Center: 0.25, HalfWidth: 0.1, ExposureS: 900, OverheadS: 45, NExposures: 3}, 2, 0, []string{"the window is 4,212 s", "at most 2 fit in its observable part"}},
		{"LostToOthers", Goal{Center: 0.25, HalfWidth: 0.1, ExposureS: 900, OverheadS: 45, NExposures: 3}, 4, 3, []string{"1 of the 2 nights wanted hold 3 exposures", "3 nights still to plan could hold them"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c := gc
			c.Goal = tc.goal
			got := coverageShortfall(c, P, tc.bestCap, tc.full)
			for _, w := range tc.want {
				if !strings.Contains(got, w) {
					t.Errorf("%q lacks %q", got, w)
				}
			}
		})
	}
	met := gc
	met.Status = CoverageMet
	if s := coverageShortfall(met, P, 2, 0); s != "" {
		t.Errorf("a met goal has a shortfall: %q", s)
	}
}
