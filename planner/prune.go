package planner

import (
	"cmp"
	"math"
	"slices"
)

// Candidate pruning by bounds: before the exact scheduler runs, drop every
// candidate block that no optimal schedule can contain.
//
// Rule. For a candidate c let fwd(c) be the best value of a chain of
// candidates ending with c and bwd(c) the best value of a chain starting
// with c, where a chain obeys every rule of a schedule except "at most one
// block per goal occurrence", which is kept only between neighbours: a
// block follows a block of another target when its acquisition fits after
// it (candidate.acqFits), a block of its own target when it starts after it
// ends and serves another occurrence; the first block's acquisition must
// fit after −∞. Then
//
//	UB(c) = fwd(c) + bwd(c) − value(c)
//
// bounds the value of every schedule containing c.
//
// Proof. Let S be a schedule (every rule of the night planner) containing
// c, its blocks in time order. Its blocks up to c form a chain ending with c:
// consecutive blocks of S follow each other (candidate.follows), and two
// consecutive blocks of one target serve different occurrences since S
// serves each occurrence at most once; the first block of S can be first.
// So their summed value is at most fwd(c); likewise the blocks from c on sum
// to at most bwd(c). value(S) is the sum over its blocks, c counted in both
// parts, so value(S) ≤ UB(c). Scores are compared lexicographically (main,
// then tie), an order compatible with addition, so the sum of bounds bounds
// the sum. If UB(c) < LB, the value of a known feasible schedule, every schedule containing c is worse than that one, so no optimum
// (which is at least as good as LB) contains c, and removing c changes
// neither the optimal value nor the set of optimal schedules. The blocks of
// the schedule giving LB have UB ≥ LB, so they are kept.
//
// What the rule assumes about the objective, so that it stays valid when the
// objective changes: (1) a schedule's value is at most the sum of its
// blocks' candidate values (candidate.val), as it is equal to it today; an
// objective with diminishing returns per goal within a night (a goal's later
// blocks worth less than its first) keeps this as long as candidate.val is
// a block's largest possible contribution; (2) blocks of a schedule never
// overlap and obey follows; (3) LB is the value of a feasible schedule under
// the same objective. solvePruned is used by nightModel.solve only; a
// change of objective that breaks (1) must switch it off there.
//
// Cost: two sweeps over 4 events per candidate, O(n log n), about the cost
// of one sweep of the exact scheduler without states.

// solvePruned solves pr exactly as problem.solve does (the same optimal
// value; maxBuckets as there), with the candidates no optimum can use
// removed first. incumbent (indices in pr) is a feasible schedule or nil.
//
// Incumbents: the one given and the best chain made feasible
// (problem.repair); LB is the better one's value. Two passes. When LB is
// within pruneTight of the whole relaxation's bound max UB, a first guess
// LB* = (1 − pruneGuess) · max UB (on its leading priority level,
// pruneGuessBelow) prunes hard and its problem
// is solved:
// its optimum V is a feasible schedule of pr. If V ≥ LB*, V is the optimum
// of pr: an optimal schedule S* of pr has value ≥ V ≥ LB*, so by the rule
// every block of S* has UB ≥ LB* and was kept, S* is a schedule of the
// pruned problem, and V ≥ value(S*). Otherwise the best of V and incumbent
// is a proven LB and the second pass prunes with it (the rule as stated),
// which is exact. Either way the returned solution is optimal for pr when
// the solver proves it optimal for the problem it was given.
func (pr *problem) solvePruned(incumbent []int, maxBuckets int) solution {
	fwd, bwd := pr.chainBounds()
	end, top := -1, score{}
	for i, f := range fwd {
		if f.ok && (end < 0 || top.less(f.val)) {
			end, top = i, f.val
		}
	}
	lb := lowestScore()
	if pr.feasible(incumbent) {
		lb = pr.value(incumbent)
	} else {
		incumbent = nil
	}
	// The best chain made feasible (each occurrence's most valuable block,
	// then the blocks that can still follow) is a second incumbent.
	if end >= 0 {
		var chain []int
		for i := int32(end); i >= 0; i = fwd[i].pred {
			chain = append(chain, int(i))
		}
		slices.Reverse(chain)
		if r := pr.repair(chain); pr.feasible(r) && lb.less(pr.value(r)) {
			incumbent, lb = r, pr.value(r)
		}
	}
	// The guess pays only where the relaxation is tight: there the repaired
	// chain is within pruneTight of the bound (dense nights of many targets
	// with the priority weights); with a loose relaxation (a run's uneven
	// weights) the guess would fail and cost a solve.
	if guess, ok := pruneGuessBelow(top, lb); ok {
		sol := pr.solveKept(pr.keptBy(fwd, bwd, guess), incumbent, maxBuckets)
		if sol.optimal && !sol.value.less(guess) {
			return sol
		}
		if lb.less(sol.value) && pr.feasible(sol.chosen) {
			incumbent, lb = sol.chosen, sol.value
		}
	}
	return pr.solveKept(pr.keptBy(fwd, bwd, lb), incumbent, maxBuckets)
}

