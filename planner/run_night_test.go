package planner

import (
	"fmt"
	"math/rand/v2"
	"testing"
	"time"

	"phasecast/ephem"
)

// modelNight is an invented 12-target night at 24° S in May with priority
// mix, two or three goals per target, some with a fixed number of
// exposures.
func modelNight(seed uint64) NightRequest {
	r := rand.New(rand.NewPCG(seed, 12))
	site := ephem.Site{LatDeg: -24.6, LonEastDeg: -70.4, ElevM: 2600}
	from, to := NightWindow(2026, 5, 12, time.FixedZone("UTC-4", -4*3600))
	req := NightRequest{Site: site, From: from, To: to, Constraints: DefaultConstraints()}
	for i := range 12 {
		t := Target{
			Name: fmt.Sprintf("NM-%02d", i+1), RADeg: 150 + 150*r.Float64(), DecDeg: -70 + 80*r.Float64(),
			Priority: 1 + r.IntN(5), AcquireS: 90,
			Ephem: ephem.Ephemeris{T0: ephem.NewJD2(2461100.5 + r.Float64()), PeriodDays: 0.05 + 0.4*r.Float64(),
				Convention: ephem.ConvInferiorConjunction},
		}
		exp := float64(60 + 60*r.IntN(5))
		for _, ph := range []float64{0, 0.25, 0.75}[:2+r.IntN(2)] {
			t.Goals = append(t.Goals, Goal{Center: ph, HalfWidth: 0.03 + 0.05*r.Float64(), ExposureS: exp, OverheadS: 15, NExposures: r.IntN(4)})
		}
		req.Targets = append(req.Targets, t)
	}
	return req
}

// TestNightModelWeights checks the weights of the night scheduler that
// PlanNight and the run planner share: the priority weights give PlanNight's
// plan, scaling every weight by k scales the value by k and keeps the
// blocks, and on the run planner's single level (strict false) a heavy
// weight on a goal left out puts it in the schedule at the expense of a
// block chosen before.
func TestNightModelWeights(t *testing.T) {
	type key struct {
		target, goal int
		start        time.Time
		n            int
	}
	keys := func(p *Plan) map[key]bool {
		out := map[key]bool{}
		for _, b := range p.Blocks {
			if !b.Filler {
				out[key{b.TargetIndex, b.GoalIndex, b.Start, b.N}] = true
			}
		}
		return out
	}
	conflicts := 0
	for seed := uint64(1); seed <= 4; seed++ {
		t.Run(fmt.Sprintf("seed%d", seed), func(t *testing.T) {
			req := modelNight(seed)
			want, err := PlanNight(req)
			if err != nil {
				t.Fatal(err)
			}
			if len(want.Blocks) == 0 || !want.Optimal {
				t.Fatalf("%d blocks, optimal %v: the case tests nothing", len(want.Blocks), want.Optimal)
			}
			m, err := newNightModel(req)
			if err != nil {
				t.Fatal(err)
			}

			const k = 7
			m.strict = true
			w := m.priorityWeights()
			for ti := range w {
				for gi := range w[ti] {
					w[ti][gi] *= k
				}
			}
			scaled := m.plan(m.solve(w))
			if scaled.Value != k*want.Value || scaled.GreedyValue != k*want.GreedyValue {
				t.Errorf("weights ×%d: value %d (greedy %d), want %d (greedy %d)", k, scaled.Value, scaled.GreedyValue, k*want.Value, k*want.GreedyValue)
			}
			if fmt.Sprint(keys(scaled)) != fmt.Sprint(keys(want)) {
				t.Errorf("weights ×%d: blocks %v, PlanNight's %v", k, keys(scaled), keys(want))
			}

			// A goal with candidates tonight but no block in PlanNight's plan.
			served := map[[2]int]bool{}
			for _, b := range want.Blocks {
				served[[2]int{b.TargetIndex, b.GoalIndex}] = true
			}
			tg, gg := -1, -1
			for _, c := range m.pr.cands {
				om := m.occs[c.occ]
				if !served[[2]int{om.target, om.goal}] {
					tg, gg = om.target, om.goal
					break
				}
			}
			if tg < 0 {
				// The checks above passed; this night has no goal left out, so
				// the heavy-weight check has nothing to displace here (the
				// count below makes sure some night has one).
				t.Log("every goal with a candidate is served: no conflict to resolve")
				return
			}
			// The run planner's nights: one level, weights alone rank.
			conflicts++
			m.strict = false
			want = m.plan(m.solve(m.priorityWeights()))
			served = map[[2]int]bool{}
			for _, b := range want.Blocks {
				served[[2]int{b.TargetIndex, b.GoalIndex}] = true
			}
			if served[[2]int{tg, gg}] {
				t.Skipf("goal %d of %s is served on one level", gg, req.Targets[tg].Name)
			}
			w = m.priorityWeights()
			w[tg][gg] = 1_000_000
			heavy := m.plan(m.solve(w))
			if !heavy.Optimal {
				t.Fatal("heavy-weight schedule not proved optimal")
			}
			got, dropped := false, 0
			for _, b := range heavy.Blocks {
				got = got || (b.TargetIndex == tg && b.GoalIndex == gg)
			}
			hk := keys(heavy)
			for kb := range keys(want) {
				if !hk[kb] {
					dropped++
				}
			}
			t.Logf("goal %d of %s weighted 10^6: scheduled %v, %d of PlanNight's %d blocks displaced", gg, req.Targets[tg].Name, got, dropped, len(keys(want)))
			if !got {
				t.Errorf("goal %d of %s weighted 10^6 gets no block", gg, req.Targets[tg].Name)
			}
			if dropped == 0 {
				t.Errorf("goal %d of %s scheduled without displacing any of PlanNight's blocks: PlanNight was not optimal", gg, req.Targets[tg].Name)
			}
		})
	}
	if conflicts == 0 {
		t.Error("no night had a goal left out: the heavy-weight case tested nothing")
	}
}
