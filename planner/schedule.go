package planner

import (
	"container/heap"
	"math"
	"sort"
)

// The night schedule as an optimisation problem.
//
// Candidates. For every occurrence of every phase goal (one orbital cycle's
// window, intersected with the target's observable intervals) the planner
// lists candidate blocks: start instants on a grid of whole minutes of UTC
// (Options.StepS) plus the earliest and latest starts the window allows,
// with every exposure count n that fits (1 … N wanted, or 1 … the window's
// capacity for "as many as fit").
//
// Objective. Maximise Σ value(b) over the chosen blocks, where
//
//	value(b) = w(priority) × v(goal, n),   w(p) = 3^(5−p)   (81, 27, 9, 3, 1)
//	v(goal, n) = ½ + ½ × min(n, N)/N                          (N wanted)
//	v(goal, n) = ½ + ½ × n/C                                  ("as many as fit")
//
// with C the window's capacity (exposures whose mid-times fit in the phase
// window). Reaching a goal at all is worth half of it, every further exposure
// up to N the rest, so one priority-p goal outweighs two priority-(p+1)
// goals but not three. Values are integers (v in millionths) so sums are
// exact. Ties are broken by a second, lexicographically weaker score: fewer
// airmass-excess exposures (−Σ 1000·(X−1) at each block's middle), and then by
// the stable order of the candidates (earlier ends first).
//
// Subject to: blocks do not overlap; before a block whose predecessor is a
// different target, or before the first block, the target's acquisition
// overhead is charged, and it must lie in the same dark interval; at most one
// block per goal occurrence.
//
// Method. Without the last rule the problem is a weighted interval
// scheduling with a setup time that depends on the previous target; it is
// solved exactly by dynamic programming over the candidates in order of end
// time, the state being the last block (its target decides the setup, its
// occurrence forbids serving that occurrence twice in a row). The DP value is
// therefore an upper bound, and the DP is exact whenever its schedule serves
// each occurrence at most once. Otherwise best-first branch and bound: when
// the DP schedule serves occurrence k with blocks b1 < b2, branch into (A)
// k's blocks must start before b1 ends and (B) k's blocks must start at or
// after b1's end. The two branches partition every feasible schedule and each
// excludes the DP schedule; each branch's DP value bounds it. The search stops
// when the best feasible schedule found is worth at least every open bound
// (optimal), or after Options.MaxNodes branches (then the best feasible
// schedule is returned with Optimal = false and the remaining gap).

// score is an objective value: main (priority-weighted goal value) compared
// first, tie second. Both are integers so that sums are exact and the same
// input always compares the same way.
type score struct{ main, tie int64 }

func (a score) plus(b score) score { return score{a.main + b.main, a.tie + b.tie} }

func (a score) less(b score) bool {
	return a.main < b.main || (a.main == b.main && a.tie < b.tie)
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
	sort.SliceStable(cs, func(i, j int) bool {
		a, b := &cs[i], &cs[j]
		if a.end != b.end {
			return a.end < b.end
		}
		if a.start != b.start {
			return a.start < b.start
		}
		if a.target != b.target {
			return a.target < b.target
		}
		if a.occ != b.occ {
			return a.occ < b.occ
		}
		return a.n < b.n
	})
}

// topEntry is a running best: value, key (target or occurrence) and the
// candidate achieving it.
type topEntry struct {
	val  score
	key  int
	cand int
	ok   bool
}

// prefixBest is the best two entries with distinct keys among the candidates
// ending at or before end.
type prefixBest struct {
	end  float64
	a, b topEntry
}

func (p prefixBest) with(t topEntry) prefixBest {
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
	return p
}

func (p prefixBest) excluding(key int) topEntry {
	if p.a.ok && p.a.key != key {
		return p.a
	}
	return p.b
}

type prefixList []prefixBest

// upTo returns the running best over entries ending at or before x.
func (l prefixList) upTo(x float64) (prefixBest, bool) {
	i := sort.Search(len(l), func(i int) bool { return l[i].end > x+1e-6 })
	if i == 0 {
		return prefixBest{}, false
	}
	return l[i-1], true
}

func (l prefixList) push(end float64, t topEntry) prefixList {
	var p prefixBest
	if n := len(l); n > 0 {
		p = l[n-1]
	}
	p.end = end
	return append(l, p.with(t))
}

// window restricts the starts of one occurrence's blocks to [lo, hi).
type window struct{ lo, hi float64 }

// dpScratch holds the DP's working arrays, reused across branch-and-bound
// nodes.
type dpScratch struct {
	val       []score
	pred      []int
	perTarget []prefixList
	global    prefixList
}