// lowestScore is below every score a schedule can have (and far from
// overflow when compared).
func lowestScore() score {
	var s score
	for l := range levels {
		s.main[l], s.tie[l] = math.MinInt64/4, math.MinInt64/4
	}
	return s
}

// pruneGuessBelow returns the first pass's guess LB* for the relaxation's
// bound top and the proven lb, and whether the guess is worth a solve. The
// objective compares level by level (priority 1 first), so the guess keeps
// top's levels before its leading level l (the first with a non-zero main
// value), lowers level l's main value by pruneGuess of it and takes
// everything after as −∞: a score just below "as good as the bound on the
// leading level". It is tried when lb agrees with top before level l and
// falls short on level l by at most pruneTight. Any guess keeps the result
// exact (see solvePruned); the choice only decides whether the first pass
// pays.
func pruneGuessBelow(top, lb score) (score, bool) {
	l, v := top.leading()
	if l < 0 || v <= 0 {
		return score{}, false
	}
	guess := lowestScore()
	for k := 0; k < l; k++ {
		if lb.main[k] != top.main[k] || lb.tie[k] != top.tie[k] {
			return score{}, false
		}
		guess.main[k], guess.tie[k] = top.main[k], top.tie[k]
	}
	guess.main[l] = v - int64(pruneGuess*float64(v))
	return guess, lb.less(guess) && float64(v-lb.main[l]) <= pruneTight*float64(v)
}

// pruneGuess is the first pass's guess of how far the optimum falls short
// of the relaxation's bound, as a fraction of it: 1 % (0.65 % on the
// 1,000-target benchmark night). pruneTight is the largest shortfall of the
// best incumbent for which the guess is tried (the repaired chain is 13 %
// short there; on a 1,000-target run night with look-ahead weights the
// optimum is 20 % short of the bound and the greedy start 38 %).
const (
	pruneGuess = 0.01
	pruneTight = 0.15
)

// keptBy returns the candidates whose bound UB is not below lb, in order.
func (pr *problem) keptBy(fwd, bwd []chainValue, lb score) []int {
	keep := make([]int, 0, len(pr.cands))
	for i := range pr.cands {
		if !fwd[i].ok || !bwd[i].ok {
			continue
		}
		ub := fwd[i].val.plus(bwd[i].val).minus(pr.cands[i].val)
		if !ub.less(lb) {
			keep = append(keep, i)
		}
	}
	return keep
}

// solveKept solves the problem of the candidates keep (indices in pr, in
// order) from incumbent (indices in pr; its blocks not kept are dropped, and
// the solver ignores it if that makes it infeasible) and returns the
// solution with indices in pr.
func (pr *problem) solveKept(keep, incumbent []int, maxBuckets int) solution {
	sub := &problem{nTargets: pr.nTargets, nOcc: pr.nOcc, cands: make([]candidate, len(keep))}
	for j, i := range keep {
		sub.cands[j] = pr.cands[i]
	}
	start := make([]int, 0, len(incumbent))
	for _, i := range incumbent {
		if j, ok := slices.BinarySearch(keep, i); ok {
			start = append(start, j)
		}
	}
	sol := sub.solve(start, maxBuckets)
	chosen := make([]int, len(sol.chosen))
	for j, i := range sol.chosen {
		chosen[j] = keep[i]
	}
	sol.chosen = chosen
	return sol
}

// chainValue is a best chain value; ok is false when no chain exists. pred
// is the candidate before it on a best chain (−1: none), forward only.
type chainValue struct {
	val  score
	ok   bool
	pred int32
}

// timedCand is a candidate index with an event time of the bound sweeps.
type timedCand struct {
	t float64
	i int32
}

// sortTimed orders by time (decreasing when backward), then by candidate.
func sortTimed(ts []timedCand, backward bool) {
	slices.SortFunc(ts, func(a, b timedCand) int {
		if a.t != b.t {
			if backward {
				return cmp.Compare(b.t, a.t)
			}
			return cmp.Compare(a.t, b.t)
		}
		return cmp.Compare(a.i, b.i)
	})
}

