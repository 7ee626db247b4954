package planner

import (
	"cmp"
	"slices"
	"sort"
	"strconv"
	"strings"
)

// The exact night scheduler: a dynamic programme over time whose state
// remembers which "critical" goal occurrences the schedule has served while
// they can still be served again, solved by decremental state-space
// relaxation (DSSR; Righini & Salani 2008, Networks 51, 155, from memory).
//
// The sweep visits, in time order, three kinds of event for every
// candidate block d (occurrence k, target T, start s, end e, acquisition a):
// at s − a the best schedules ending by then whose last block is another
// target (the acquisition fits after them, or d is first); at s the best
// schedules ending by then whose last block is T but another occurrence (no
// acquisition); at e, d's own schedules become available to later blocks. A
// schedule's state is the set of critical occurrences it has served and whose
// last candidate has not started yet (after that an occurrence can no longer
// be served again and leaves the state). d may extend a schedule only if k
// is not in its state. Schedules with the same state and the same last
// target keep only the best value (best two over distinct last
// targets/occurrences, so that "another target" and "another occurrence"
// are always answered), so the sweep is exact for the problem in which only
// critical occurrences are limited to one block.
//
// DSSR starts with no critical occurrence (the plain relaxation), and after
// each sweep adds every occurrence the best schedule serves more than once,
// until the best schedule serves none twice: it is then optimal for the full
// problem, since each sweep solves a relaxation of it. Each round adds at
// least one occurrence, so at most one round per occurrence is needed; the
// state count is bounded by Options.MaxNodes (buckets of distinct states per
// sweep), beyond which the best feasible schedule seen is returned, not
// proven optimal, with the remaining gap.

// sweepEvent is one event of the time sweep. Kinds are ordered so that at
// equal times a block ending at t is available to a block starting at t, and
// an occurrence whose last candidate starts at t is closed only after it.
type sweepEvent struct {
	t    float64
	kind uint8 // evInsert, evQueryOther, evQuerySame, evClose
	idx  int32 // candidate (or occurrence for evClose)
}

const (
	evInsert uint8 = iota
	evQueryOther
	evQuerySame
	evClose
)

// bucket holds the best schedules with one state: the best two over distinct
// last targets, and for each target the best two over distinct last
// occurrences. Entries hold label ids. A bucket whose state loses an
// occurrence (closed) is merged into the bucket of the smaller state and
// points to it.
type bucket struct {
	state  []int32 // sorted critical occurrences
	all    prefixBest
	per    []prefixBest
	merged *bucket           // non-nil once merged away
	next   map[int32]*bucket // cache: the bucket of state ∪ {k}
}

// live follows merges to the bucket that now holds b's schedules.
func (b *bucket) live() *bucket {
	for b.merged != nil {
		b = b.merged
	}
	return b
}

// label is one schedule: its last candidate, value and the label before it.
type label struct {
	cand int32
	pred int32
	val  score
}

// pending is, for one candidate, the best predecessor found in one bucket;
// pendings of a candidate are chained through next (an index, −1 ends).
type pending struct {
	from   *bucket // nil: no predecessor (the block is first)
	val    score
	pred   int32
	next   int32
	pruned bool // dominated by another pending of the group
}

// sweepStatic is what the sweep needs that does not change between rounds:
// the events in order, each occurrence's last candidate start, and the
// grouping of candidates that share an occurrence and a start (they differ
// only in n, so their predecessors are the same: one query serves them all).
type sweepStatic struct {
	events    []sweepEvent
	lastStart []float64
	group     []int32 // candidate → its group
	nGroups   int
}

func (pr *problem) sweepStatic() *sweepStatic {
	st := &sweepStatic{lastStart: make([]float64, pr.nOcc), group: make([]int32, len(pr.cands))}
	for k := range st.lastStart {
		st.lastStart[k] = -1e300
	}
	type gkey struct {
		occ             int
		start, acq, flo float64
	}
	groups := make(map[gkey]int32, len(pr.cands)/2)
	ev := make([]sweepEvent, 0, 3*len(pr.cands)+pr.nOcc)
	for i := range pr.cands {
		c := &pr.cands[i]
		ev = append(ev, sweepEvent{c.end, evInsert, int32(i)})
		gk := gkey{c.occ, c.start, c.acq, c.acqFloor}
		g, seen := groups[gk]
		if !seen {
			g = int32(len(groups))
			groups[gk] = g
			ev = append(ev, sweepEvent{c.start, evQuerySame, int32(i)})
			if c.acqFits(-1e300) {
				ev = append(ev, sweepEvent{c.start - c.acq, evQueryOther, int32(i)})
			}
		}
		st.group[i] = g
		if c.start > st.lastStart[c.occ] {
			st.lastStart[c.occ] = c.start
		}
	}
	st.nGroups = len(groups)
	for k, t := range st.lastStart {
		ev = append(ev, sweepEvent{t, evClose, int32(k)})
	}
	slices.SortFunc(ev, func(a, b sweepEvent) int {
		switch {
		case a.t != b.t:
			return cmp.Compare(a.t, b.t)
		case a.kind != b.kind:
			return cmp.Compare(a.kind, b.kind)
		}
		return cmp.Compare(a.idx, b.idx)
	})
	st.events = ev
	return st
}

