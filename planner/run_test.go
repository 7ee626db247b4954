package planner_test

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
)

// runScenario is an invented run: a site at 30° S in its autumn, nights
// nights from 2026-04-14 (the second and fourth, when present, held as
// halves), n targets up in the evening-to-morning sky with periods of 1.5 h
// to 2.5 days, both quadratures (N of 1..4 exposures on 1..2 nights) and
// sometimes a conjunction goal (as many as fit), priorities 1..5.
func runScenario(seed uint64, nTargets, nNights int) planner.RunRequest {
	r := rand.New(rand.NewPCG(seed, 66))
	loc := time.FixedZone("UTC-3", -3*3600)
	nights, _ := planner.NightsFrom(2026, 4, 14, nNights)
	if nNights >= 3 {
		nights[1].Part = planner.PartFirst
	}
	if nNights >= 5 {
		nights[3].Part = planner.PartSecond
	}
	req := planner.RunRequest{
		Site:   ephem.Site{LatDeg: -30.24, LonEastDeg: -70.74, ElevM: 2200},
		Zone:   loc,
		Nights: nights, Constraints: planner.DefaultConstraints(), Bins: 10,
	}
	req.Constraints.MinMoonSepDeg = 20
	for i := range nTargets {
		t := planner.Target{
			Name: fmt.Sprintf("RS-%02d", i+1), RADeg: 110 + 200*r.Float64(), DecDeg: -75 + 85*r.Float64(),
			Priority: 1 + r.IntN(5), AcquireS: 60 + 60*r.Float64(),
			Ephem: ephem.Ephemeris{T0: ephem.NewJD2(2461100.5 + r.Float64()), PeriodDays: 0.0625 + 2.5*r.Float64()*r.Float64(),
				PeriodErr: 1e-7, T0ErrDays: 5e-4, Convention: ephem.ConvInferiorConjunction},
		}
		exp := float64(120 + 60*r.IntN(6))
		hw := 0.02 + 0.05*r.Float64()
		t.Goals = append(t.Goals, planner.Goal{Event: planner.EventQuadratures, HalfWidth: hw, ExposureS: exp, OverheadS: 20,
			NExposures: 1 + r.IntN(4), MinNights: 1 + r.IntN(2)})
		if r.IntN(3) == 0 {
			t.Goals = append(t.Goals, planner.Goal{Center: 0, HalfWidth: hw, ExposureS: exp, OverheadS: 20})
		}
		req.Targets = append(req.Targets, t)
	}
	return req
}

func mustPlanRun(tb testing.TB, req planner.RunRequest) *planner.RunPlan {
	tb.Helper()
	rp, err := planner.PlanRun(context.Background(), req, nil)
	if err != nil {
		tb.Fatal(err)
	}
	return rp
}

// checkNightRules checks the night planner's rules on every block of a
// night's plan with ephem's full path: inside the night's window, blocks in
// time order not overlapping with the acquisition charged before a change
// of target, end − start = n × (exposure + overhead), airmass ≤ the limit and
// the Sun below the twilight altitude at the block's ends and every minute
// in it, and every exposure's mid-time phase in its goal window.
func checkNightRules(t *testing.T, req planner.RunRequest, np planner.NightPlan) {
	t.Helper()
	c, _ := req.Constraints.Resolved()
	byName := map[string]planner.Target{}
	for _, tg := range req.Targets {
		byName[tg.Name] = tg
	}
	var prevEnd time.Time
	prevTarget := ""
	for i, b := range np.Plan.Blocks {
		tg := byName[b.Target]
		if b.Start.Before(np.From) || b.End.After(np.To) {
			t.Errorf("%s block %d (%s) %v–%v outside the night %v–%v", np.Night, i, b.Target, b.Start, b.End, np.From, np.To)
		}
		want := time.Duration(float64(b.N) * (b.ExposureS + b.OverheadS) * 1e9)
		if d := b.End.Sub(b.Start) - want; d < -time.Microsecond || d > time.Microsecond {
			t.Errorf("%s block %d: length %v, want %d × (%g + %g) s", np.Night, i, b.End.Sub(b.Start), b.N, b.ExposureS, b.OverheadS)
		}
		if i > 0 {
			gap := b.Start.Sub(prevEnd).Seconds()
			need := 0.0
			if b.Target != prevTarget {
				need = tg.AcquireS
			}
			if gap < need-1e-3 {
				t.Errorf("%s block %d (%s) starts %.3f s after the previous block; needs %.0f s", np.Night, i, b.Target, gap, need)
			}
		}
		for u := b.Start; !u.After(b.End); u = u.Add(time.Minute) {
			checkInstant(t, req.Site, c, tg, u, fmt.Sprintf("%s block %d (%s)", np.Night, i, b.Target))
		}
		checkInstant(t, req.Site, c, tg, b.End, fmt.Sprintf("%s block %d (%s) end", np.Night, i, b.Target))
		if !b.Filler {
			L := b.ExposureS + b.OverheadS
			for j := range b.N {
				mid := b.Start.Add(time.Duration((float64(j)*L + b.ExposureS/2) * 1e9))
				_, phi, _ := ephem.PhaseAtUTC(req.Site, tg.Star(), tg.Ephem, mid)
				tol := 0.002 / (tg.Ephem.PeriodDays * 86400)
				d := phi - b.Goal.Center
				d -= math.Floor(d + 0.5)
				if math.Abs(d) > b.Goal.HalfWidth+tol {
					t.Errorf("%s block %d (%s) exposure %d: phase %.5f outside %.4f ± %.4f", np.Night, i, b.Target, j, phi, b.Goal.Center, b.Goal.HalfWidth)
				}
			}
		}
		prevEnd, prevTarget = b.End, b.Target
	}
}

