package planner

import (
	"cmp"
	"math"
	"slices"
	"sort"
)

// The night schedule as an optimisation problem.
//
// Candidates. For every occurrence of every phase goal (one orbital cycle's
// window) the planner lists candidate blocks: starts at every multiple of
// Options.StepS in UTC (whole minutes by default), at the earliest whole
// second the window allows (first exposure's mid-time at its opening) and,
// for each n, at the latest (last mid-time at its close); every exposure
// count n from 1 to N wanted (Goal.Wanted: NExposures, or by default the
// exposures that cover the window once, or for "as many as fit" the window's
// capacity C) such that the whole block lies inside one observable interval
// (1 s inside its edges) and every exposure's mid-time inside the window. No
// start depends on the constraints, so relaxing one only adds candidates.
//
// Objective. A schedule's value is a vector with one level per priority,
//
//	V_p = Σ over the blocks of priority p of w(p) × v(goal, n),
//	w(p) = 3^(5−p) (81, 27, 9, 3, 1),  v(goal, n) = ½ + ½ × min(n, N)/N,
//
// and T_p = −Σ 1000·(X−1) over the priority-p blocks' exposures (X the
// airmass at each block's middle), compared lexicographically: V_1, then
// T_1, then V_2, T_2, … V_5, T_5; the schedule with the larger vector wins
// (then the stable order of the candidates, earlier ends first). Priorities
// are therefore strict: no gain at priority p+1 or below outweighs any loss
// at priority p, and adding a lower-priority target never takes time from a
// higher one. Within a priority, reaching a goal window is worth half and
// the exposures up to N the other half; each occurrence of a goal counts on
// its own. Values are integers (v in millionths) so sums are exact. The run
// planner's nights (nightModel, strict false) put every goal on one level
// with its own weight.
//
// Subject to: blocks do not overlap; before a block whose predecessor is a
// different target, or before the first block, the target's acquisition
// overhead is charged, and it must lie in the block's dark interval; at most
// one block per goal occurrence.
//
// Method. Vectors under componentwise addition and lexicographic order form
// an ordered abelian group (a ≤ b implies a + c ≤ b + c), which is all that
// Bellman's principle needs: every step of the dynamic programme below keeps,
// per state, the best value, and a best schedule's prefix is a best prefix,
// exactly as with numbers. So the method, and its proof of optimality, is
// unchanged from one level to five.
//
// Without the last rule the problem is a weighted interval
// scheduling with a setup time that depends on the previous target, solved
// exactly by dynamic programming over time. With it, it is a job-interval
// selection problem (NP-hard in general). The relaxation's optimum tends to
// collect the "reached" half of a goal's value several times by returning to
// the same window around other blocks (A X A), so a branch and bound on it
// needs exponentially many branches (tried: 20 000 branches did not close a
// 30-target night). Instead the state of the dynamic programme remembers the
// occurrences already served while they can still be served again, for a
// growing set of critical occurrences: decremental state-space relaxation,
// in sweep.go. The result is optimal; a state limit (Options.MaxStates)
// stops pathological cases with the best feasible schedule found (Optimal
// false, with a warning).

// levels is the number of priority levels of the objective (priorities 1..5).
const levels = 5

// score is an objective value, compared lexicographically: the value of the
// priority-1 blocks first, then their airmass tie-breaker, then priority 2's
// value and tie-breaker, and so on (main[l] and tie[l] hold level l,
// priority l+1). All are integers so that sums are exact and the same input
// always compares the same way. Scores form an ordered abelian group
// (componentwise sum, lexicographic order), which is all the dynamic
// programme needs to be exact.
type score struct{ main, tie [levels]int64 }

func (a score) plus(b score) score {
	for l := range levels {
		a.main[l] += b.main[l]
		a.tie[l] += b.tie[l]
	}
	return a
}

func (a score) minus(b score) score {
	for l := range levels {
		a.main[l] -= b.main[l]
		a.tie[l] -= b.tie[l]
	}
	return a
}

