package planner

import (
	"math/rand/v2"
	"testing"
)

// TestPruneByBoundExact solves 200 random nights (randomNight, up to 12
// targets, every rule and constraint drawn at random) with and without the
// bound pruning (solvePruned), for PlanNight's priority weights and for
// random run weights (1..5000 per goal): the optimal objective (main value
// and tie-breaker) must be identical, the pruned solver's schedule feasible
// on the whole problem, and both proven optimal.
func TestPruneByBoundExact(t *testing.T) {
	r := rand.New(rand.NewPCG(21, 200))
	total, kept := 0, 0
	nights := eachRandomNight(t, r, 200, func(nights int, m *nightModel, weightings map[string][][]int64) {
		for name, w := range weightings {
			full := m.pr.solve(m.weigh(w), m.en.opt.MaxStates)
			got := m.solve(w) // leaves the values of w in the candidates
			fwd, bwd := m.pr.chainBounds()
			total += len(m.pr.cands)
			kept += len(m.pr.keptBy(fwd, bwd, full.value))
			if !full.optimal || !got.sol.optimal {
				t.Fatalf("night %d (%s weights): optimal %v unpruned, %v pruned", nights, name, full.optimal, got.sol.optimal)
			}
			if got.sol.value != full.value {
				t.Fatalf("night %d (%s weights): pruned optimum %+v, unpruned %+v", nights, name, got.sol.value, full.value)
			}
			if !m.pr.feasible(got.sol.chosen) || m.pr.value(got.sol.chosen) != full.value {
				t.Fatalf("night %d (%s weights): pruned schedule %v infeasible or worth %+v", nights, name, got.sol.chosen, m.pr.value(got.sol.chosen))
			}
		}
	})
	t.Logf("%d nights × 2 weightings: %d of %d candidates would be kept with LB the optimum (%.1f %%)", nights, kept, total, 100*float64(kept)/float64(total))
}

// eachRandomNight calls fn for n random nights (randomNight, up to 12
// targets; nights without a candidate are drawn again), numbered from 1,
// with two weightings: PlanNight's priority weights and random run weights
// (1..5000 per goal). It returns n.
func eachRandomNight(t *testing.T, r *rand.Rand, n int, fn func(night int, m *nightModel, weightings map[string][][]int64)) int {
	t.Helper()
	nights := 0
	for nights < n {
		m, err := newNightModel(randomNight(r, 12))
		if err != nil {
			t.Fatal(err)
		}
		if len(m.pr.cands) == 0 {
			continue
		}
		nights++
		random := make([][]int64, len(m.targets))
		for ti, ts := range m.targets {
			random[ti] = make([]int64, len(ts.goals))
			for gi := range random[ti] {
				random[ti][gi] = 1 + r.Int64N(5000)
			}
		}
		fn(nights, m, map[string][][]int64{"priority": m.priorityWeights(), "random": random})
	}
	return nights
}