func checkInstant(t *testing.T, site ephem.Site, c planner.Constraints, tg planner.Target, u time.Time, what string) {
	t.Helper()
	if s := site.SunAltDeg(u); s > c.SunAltMaxDeg+1e-6 {
		t.Errorf("%s at %v: Sun at %.4f°, above %g°", what, u, s, c.SunAltMaxDeg)
	}
	p := ephem.Observe(site, tg.Star(), u)
	if !p.AirmassOK || p.Airmass > c.MaxAirmass+1e-6 {
		t.Errorf("%s at %v: airmass %.5f (ok %v), above %g", what, u, p.Airmass, p.AirmassOK, c.MaxAirmass)
	}
}

// TestRunProperties plans seeded random runs and checks, for each: every
// night's schedule obeys the night planner's rules (checkNightRules); the
// coverage equals a recount of the exposures (observed and planned, phases
// recomputed here); every goal reported unreachable has no night on which
// the night planner, given that target and goal alone, schedules anything;
// no night holds more of a goal's exposures in one block than the
// best-night search's capacity; the objective is the sum of the goals'
// shares and never below the greedy pass's.
func TestRunProperties(t *testing.T) {
	for seed := uint64(1); seed <= 4; seed++ {
		t.Run(fmt.Sprintf("seed%d", seed), func(t *testing.T) {
			req := runScenario(seed, 10, 5)
			req.CompareIndependent = true
			rp := mustPlanRun(t, req)
			t.Logf("J %d (greedy %d, nights on their own %d) of %d; %d solves, %d rounds", rp.Value, rp.GreedyValue, rp.IndependentValue, rp.MaxValue, rp.Solves, rp.Rounds)
			if rp.Value < rp.GreedyValue {
				t.Errorf("J %d below the greedy pass's %d", rp.Value, rp.GreedyValue)
			}
			checkObjectiveBounds(t, req, rp)
			blocks := 0
			for _, np := range rp.Nights {
				checkNightRules(t, req, np)
				blocks += len(np.Plan.Blocks)
			}
			if blocks == 0 {
				t.Fatal("no blocks: the case tests nothing")
			}
			checkRecount(t, req, rp)
			checkUnreachable(t, req, rp)
			checkCapacity(t, rp)
		})
	}
}

