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

// cvNight is scenarioNight's site and night with an invented eclipsing CV
// (P = 110 min) near the meridian, observed by 20 s exposures with 3 s
// readout.
func cvNight(g Goal) NightRequest {
	req := scenarioNight(false)
	rb := req.Targets[0]
	req.Targets = []Target{{
		Name: "CV-1", RADeg: rb.RADeg, DecDeg: -20, Priority: 1, AcquireS: 120,
		Ephem: ephem.Ephemeris{T0: ephem.NewJD2(2461300.5123), PeriodDays: 110.0 / 1440, Convention: ephem.ConvInferiorConjunction},
		Goals: []Goal{g},
	}}
	return req
}

// TestContinuousCoverageOverEclipse: a goal "cover phase 0.96 → 0.04
// without gaps" over the eclipse yields, for every eclipse served, one
// block whose exposures run from before the window opens to after it
// closes with only the readout between them.
func TestContinuousCoverageOverEclipse(t *testing.T) {
	g := Goal{Center: 0, HalfWidth: 0.04, ExposureS: 20, OverheadS: 3, Continuous: true}
	req := cvNight(g)
	p, err := PlanNight(req)
	if err != nil {
		t.Fatal(err)
	}
	if !p.Optimal || len(p.Blocks) == 0 {
		t.Fatalf("%d blocks, optimal %v: the case tests nothing", len(p.Blocks), p.Optimal)
	}
	perCycle := map[int64]int{}
	P := req.Targets[0].Ephem.PeriodDays * 86400
	for _, b := range p.Blocks {
		perCycle[b.Cycle]++
		if got := b.End.Sub(b.Start).Seconds(); math.Abs(got-float64(b.N)*(b.ExposureS+b.OverheadS)) > 1e-6 {
			t.Errorf("block at %s lasts %.3f s for %d exposures: not back to back", b.Start, got, b.N)
		}
		// Phase distance from the window's opening (0.96) to the block's
		// start, and from the last exposure's end to the close (0.04).
		open := math.Mod(b.PhaseStart-(1-g.HalfWidth)+1.5, 1) - 0.5
		lastEnd := b.End.Add(-time.Duration(b.OverheadS * float64(time.Second)))
		_, phEnd, _ := ephem.PhaseAtUTC(req.Site, req.Targets[0].Star(), req.Targets[0].Ephem, lastEnd)
		closeGap := math.Mod(phEnd-g.HalfWidth+1.5, 1) - 0.5
		if open > 1e-6 || closeGap < -1e-6 {
			t.Errorf("block %s–%s (phases %.4f→%.4f) does not span 0.96 → 0.04", b.Start.Format(time.TimeOnly), b.End.Format(time.TimeOnly), b.PhaseStart, phEnd)
		}
		if open < -(b.ExposureS+b.OverheadS+req.Options.StepS+60)/P {
			t.Errorf("block starts %.0f s before the window: more than a step and an exposure", -open*P)
		}
	}
	for c, n := range perCycle {
		if n != 1 {
			t.Errorf("eclipse of cycle %d covered by %d blocks, want one gap-free block", c, n)
		}
	}
	t.Logf("%d eclipses, each in one block of %d exposures", len(perCycle), p.Blocks[0].N)
}

// TestEclipseEventNeedsTheInstant: an eclipse-egress goal gives no credit
// to a block none of whose exposures contains the egress instant.
func TestEclipseEventNeedsTheInstant(t *testing.T) {
	g := Goal{Event: string(ephem.EventEclipseEgress), EclipseDurDays: 600.0 / 86400, HalfWidth: 0.01, ExposureS: 8, OverheadS: 20, NExposures: 1}
	req := cvNight(g)
	goals, err := req.Targets[0].ResolveGoals()
	if err != nil {
		t.Fatal(err)
	}
	if !goals[0].ContainEvent {
		t.Fatal("an eclipse_egress goal does not ask for the instant")
	}
	p, err := PlanNight(req)
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Blocks) == 0 {
		t.Fatal("no block: the case tests nothing")
	}
	for _, b := range p.Blocks {
		first := b.PhaseFirstMid - 0.5*b.Smear
		last := b.PhaseLastMid + 0.5*b.Smear
		if d := math.Mod(goals[0].Center-first+1.5, 1) - 0.5; d < -1e-6 || math.Mod(last-goals[0].Center+1.5, 1)-0.5 < -1e-6 {
			t.Errorf("block %s: exposure %.4f–%.4f misses egress at %.4f", b.Start.Format(time.TimeOnly), first, last, goals[0].Center)
		}
	}
}