func stateKey(s []int32) string {
	var b strings.Builder
	for _, k := range s {
		b.WriteString(strconv.Itoa(int(k)))
		b.WriteByte(',')
	}
	return b.String()
}

func stateHas(s []int32, k int32) bool {
	i := sort.Search(len(s), func(i int) bool { return s[i] >= k })
	return i < len(s) && s[i] == k
}

func stateWith(s []int32, k int32) []int32 {
	i := sort.Search(len(s), func(i int) bool { return s[i] >= k })
	if i < len(s) && s[i] == k {
		return s
	}
	out := make([]int32, 0, len(s)+1)
	out = append(out, s[:i]...)
	out = append(out, k)
	return append(out, s[i:]...)
}

func stateWithout(s []int32, k int32) []int32 {
	out := make([]int32, 0, len(s))
	for _, x := range s {
		if x != k {
			out = append(out, x)
		}
	}
	return out
}

// sweepResult is one round's outcome.
type sweepResult struct {
	value   score
	chosen  []int
	buckets int
	ok      bool // false: the state count exceeded the limit
}

// sweep solves the relaxation in which only the critical occurrences are
// limited to one block (plus, for all, no two consecutive blocks of one
// occurrence). maxBuckets bounds the number of states alive at once.
func (pr *problem) sweep(st *sweepStatic, critical []bool, maxBuckets int, sc *sweepScratch) sweepResult {
	labels := sc.labels[:0]
	var buckets []*bucket // alive, in creation order (deterministic)
	byKey := map[string]*bucket{}
	closed := make([]bool, pr.nOcc)
	head := sc.head[:0]
	for range st.nGroups {
		head = append(head, -1)
	}
	checked := make([]bool, st.nGroups)
	pool := sc.pool[:0]
	defer func() { sc.labels, sc.pool, sc.head = labels[:0], pool[:0], head[:0] }()
	maxLive := 0
	getBucket := func(state []int32) *bucket {
		key := stateKey(state)
		if b, ok := byKey[key]; ok {
			return b
		}
		b := &bucket{state: state, per: make([]prefixBest, pr.nTargets)}
		byKey[key] = b
		buckets = append(buckets, b)
		maxLive = max(maxLive, len(buckets))
		return b
	}
	root := getBucket(nil)
	addPending := func(g int32, from *bucket, val score, pred int32) {
		for j := head[g]; j >= 0; j = pool[j].next {
			if pool[j].from == from {
				if pool[j].val.less(val) {
					pool[j].val, pool[j].pred = val, pred
				}
				return
			}
		}
		pool = append(pool, pending{from: from, val: val, pred: pred, next: head[g]})
		head[g] = int32(len(pool) - 1)
	}
	for _, e := range st.events {
		switch e.kind {
		case evQueryOther, evQuerySame:
			c := &pr.cands[e.idx]
			g := st.group[e.idx]
			k := int32(c.occ)
			if e.kind == evQueryOther {
				addPending(g, nil, score{}, -1)
			}
			for _, b := range buckets {
				if critical[c.occ] && stateHas(b.state, k) {
					continue
				}
				var t topEntry
				if e.kind == evQueryOther {
					t = b.all.excluding(int32(c.target))
				} else {
					t = b.per[c.target].excluding(int32(c.occ))
				}
				if t.ok {
					addPending(g, b, t.val, t.cand)
				}
			}
		case evInsert:
			c := &pr.cands[e.idx]
			g := st.group[e.idx]
			k := int32(c.occ)
			if !checked[g] {
				checked[g] = true
				prunePending(pool, head[g], root)
			}
			for j := head[g]; j >= 0; j = pool[j].next {
				p := &pool[j]
				if p.pruned {
					continue
				}
				b := root
				if p.from != nil {
					b = p.from.live()
				}
				if critical[c.occ] && !closed[c.occ] {
					nb, ok := b.next[k]
					if !ok || nb.merged != nil {
						nb = getBucket(stateWith(b.state, k))
						if b.next == nil {
							b.next = map[int32]*bucket{}
						}
						b.next[k] = nb
					}
					b = nb
				}
				v := p.val.plus(c.val)
				id := int32(len(labels))
				labels = append(labels, label{cand: e.idx, pred: p.pred, val: v})
				b.all.add(topEntry{val: v, key: int32(c.target), cand: id, ok: true})
				b.per[c.target].add(topEntry{val: v, key: int32(c.occ), cand: id, ok: true})
			}
			if len(buckets) > maxBuckets {
				return sweepResult{buckets: maxLive}
			}
		case evClose:
			k := e.idx
			closed[k] = true
			if !critical[k] {
				continue
			}
			n := len(buckets)
			for bi := 0; bi < n; bi++ {
				b := buckets[bi]
				if b.merged != nil || !stateHas(b.state, k) {
					continue
				}
				to := getBucket(stateWithout(b.state, k))
				mergeBest(&to.all, &b.all)
				for t := range to.per {
					mergeBest(&to.per[t], &b.per[t])
				}
				b.merged = to
				delete(byKey, stateKey(b.state))
			}
			buckets = slices.DeleteFunc(buckets, func(b *bucket) bool { return b.merged != nil })
		}
	}
	var best topEntry
	for _, b := range buckets {
		if b.all.a.ok && (!best.ok || best.val.less(b.all.a.val)) {
			best = b.all.a
		}
	}
	res := sweepResult{ok: true, buckets: maxLive}
	if !best.ok {
		return res
	}
	res.value = best.val
	for id := best.cand; id >= 0; id = labels[id].pred {
		res.chosen = append(res.chosen, int(labels[id].cand))
	}
	slices.Reverse(res.chosen)
	return res
}