// checkObjectiveBounds checks J against its bounds, recomputed here from
// the coverage notes: RequiredValue is Σ w(priority)·10⁶ over the goals
// (u = 1 each), MaxValue Σ w·10⁶·(min(K, M) + SurplusValue·max(0, K−M))/M
// for K nights (every night full), and J never exceeds MaxValue, though it
// may exceed RequiredValue through coverage beyond the requirements.
func checkObjectiveBounds(t *testing.T, req planner.RunRequest, rp *planner.RunPlan) {
	t.Helper()
	K := len(req.Nights)
	var required, most float64
	goals := 0
	for _, tg := range req.Targets {
		gs, err := tg.ResolveGoals()
		if err != nil {
			t.Fatal(err)
		}
		w := float64(planner.PriorityWeight(tg.Priority))
		for _, g := range gs {
			M := max(g.MinNights, 1)
			required += 1e6 * w
			most += 1e6 * w * (float64(min(K, M)) + planner.SurplusValue*float64(max(0, K-M))) / float64(M)
			goals++
		}
	}
	if float64(rp.RequiredValue) != required {
		t.Errorf("RequiredValue %d, want %.0f", rp.RequiredValue, required)
	}
	if math.Abs(float64(rp.MaxValue)-most) > float64(goals) { // one millionth of rounding per goal
		t.Errorf("MaxValue %d, want %.0f", rp.MaxValue, most)
	}
	if rp.Value > rp.MaxValue || rp.RequiredValue > rp.MaxValue {
		t.Errorf("J %d (required %d) above its maximum %d", rp.Value, rp.RequiredValue, rp.MaxValue)
	}
}

// checkRecount recounts every goal's and bin's exposures from the blocks
// of the plans and the observed exposures, with phases on ephem's full
// path, and compares with the coverage report.
func checkRecount(t *testing.T, req planner.RunRequest, rp *planner.RunPlan) {
	t.Helper()
	type key struct{ target, goal, night int }
	want := map[key][2]int{}
	bins := map[[2]int]int{}
	add := func(ti int, tg planner.Target, night int, mid time.Time, planned bool) {
		_, phi, _ := ephem.PhaseAtUTC(req.Site, tg.Star(), tg.Ephem, mid)
		goals, _ := tg.ResolveGoals()
		tol := 0.002 / (tg.Ephem.PeriodDays * 86400)
		for gi, g := range goals {
			d := phi - g.Center
			d -= math.Floor(d + 0.5)
			if math.Abs(d) <= g.HalfWidth+tol {
				v := want[key{ti, gi, night}]
				if planned {
					v[1]++
				} else {
					v[0]++
				}
				want[key{ti, gi, night}] = v
			}
		}
		if req.Bins > 0 {
			bins[[2]int{ti, min(int(phi*float64(req.Bins)), req.Bins-1)}]++
		}
	}
	index := map[string]int{}
	for ti, tg := range req.Targets {
		index[tg.Name] = ti
	}
	for _, e := range req.Observed {
		if e.Failed {
			continue
		}
		for k, np := range rp.Nights {
			if !e.Mid.Before(np.From) && e.Mid.Before(np.To) {
				add(index[e.Target], req.Targets[index[e.Target]], k, e.Mid, false)
			}
		}
	}
	for k, np := range rp.Nights {
		if np.Plan == nil {
			continue
		}
		for _, b := range np.Plan.Blocks {
			L := b.ExposureS + b.OverheadS
			for j := range b.N {
				mid := b.Start.Add(time.Duration((float64(j)*L + b.ExposureS/2) * 1e9))
				add(b.TargetIndex, req.Targets[b.TargetIndex], k, mid, true)
			}
		}
	}
	var sum int64
	for ti, tc := range rp.Coverage {
		for gi, gc := range tc.Goals {
			for k, nc := range gc.PerNight {
				w := want[key{ti, gi, k}]
				if nc.Observed != w[0] || nc.Planned != w[1] {
					t.Errorf("%s goal %d night %d: coverage %d observed + %d planned, recount %d + %d", tc.Target, gi, k, nc.Observed, nc.Planned, w[0], w[1])
				}
			}
			sum += gc.Share
		}
		for b, bc := range tc.Bins {
			if got := bc.Observed + bc.Planned; got != bins[[2]int{ti, b}] {
				t.Errorf("%s bin %d: %d exposures, recount %d", tc.Target, b, got, bins[[2]int{ti, b}])
			}
		}
	}
	if sum != rp.Value {
		t.Errorf("J %d is not the sum of the goals' shares %d", rp.Value, sum)
	}
}

