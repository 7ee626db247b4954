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

// TestNightModelMatchesPlanNight checks the run's hook into the night
// planner: solved with the priority weights, a night model gives PlanNight's
// plan block for block (so a change to PlanNight not mirrored in
// nightModel fails here).
func TestNightModelMatchesPlanNight(t *testing.T) {
	for seed := uint64(1); seed <= 4; seed++ {
		t.Run(fmt.Sprintf("seed%d", seed), func(t *testing.T) {
			req := modelNight(seed)
			want, err := PlanNight(req)
			if err != nil {
				t.Fatal(err)
			}
			m, err := newNightModel(req)
			if err != nil {
				t.Fatal(err)
			}
			w := make([][]int64, len(m.targets))
			for ti, ts := range m.targets {
				w[ti] = make([]int64, len(ts.goals))
				for gi := range w[ti] {
					w[ti][gi] = PriorityWeight(ts.t.Priority)
				}
			}
			got := m.plan(m.solve(w))
			if got.Value != want.Value || got.GreedyValue != want.GreedyValue || len(got.Blocks) != len(want.Blocks) {
				t.Fatalf("value %d (greedy %d), %d blocks; PlanNight: %d (greedy %d), %d blocks",
					got.Value, got.GreedyValue, len(got.Blocks), want.Value, want.GreedyValue, len(want.Blocks))
			}
			for i := range want.Blocks {
				a, b := got.Blocks[i], want.Blocks[i]
				if a.Target != b.Target || a.GoalIndex != b.GoalIndex || !a.Start.Equal(b.Start) || a.N != b.N {
					t.Errorf("block %d: %s goal %d %v ×%d; PlanNight: %s goal %d %v ×%d", i, a.Target, a.GoalIndex, a.Start, a.N, b.Target, b.GoalIndex, b.Start, b.N)
				}
			}
			if fmt.Sprint(got.Unscheduled) != fmt.Sprint(want.Unscheduled) {
				t.Error("unscheduled goals differ from PlanNight's")
			}
			if len(want.Blocks) == 0 {
				t.Error("no blocks: the case tests nothing")
			}
		})
	}
}