// sweepScratch holds buffers reused across rounds.
type sweepScratch struct {
	labels []label
	pool   []pending
	head   []int32
}

// prunePending marks the pendings of a group that another pending
// dominates: a subset state (after following merges) with at least the
// value. The first of equals is kept.
func prunePending(pool []pending, head int32, root *bucket) {
	stateOf := func(p *pending) []int32 {
		if p.from == nil {
			return nil
		}
		return p.from.live().state
	}
	for i := head; i >= 0; i = pool[i].next {
		pi := &pool[i]
		si := stateOf(pi)
		for j := head; j >= 0; j = pool[j].next {
			if i == j || pool[j].pruned {
				continue
			}
			pj := &pool[j]
			if pj.val.less(pi.val) || !subset(stateOf(pj), si) {
				continue
			}
			if pi.val.less(pj.val) || len(stateOf(pj)) < len(si) || j > i {
				pi.pruned = true
				break
			}
		}
	}
}

// subset reports whether sorted a ⊆ sorted b.
func subset(a, b []int32) bool {
	j := 0
	for _, x := range a {
		for j < len(b) && b[j] < x {
			j++
		}
		if j == len(b) || b[j] != x {
			return false
		}
	}
	return true
}

// mergeBest merges b's two entries into a.
func mergeBest(a *prefixBest, b *prefixBest) {
	if b.a.ok {
		a.add(b.a)
	}
	if b.b.ok {
		a.add(b.b)
	}
}

// solve maximises the objective (see the notes in schedule.go and above):
// DSSR rounds until the best schedule serves no occurrence twice. incumbent
// (e.g. the greedy schedule, may be nil) is returned if the state limit
// stops the search before anything better is proven.
func (pr *problem) solve(incumbent []int, maxBuckets int) solution {
	best := solution{}
	if pr.feasible(incumbent) {
		best = solution{chosen: incumbent, value: pr.value(incumbent)}
	}
	st := pr.sweepStatic()
	critical := make([]bool, pr.nOcc)
	var bound score
	var sc sweepScratch
	for round := 1; ; round++ {
		res := pr.sweep(st, critical, maxBuckets, &sc)
		best.nodes = round
		best.states = max(best.states, res.buckets)
		if !res.ok {
			best.gap = bound.minus(best.value)
			return best
		}
		bound = res.value
		if r := pr.repair(res.chosen); best.value.less(pr.value(r)) {
			best.chosen, best.value = r, pr.value(r)
		}
		seen := make(map[int]int, len(res.chosen))
		added := false
		for _, i := range res.chosen {
			occ := pr.cands[i].occ
			seen[occ]++
			if seen[occ] == 2 && !critical[occ] {
				critical[occ] = true
				added = true
			}
		}
		if !added {
			if !pr.feasible(res.chosen) {
				// Cannot happen: critical occurrences are never repeated.
				best.gap = bound.minus(best.value)
				return best
			}
			// No occurrence served twice: the relaxation's optimum is
			// feasible, hence optimal.
			best.chosen, best.value, best.optimal = res.chosen, res.value, true
			return best
		}
	}
}