// checkUnreachable plans, for every goal reported unreachable, every night
// of the run with the night planner alone on that target and goal, and
// expects no block.
func checkUnreachable(t *testing.T, req planner.RunRequest, rp *planner.RunPlan) {
	t.Helper()
	n := 0
	for ti, tc := range rp.Coverage {
		for gi, gc := range tc.Goals {
			if gc.Status != planner.CoverageUnreachable {
				continue
			}
			if len(rp.Reach[ti].Goals[gi].Nights) != 0 || rp.Reach[ti].Goals[gi].Unreachable == "" {
				t.Errorf("%s goal %d: unreachable but the best-night search lists %d nights (reason %q)", tc.Target, gi, len(rp.Reach[ti].Goals[gi].Nights), rp.Reach[ti].Goals[gi].Unreachable)
			}
			n++
			tg := req.Targets[ti]
			tg.Goals = []planner.Goal{gc.Goal}
			for _, np := range rp.Nights {
				p, err := planner.PlanNight(planner.NightRequest{Site: req.Site, From: np.From, To: np.To, Targets: []planner.Target{tg},
					Constraints: req.Constraints, Options: req.Options})
				if err != nil {
					t.Fatal(err)
				}
				if len(p.Blocks) > 0 {
					t.Errorf("%s goal %d reported unreachable, but %s has a block at %v", tc.Target, gi, np.Night, p.Blocks[0].Start)
				}
			}
		}
	}
	t.Logf("%d unreachable goals checked night by night", n)
}

// checkCapacity checks that no block of a goal holds more exposures than
// the best-night search's capacity for that goal and night.
func checkCapacity(t *testing.T, rp *planner.RunPlan) {
	t.Helper()
	for k, np := range rp.Nights {
		if np.Plan == nil {
			continue
		}
		for _, b := range np.Plan.Blocks {
			if b.Filler {
				continue
			}
			capacity := 0
			for _, gn := range rp.Reach[b.TargetIndex].Goals[b.GoalIndex].Nights {
				if gn.Night == k {
					capacity = gn.Capacity
				}
			}
			if b.N > capacity {
				t.Errorf("%s %s goal %d: block of %d exposures, capacity %d", np.Night, b.Target, b.GoalIndex, b.N, capacity)
			}
		}
	}
}

// TestRunBeatsNightByNight is a constructed run where planning each night on
// its own leaves a quadrature uncovered and the run optimizer covers it.
//
// Four nights from 2026-01-10 at an invented site on the Greenwich meridian
// at 25° N (UTC). Two targets transit together at 22:30 UTC on the first
// night (right ascension = the local sidereal time then):
//
//   - QB, priority 1, P = 1 day: its goal (phase 0.25 ± 0.004, one 1500-s
//     exposure) comes round at 22:30 UTC every night;
//   - QA, priority 2, P = 4.2 days, both quadratures ± 0.001 (±6 min), one
//     1500-s exposure each: the first quadrature at 22:30 UTC on the first
//     night only (next at 03:18 UTC on 2026-01-15, after the run), the other
//     2.1 days later, at 00:54 UTC on 2026-01-13 (the third night).
//
// On the first night the two windows coincide, and two 25-min exposures
// with their mid-times inside ±6 min of the same instant cannot both fit.
// Night by night, the planner takes the higher priority, QB, on the first
// night and again on every later one: QA's first quadrature is lost. The
// run optimizer sees that QB has three later chances (its weight tonight is
// 81/(1+3)) while tonight is QA's only one (27): it gives the first night
// to QA and the second to QB, and every goal is met.
func TestRunBeatsNightByNight(t *testing.T) {
	site := ephem.Site{LatDeg: 25, LonEastDeg: 0, ElevM: 1200}
	meet := time.Date(2026, 1, 10, 22, 30, 0, 0, time.UTC)
	ra := site.LASTHours(meet) * 15
	ephAt := func(p float64, center float64) ephem.Ephemeris {
		st := ephem.Star{RADeg: ra, DecDeg: 0}
		return ephem.Ephemeris{T0: ephem.BJDTDB(site, st, meet).AddDays(-center * p), PeriodDays: p, Convention: ephem.ConvInferiorConjunction}
	}
	qa := planner.Target{Name: "QA", RADeg: ra, DecDeg: 0, Priority: 2, AcquireS: 120, Ephem: ephAt(4.2, 0.25),
		Goals: []planner.Goal{{Event: planner.EventQuadratures, HalfWidth: 0.001, ExposureS: 1500, OverheadS: 60, NExposures: 1}}}
	qb := planner.Target{Name: "QB", RADeg: ra, DecDeg: 0, Priority: 1, AcquireS: 120, Ephem: ephAt(1, 0.25),
		Goals: []planner.Goal{{Center: 0.25, HalfWidth: 0.004, ExposureS: 1500, OverheadS: 60, NExposures: 1}}}
	goalsA, _ := qa.ResolveGoals()
	if goalsA[0].Center != 0.25 && goalsA[1].Center != 0.25 {
		t.Fatalf("quadratures at %v, expected one at 0.25", goalsA)
	}
	nights, _ := planner.NightsFrom(2026, 1, 10, 4)
	req := planner.RunRequest{Site: site, Zone: time.UTC, Nights: nights, Targets: []planner.Target{qa, qb},
		Constraints: planner.DefaultConstraints(), CompareIndependent: true}
	rp := mustPlanRun(t, req)

	// Night by night, each night planned on its own.
	lost := map[float64]int{}
	for _, np := range rp.Nights {
		p, err := planner.PlanNight(planner.NightRequest{Site: site, From: np.From, To: np.To, Targets: req.Targets, Constraints: req.Constraints})
		if err != nil {
			t.Fatal(err)
		}
		for _, b := range p.Blocks {
			if b.Target == "QA" {
				lost[b.Goal.Center] += b.N
			}
		}
	}
	if lost[0.25] != 0 {
		t.Fatalf("night by night, QA's quadrature at 0.25 got %d exposures: the construction does not hold", lost[0.25])
	}
	for _, tc := range rp.Coverage {
		for _, gc := range tc.Goals {
			if gc.Status != planner.CoverageMet {
				t.Errorf("run: %s goal at %.2f is %s (%d planned), want met", tc.Target, gc.Goal.Center, gc.Status, gc.Planned)
			}
		}
	}
	if first := rp.Nights[0].Plan.Blocks; len(first) != 1 || first[0].Target != "QA" {
		t.Errorf("first night: %d blocks (%v), want one of QA", len(first), first)
	}
	if rp.Value <= rp.IndependentValue {
		t.Errorf("run objective %d not above the nights planned on their own, %d", rp.Value, rp.IndependentValue)
	}
	t.Logf("run objective %d, nights on their own %d, maximum %d", rp.Value, rp.IndependentValue, rp.MaxValue)
}