// solveRelaxed solves the problem without the one-block-per-occurrence rule,
// with occurrence k's starts restricted to allow[k] (nil: no restriction). It
// returns the best value and the chosen candidates in time order.
func (pr *problem) solveRelaxed(allow []window, s *dpScratch) (score, []int) {
	n := len(pr.cands)
	if cap(s.val) < n {
		s.val = make([]score, n)
		s.pred = make([]int, n)
	}
	s.val, s.pred = s.val[:n], s.pred[:n]
	if len(s.perTarget) < pr.nTargets {
		s.perTarget = make([]prefixList, pr.nTargets)
	}
	for i := range s.perTarget {
		s.perTarget[i] = s.perTarget[i][:0]
	}
	s.global = s.global[:0]
	for i := range pr.cands {
		c := &pr.cands[i]
		if allow != nil {
			w := allow[c.occ]
			if c.start < w.lo || c.start >= w.hi {
				continue
			}
		}
		best := topEntry{}
		if c.acqFits(math.Inf(-1)) {
			best = topEntry{val: score{}, cand: -1, ok: true}
		}
		if p, ok := s.perTarget[c.target].upTo(c.start); ok {
			if t := p.excluding(c.occ); t.ok && (!best.ok || best.val.less(t.val)) {
				best = t
			}
		}
		if x := c.start - c.acq; c.acqFits(math.Inf(-1)) {
			if p, ok := s.global.upTo(x); ok {
				if t := p.excluding(c.target); t.ok && (!best.ok || best.val.less(t.val)) {
					best = t
				}
			}
		}
		if !best.ok {
			continue
		}
		v := best.val.plus(c.val)
		s.val[i], s.pred[i] = v, best.cand
		s.perTarget[c.target] = s.perTarget[c.target].push(c.end, topEntry{val: v, key: c.occ, cand: i, ok: true})
		s.global = s.global.push(c.end, topEntry{val: v, key: c.target, cand: i, ok: true})
	}
	if len(s.global) == 0 {
		return score{}, nil
	}
	last := s.global[len(s.global)-1].a
	var chosen []int
	for i := last.cand; i >= 0; i = s.pred[i] {
		chosen = append(chosen, i)
	}
	for l, r := 0, len(chosen)-1; l < r; l, r = l+1, r-1 {
		chosen[l], chosen[r] = chosen[r], chosen[l]
	}
	return last.val, chosen
}

// firstRepeat returns the first pair of chosen candidates (in time order)
// serving the same occurrence, or ok false.
func (pr *problem) firstRepeat(chosen []int) (b1, b2 int, ok bool) {
	seen := make(map[int]int, len(chosen))
	for _, i := range chosen {
		occ := pr.cands[i].occ
		if j, dup := seen[occ]; dup {
			return j, i, true
		}
		seen[occ] = i
	}
	return 0, 0, false
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

// bbNode is one branch: occurrence start restrictions, its DP bound and
// schedule.
type bbNode struct {
	id     int
	allow  []window
	bound  score
	chosen []int
}

type bbHeap []*bbNode

func (h bbHeap) Len() int { return len(h) }
func (h bbHeap) Less(i, j int) bool {
	if h[i].bound != h[j].bound {
		return h[j].bound.less(h[i].bound)
	}
	return h[i].id < h[j].id
}
func (h bbHeap) Swap(i, j int) { h[i], h[j] = h[j], h[i] }
func (h *bbHeap) Push(x any)   { *h = append(*h, x.(*bbNode)) }
func (h *bbHeap) Pop() any {
	old := *h
	n := old[len(old)-1]
	*h = old[:len(old)-1]
	return n
}

// solution is a solved schedule: chosen candidates in time order, its value,
// whether it is proven optimal, the bound gap otherwise, and the number of
// branch-and-bound nodes explored.
type solution struct {
	chosen  []int
	value   score
	optimal bool
	gap     score
	nodes   int
}

// solve maximises the objective exactly by branch and bound over the DP
// relaxation (see the comment at the top of this file), starting from the
// incumbent given (for example the greedy schedule; may be nil).
func (pr *problem) solve(incumbent []int, maxNodes int) solution {
	var s dpScratch
	best := solution{chosen: incumbent, value: pr.value(incumbent)}
	if !pr.feasible(incumbent) {
		best = solution{}
	}
	root := &bbNode{id: 0}
	root.bound, root.chosen = pr.solveRelaxed(nil, &s)
	h := &bbHeap{root}
	nextID := 1
	for h.Len() > 0 {
		nd := heap.Pop(h).(*bbNode)
		best.nodes++
		if !best.value.less(nd.bound) {
			best.optimal = true
			return best
		}
		b1, _, dup := pr.firstRepeat(nd.chosen)
		if !dup {
			best.chosen, best.value, best.optimal = nd.chosen, nd.bound, true
			return best
		}
		if r := pr.repair(nd.chosen); best.value.less(pr.value(r)) {
			best.chosen, best.value = r, pr.value(r)
		}
		if best.nodes >= maxNodes {
			best.gap = score{nd.bound.main - best.value.main, nd.bound.tie - best.value.tie}
			return best
		}
		occ := pr.cands[b1].occ
		p := pr.cands[b1].end
		base := nd.allow
		if base == nil {
			base = make([]window, pr.nOcc)
			for k := range base {
				base[k] = window{math.Inf(-1), math.Inf(1)}
			}
		}
		for _, w := range [2]window{
			{base[occ].lo, math.Min(base[occ].hi, p)}, // (A) start before b1 ends
			{math.Max(base[occ].lo, p), base[occ].hi}, // (B) start at or after b1's end
		} {
			allow := append([]window(nil), base...)
			allow[occ] = w
			child := &bbNode{id: nextID, allow: allow}
			nextID++
			child.bound, child.chosen = pr.solveRelaxed(allow, &s)
			if best.value.less(child.bound) {
				heap.Push(h, child)
			}
		}
	}
	best.optimal = true
	return best
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
		sort.SliceStable(idx, func(a, b int) bool {
			ca, cb := &pr.cands[idx[a]], &pr.cands[idx[b]]
			if ca.start != cb.start {
				return ca.start < cb.start
			}
			return ca.n > cb.n
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