func (a score) less(b score) bool {
	for l := range levels {
		switch {
		case a.main[l] != b.main[l]:
			return a.main[l] < b.main[l]
		case a.tie[l] != b.tie[l]:
			return a.tie[l] < b.tie[l]
		}
	}
	return false
}

// total is the sum of the levels' main values (each already weighted by
// its priority weight): the single figure Plan.Value reports.
func (a score) total() int64 {
	var s int64
	for _, v := range a.main {
		s += v
	}
	return s
}

// leading returns the first level whose main value is not zero, and that
// value (−1, 0 for none): how a gap between two scores is reported.
func (a score) leading() (int, int64) {
	for l, v := range a.main {
		if v != 0 {
			return l, v
		}
	}
	return -1, 0
}

// tieLevel returns the level holding a candidate's tie-breaker (its only
// non-zero level; 0 when all are zero).
func (a score) tieLevel() int {
	for l := range levels {
		if a.main[l] != 0 || a.tie[l] != 0 {
			return l
		}
	}
	return 0
}

// Objective is a night plan's objective value by priority: Value[p−1] the
// priority-weighted goal value of the priority-p blocks (millionths), Tie[p−1]
// their airmass tie-breaker (−Σ 1000·(X−1) over their exposures). Plans
// compare with Less: Value[0], then Tie[0], then Value[1], and so on.
type Objective struct{ Value, Tie [levels]int64 }

// Less reports whether o ranks below b in that order.
func (o Objective) Less(b Objective) bool {
	return score{o.Value, o.Tie}.less(score{b.Value, b.Tie})
}

func (a score) objective() Objective { return Objective{a.main, a.tie} }

// at returns a score with main value v and tie-breaker tie at level l.
func at(l int, v, tie int64) score {
	var s score
	s.main[l], s.tie[l] = v, tie
	return s
}

// candidate is one possible exposure block on the planner's time axis (Unix
// seconds, UTC).
type candidate struct {
	start, end float64
	acq        float64 // acquisition overhead charged before it after another target, s
	acqFloor   float64 // earliest start of that acquisition (its dark interval's start)
	target     int
	occ        int
	n          int
	val        score
}

// acqFits reports whether c's acquisition can be charged after an instant
// prev (the end of a different target's block, or −Inf for none).
func (c *candidate) acqFits(prev float64) bool {
	const eps = 1e-6
	return c.start-c.acq >= math.Max(prev, c.acqFloor)-eps
}

// follows reports whether c may come directly after p (p nil: c is first).
func (c *candidate) follows(p *candidate) bool {
	if p == nil {
		return c.acqFits(math.Inf(-1))
	}
	if p.target == c.target {
		return c.start >= p.end-1e-6
	}
	return c.acqFits(p.end)
}

// problem is a night's scheduling problem: candidates sorted by end time
// (then start, target, occurrence, n: a stable order), with the number of
// targets and occurrences.
type problem struct {
	cands    []candidate
	nTargets int
	nOcc     int
}

func sortCandidates(cs []candidate) {
	type key struct {
		end, start float64
		i          int32
	}
	keys := make([]key, len(cs))
	for i := range cs {
		keys[i] = key{cs[i].end, cs[i].start, int32(i)}
	}
	slices.SortFunc(keys, func(a, b key) int {
		switch {
		case a.end != b.end:
			return cmp.Compare(a.end, b.end)
		case a.start != b.start:
			return cmp.Compare(a.start, b.start)
		}
		ca, cb := &cs[a.i], &cs[b.i]
		switch {
		case ca.target != cb.target:
			return cmp.Compare(ca.target, cb.target)
		case ca.occ != cb.occ:
			return cmp.Compare(ca.occ, cb.occ)
		case ca.n != cb.n:
			return cmp.Compare(ca.n, cb.n)
		}
		return cmp.Compare(a.i, b.i)
	})
	out := make([]candidate, len(cs))
	for i, k := range keys {
		out[i] = cs[k.i]
	}
	copy(cs, out)
}