// conflictRun is a run of nNights nights from 2026-01-10 at an invented
// site on the Greenwich meridian at 25° N (UTC) with one target per
// priority given, CX, CY, …, all at the same place in the sky (transiting
// at 22:30 UTC on the first night), with a period of exactly one day and one
// goal: phase 0.25 ± 0.004 (±5.8 min), one 1500-s exposure, at 22:30 UTC
// every night. Two 25-min exposures with mid-times within ±5.8 min of the
// same instant cannot both fit: only one target gets each night.
func conflictRun(nNights int, priorities []int) planner.RunRequest {
	site := ephem.Site{LatDeg: 25, LonEastDeg: 0, ElevM: 1200}
	meet := time.Date(2026, 1, 10, 22, 30, 0, 0, time.UTC)
	ra := site.LASTHours(meet) * 15
	nights, _ := planner.NightsFrom(2026, 1, 10, nNights)
	req := planner.RunRequest{Site: site, Zone: time.UTC, Nights: nights, Constraints: planner.DefaultConstraints()}
	for i, p := range priorities {
		st := ephem.Star{RADeg: ra, DecDeg: 10}
		req.Targets = append(req.Targets, planner.Target{Name: "C" + string(rune('X'+i)), RADeg: ra, DecDeg: 10, Priority: p, AcquireS: 120,
			Ephem: ephem.Ephemeris{T0: ephem.BJDTDB(site, st, meet).AddDays(-0.25), PeriodDays: 1, Convention: ephem.ConvInferiorConjunction},
			Goals: []planner.Goal{{Center: 0.25, HalfWidth: 0.004, ExposureS: 1500, OverheadS: 60, NExposures: 1}}})
	}
	return req
}

// blockTargets lists each night's block targets ("-" for a past night,
// "" for an empty one), nights separated by '|'.
func blockTargets(rp *planner.RunPlan) string {
	var parts []string
	for _, np := range rp.Nights {
		if np.Plan == nil {
			parts = append(parts, "-")
			continue
		}
		var names []string
		for _, b := range np.Plan.Blocks {
			names = append(names, b.Target)
		}
		parts = append(parts, strings.Join(names, "+"))
	}
	return strings.Join(parts, "|")
}
