package planner

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"
)

// bruteForce returns the best schedule value by exhaustive search over
// start-ordered sequences (small problems only). It is written from the
// problem's statement, not from the solver's helpers: a block may follow
// another of the same target when it starts at or after its end; after
// another target (or first) when its acquisition, s − acq, starts at or
// after both the previous end and the acquisition floor; one block per
// occurrence. Scores compare priority level by level (score.less).
func bruteForce(tb testing.TB, pr *problem) score {
	tb.Helper()
	idx := make([]int, len(pr.cands))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return pr.cands[idx[a]].start < pr.cands[idx[b]].start })
	best := score{}
	used := make(map[int]bool)
	var rec func(from int, prevTarget int, prevEnd float64, acc score)
	rec = func(from int, prevTarget int, prevEnd float64, acc score) {
		if best.less(acc) {
			best = acc
		}
		for k := from; k < len(idx); k++ {
			c := &pr.cands[idx[k]]
			if used[c.occ] {
				continue
			}
			if prevTarget == c.target {
				if c.start < prevEnd-1e-6 {
					continue
				}
			} else if c.start-c.acq < c.acqFloor-1e-6 || (prevTarget >= 0 && c.start-c.acq < prevEnd-1e-6) {
				continue
			}
			used[c.occ] = true
			rec(k+1, c.target, c.end, acc.plus(c.val))
			used[c.occ] = false
		}
	}
	rec(0, -1, 0, score{})
	return best
}

// single is a test candidate's value at priority 1's level only.
func single(v int64) score { return at(0, v, 0) }

// randomProblem builds a small abstract night: nOcc occurrences spread over
// nTargets targets, a few candidates each on a 10-unit grid.
func randomProblem(r *rand.Rand, nTargets, nOcc, perOcc int) (*problem, []int) {
	pr := &problem{nTargets: nTargets, nOcc: nOcc}
	prio := make([]int, nTargets)
	acq := make([]float64, nTargets)
	for t := range prio {
		prio[t] = 1 + r.IntN(5)
		acq[t] = float64(r.IntN(3) * 5)
	}
	type occInfo struct {
		target int
		lo     float64
	}
	occs := make([]occInfo, nOcc)
	for k := range occs {
		tg := r.IntN(nTargets)
		lo := float64(r.IntN(12) * 10)
		occs[k] = occInfo{tg, lo}
		for c := 0; c < perOcc; c++ {
			s := lo + float64(r.IntN(6)*10)
			n := 1 + r.IntN(3)
			pr.cands = append(pr.cands, candidate{
				start: s, end: s + float64(n)*15, acq: acq[tg], acqFloor: float64(r.IntN(2) * 10),
				target: tg, occ: k, n: n,
				val: at(priorityLevel(prio[tg]), int64(math.Pow(3, float64(5-prio[tg])))*int64(500000+n*100000), -int64(r.IntN(50))),
			})
		}
	}
	sortCandidates(pr.cands)
	order := make([]int, nOcc)
	for k := range order {
		order[k] = k
	}
	sort.SliceStable(order, func(a, b int) bool {
		pa, pb := prio[occs[order[a]].target], prio[occs[order[b]].target]
		if pa != pb {
			return pa < pb
		}
		return occs[order[a]].lo < occs[order[b]].lo
	})
	return pr, order
}

func TestSolveMatchesBruteForce(t *testing.T) {
	r := rand.New(rand.NewPCG(4, 2026))
	worstNodes := 0
	for trial := range 1000 {
		pr, order := randomProblem(r, 1+r.IntN(4), 2+r.IntN(7), 1+r.IntN(6))
		want := bruteForce(t, pr)
		g := pr.greedy(order)
		if !pr.feasible(g) {
			t.Fatalf("trial %d: greedy schedule infeasible", trial)
		}
		sol := pr.solve(g, 100000)
		if !sol.optimal {
			t.Fatalf("trial %d: not proven optimal after %d nodes", trial, sol.nodes)
		}
		if !pr.feasible(sol.chosen) {
			t.Fatalf("trial %d: optimiser schedule infeasible: %v", trial, sol.chosen)
		}
		if got := pr.value(sol.chosen); got != want || sol.value != want {
			t.Fatalf("trial %d: got %v (reported %v), brute force %v", trial, got, sol.value, want)
		}
		if want.less(pr.value(g)) {
			t.Fatalf("trial %d: greedy %v beats the exhaustive optimum %v", trial, pr.value(g), want)
		}
		worstNodes = max(worstNodes, sol.nodes)
	}
	t.Logf("1000 random problems: optimiser = brute force; most DSSR rounds %d", worstNodes)
}