// topEntry is a running best: value, key (target or occurrence), the label
// achieving it, and whether it is set.
type topEntry struct {
	val  score
	key  int32
	cand int32
	ok   bool
}

// prefixBest is the best two entries with distinct keys.
type prefixBest struct {
	a, b topEntry
}

// add merges t in place.
func (p *prefixBest) add(t topEntry) {
	switch {
	case !p.a.ok:
		p.a = t
	case t.key == p.a.key:
		if p.a.val.less(t.val) {
			p.a = t
		}
	case p.a.val.less(t.val):
		p.b, p.a = p.a, t
	case !p.b.ok || p.b.val.less(t.val):
		p.b = t
	}
}

// excluding returns the best entry whose key is not key (ok false if none).
func (p *prefixBest) excluding(key int32) topEntry {
	if p.a.ok && p.a.key != key {
		return p.a
	}
	return p.b
}

// value returns the summed value of a schedule.
func (pr *problem) value(chosen []int) score {
	var s score
	for _, i := range chosen {
		s = s.plus(pr.cands[i].val)
	}
	return s
}

// feasible reports whether the chosen candidates (in time order) form a valid
// schedule: each follows its predecessor, one block per occurrence.
func (pr *problem) feasible(chosen []int) bool {
	seen := make(map[int]bool, len(chosen))
	var prev *candidate
	for _, i := range chosen {
		c := &pr.cands[i]
		if seen[c.occ] || !c.follows(prev) {
			return false
		}
		seen[c.occ] = true
		prev = c
	}
	return true
}

// repair turns a relaxed schedule into a feasible one: it keeps each
// occurrence's most valuable block, then drops, in time order, any block that
// can no longer follow the block kept before it.
func (pr *problem) repair(chosen []int) []int {
	best := make(map[int]int, len(chosen))
	for _, i := range chosen {
		occ := pr.cands[i].occ
		if j, ok := best[occ]; !ok || pr.cands[j].val.less(pr.cands[i].val) {
			best[occ] = i
		}
	}
	var out []int
	var prev *candidate
	for _, i := range chosen {
		c := &pr.cands[i]
		if best[c.occ] != i || !c.follows(prev) {
			continue
		}
		out = append(out, i)
		prev = c
	}
	return out
}

// solution is a solved schedule: chosen candidates in time order, its value,
// whether it is proven optimal, the bound gap otherwise, the number of DSSR
// rounds and the largest number of states alive in one sweep.
type solution struct {
	chosen  []int
	value   score
	optimal bool
	gap     score
	nodes   int
	states  int
}

// greedy is the baseline the optimiser is tested against: occurrences in
// order of priority (then window start), each given the earliest-starting,
// then longest, candidate that fits between the blocks already placed.
// order lists the occurrences in that order.
func (pr *problem) greedy(order []int) []int {
	byOcc := make([][]int, pr.nOcc)
	for i := range pr.cands {
		byOcc[pr.cands[i].occ] = append(byOcc[pr.cands[i].occ], i)
	}
	var placed []int // in time order
	for _, occ := range order {
		idx := byOcc[occ]
		slices.SortStableFunc(idx, func(a, b int) int {
			ca, cb := &pr.cands[a], &pr.cands[b]
			if ca.start != cb.start {
				return cmp.Compare(ca.start, cb.start)
			}
			return cmp.Compare(cb.n, ca.n)
		})
		for _, i := range idx {
			c := &pr.cands[i]
			pos := sort.Search(len(placed), func(k int) bool { return pr.cands[placed[k]].start >= c.start })
			var prev, next *candidate
			if pos > 0 {
				prev = &pr.cands[placed[pos-1]]
			}
			if pos < len(placed) {
				next = &pr.cands[placed[pos]]
			}
			if !c.follows(prev) || (next != nil && !next.follows(c)) {
				continue
			}
			placed = append(placed, 0)
			copy(placed[pos+1:], placed[pos:])
			placed[pos] = i
			break
		}
	}
	return placed
}