// chainBounds returns fwd and bwd of every candidate (see the notes above).
// Each sweep merges three streams of events in time order: insertions (a
// chain becomes available), queries over other targets and queries over the
// own target; at equal times insertions come first, then other-target
// queries, then own-target ones. The candidates are sorted by end, so one
// stream is in order already and the other two are sorted once.
func (pr *problem) chainBounds() (fwd, bwd []chainValue) {
	const eps = 1e-6 // the tolerance of candidate.acqFits and follows
	n := len(pr.cands)
	fwd, bwd = make([]chainValue, n), make([]chainValue, n)
	byStart := make([]timedCand, n)  // c.start
	byAcq := make([]timedCand, 0, n) // c.start − c.acq, when the acquisition fits its dark interval
	for i := range pr.cands {
		c := &pr.cands[i]
		byStart[i] = timedCand{c.start, int32(i)}
		if c.acqFits(math.Inf(-1)) {
			byAcq = append(byAcq, timedCand{c.start - c.acq, int32(i)})
		}
	}
	other := prefixBest{}
	own := make([]prefixBest, pr.nTargets)
	addOwn := func(ti int, t topEntry) {
		own[ti].add(t)
	}

	// Forward, in increasing time: a chain ending with p is available from
	// p.end; c asks, at c.start − c.acq, for the best over other targets and,
	// at c.start, for the best of its own target over other occurrences
	// (queries eps late).
	sortTimed(byStart, false)
	sortTimed(byAcq, false)
	bestOther := make([]chainValue, n) // best predecessor over other targets
	ins, qa, qs := 0, 0, 0
	for qs < n {
		// The next event: an insertion at or before the queries' times
		// comes first.
		tq := byStart[qs].t + eps
		if qa < len(byAcq) {
			tq = math.Min(tq, byAcq[qa].t+eps)
		}
		if ins < n && pr.cands[ins].end <= tq {
			if f := fwd[ins]; f.ok {
				c := &pr.cands[ins]
				other.add(topEntry{val: f.val, key: int32(c.target), cand: int32(ins), ok: true})
				addOwn(c.target, topEntry{val: f.val, key: int32(c.occ), cand: int32(ins), ok: true})
			}
			ins++
			continue
		}
		if qa < len(byAcq) && byAcq[qa].t+eps <= byStart[qs].t+eps {
			// c can be first (its acquisition fits its dark interval) or
			// follow another target's chain.
			i := byAcq[qa].i
			c := &pr.cands[i]
			best := chainValue{ok: true, pred: -1}
			if o := other.excluding(int32(c.target)); o.ok && best.val.less(o.val) {
				best.val, best.pred = o.val, o.cand
			}
			bestOther[i] = best
			qa++
			continue
		}
		// Own-target query: after the other-target one (acq ≥ 0).
		i := byStart[qs].i
		c := &pr.cands[i]
		best := bestOther[i]
		if o := own[c.target].excluding(int32(c.occ)); o.ok && (!best.ok || best.val.less(o.val)) {
			best = chainValue{o.val, true, o.cand}
		}
		if best.ok {
			fwd[i] = chainValue{best.val.plus(c.val), true, best.pred}
		}
		qs++
	}

	// Backward, in decreasing time: a chain starting with q is available to
	// blocks of other targets ending by q.start − q.acq (when q's acquisition
	// fits its dark interval at all) and to blocks of its own target ending
	// by q.start; c asks at c.end (eps early). Insertions come first at equal
	// times.
	slices.Reverse(byStart)
	slices.Reverse(byAcq)
	other = prefixBest{}
	clear(own)
	q, ia, is := n-1, 0, 0
	for q >= 0 {
		tq := pr.cands[q].end - eps
		switch {
		case ia < len(byAcq) && byAcq[ia].t >= tq && (is >= n || byAcq[ia].t >= byStart[is].t):
			i := byAcq[ia].i
			other.add(topEntry{val: bwd[i].val, key: int32(pr.cands[i].target), cand: i, ok: true})
			ia++
		case is < n && byStart[is].t >= tq:
			i := byStart[is].i
			addOwn(pr.cands[i].target, topEntry{val: bwd[i].val, key: int32(pr.cands[i].occ), cand: i, ok: true})
			is++
		default:
			c := &pr.cands[q]
			best := score{} // c last
			if o := other.excluding(int32(c.target)); o.ok && best.less(o.val) {
				best = o.val
			}
			if o := own[c.target].excluding(int32(c.occ)); o.ok && best.less(o.val) {
				best = o.val
			}
			bwd[q] = chainValue{best.plus(c.val), true, -1}
			q--
		}
	}
	return fwd, bwd
}