// TestSolveBeatsGreedy builds nights on which first-fit by priority loses.
func TestSolveBeatsGreedy(t *testing.T) {
	w := func(p int) int64 { return int64(math.Pow(3, float64(5-p))) }
	c := func(tg, occ int, start, end float64, p int, n int) candidate {
		return candidate{start: start, end: end, target: tg, occ: occ, n: n, val: at(priorityLevel(p), w(p)*int64(500000+500000*n/max(n, 1)), 0)}
	}
	tests := []struct {
		name       string
		cands      []candidate
		nTargets   int
		order      []int
		wantBlocks int
	}{
		{
			// The priority-1 goal can go early or late; first fit puts it
			// early, where it blocks two priority-2 goals that only fit early.
			name: "EarlyFitBlocksOthers",
			cands: []candidate{
				c(0, 0, 0, 60, 1, 1), c(0, 0, 120, 180, 1, 1),
				c(1, 1, 0, 30, 2, 1), c(2, 2, 30, 60, 2, 1),
			},
			nTargets: 3, order: []int{0, 1, 2}, wantBlocks: 3,
		},
		{
			// Acquisition: the priority-1 block fits first at 40–60, but
			// then the other target's two goals cannot have their 10-unit
			// acquisition before or after it; placed late, everything fits.
			name: "AcquisitionBetweenTargets",
			cands: []candidate{
				{start: 10, end: 40, acq: 10, target: 0, occ: 0, n: 1, val: single(27 * 1000000)},
				{start: 40, end: 70, acq: 10, target: 0, occ: 1, n: 1, val: single(27 * 1000000)},
				{start: 40, end: 60, acq: 10, target: 1, occ: 2, n: 1, val: single(81 * 1000000)},
				{start: 80, end: 100, acq: 10, target: 1, occ: 2, n: 1, val: single(81 * 1000000)},
			},
			nTargets: 2, order: []int{2, 0, 1}, wantBlocks: 3,
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			pr := &problem{cands: append([]candidate(nil), tc.cands...), nTargets: tc.nTargets, nOcc: 0}
			for _, cd := range pr.cands {
				pr.nOcc = max(pr.nOcc, cd.occ+1)
			}
			sortCandidates(pr.cands)
			g := pr.greedy(tc.order)
			sol := pr.solve(g, 1000)
			gv, ov := pr.value(g), pr.value(sol.chosen)
			if !gv.less(ov) {
				t.Fatalf("optimiser %v does not beat greedy %v", ov, gv)
			}
			if got := len(sol.chosen); got != tc.wantBlocks {
				t.Errorf("blocks: got %d, want %d", got, tc.wantBlocks)
			}
			if want := bruteForce(t, pr); ov != want {
				t.Errorf("optimiser %v, brute force %v", ov, want)
			}
			t.Logf("greedy %d blocks value %d; optimiser %d blocks value %d", len(g), gv.total(), len(sol.chosen), ov.total())
		})
	}
}

// TestSolveOneBlockPerOccurrence: the DP relaxation would serve one long
// window twice around another target's block; the answer serves it once.
func TestSolveOneBlockPerOccurrence(t *testing.T) {
	pr := &problem{nTargets: 2, nOcc: 2, cands: []candidate{
		{start: 0, end: 10, target: 0, occ: 0, n: 1, val: single(10)},
		{start: 20, end: 30, target: 0, occ: 0, n: 1, val: single(10)},
		{start: 10, end: 20, target: 1, occ: 1, n: 1, val: single(1)},
		{start: 0, end: 30, target: 0, occ: 0, n: 3, val: single(15)},
	}}
	sortCandidates(pr.cands)
	relaxed := pr.sweep(pr.sweepStatic(), make([]bool, pr.nOcc), 100, &sweepScratch{})
	if relaxed.value.total() != 21 || len(relaxed.chosen) != 3 {
		t.Fatalf("relaxation: got %v with %d blocks, want 21 with 3 (the occurrence served twice)", relaxed.value, len(relaxed.chosen))
	}
	sol := pr.solve(nil, 100)
	if sol.value.total() != 15 || !sol.optimal || !pr.feasible(sol.chosen) {
		t.Fatalf("solve: got %v optimal=%v chosen=%v, want 15 (one long block)", sol.value, sol.optimal, sol.chosen)
	}
}

func TestFollowsAcquisition(t *testing.T) {
	a := &candidate{start: 100, end: 200, acq: 30, acqFloor: 50, target: 0}
	tests := []struct {
		name string
		c    candidate
		prev *candidate
		want bool
	}{
		{"FirstAcqInsideDark", candidate{start: 80, end: 90, acq: 30, acqFloor: 50}, nil, true},
		{"FirstAcqBeforeDark", candidate{start: 70, end: 90, acq: 30, acqFloor: 50}, nil, false},
		{"SameTargetNoAcq", candidate{start: 200, end: 250, acq: 30, target: 0}, a, true},
		{"SameTargetOverlap", candidate{start: 199, end: 250, acq: 30, target: 0}, a, false},
		{"OtherTargetAcqFits", candidate{start: 230, end: 250, acq: 30, target: 1}, a, true},
		{"OtherTargetAcqShort", candidate{start: 229, end: 250, acq: 30, target: 1}, a, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.c.follows(tc.prev); got != tc.want {
				t.Errorf("got %v, want %v", got, tc.want)
			}
		})
	}
}
