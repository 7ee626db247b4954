package planner

import (
	"cmp"
	"math"
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

// Slews (Options.Telescope). The time charged before a block d after a
// block p of another target is then σ(p, d), the slew from p's pointing at
// its end to d's at its start (SlewTime, the azimuth axis at the fixed
// wrap positions of engine.withSlew), a function of the two candidates
// alone; the first block is charged settling and acquisition, σmin, and
// σmin ≤ σ(p, d) ≤ σmax(d) = d.acqMax for every p (setSlewBounds). The
// state a schedule needs is then (critical set, last block), and d's query
// for other-target predecessors is answered exactly in two parts, per
// bucket: (i) at d.start − σmax(d), made only when that is not before d's
// acquisition floor: every schedule ending by then has σ(p, d) ≤ σmax(d),
// so d fits after each of them, and their last block no longer matters:
// the bucket's best over other targets, as above, is their best; (ii) at
// d.start (recentPredecessors), every schedule ending in (d.start −
// σmax(d), d.start − σmin] (all ending by d.start − σmin when (i) was not
// made) is checked with its own σ(p, d) and the floor, and the best that
// fits is taken; a schedule ending later cannot precede d, since no slew
// is shorter than σmin. Each schedule d may follow lies in (i) or (ii) and
// is considered, and each considered one is one d may follow, so every
// bucket's best predecessor of d is exact. Labels are never discarded
// (part (ii) reads them one by one in order of their ends, from the label
// list), so the extension of the state by the last block costs no
// enumeration of states, and Bellman's principle holds as before: a
// schedule's continuations depend on its past only through its state and
// its last block. The same-target query, the acquisition-free rule between
// blocks of one target and the DSSR rounds are unchanged, so the proof of
// exactness below carries over; TestSlewSolveMatchesBruteForce checks it
// against exhaustive search.

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
//
// per is sparse: a target's entry is a slot of the sweep's slab
// (sweepScratch.per), created when the bucket first holds a schedule ending
// with that target, so a bucket costs memory for the targets it has seen,
// not for all of them. stamp and stampAt index the pending list of the
// group being queried (see sweep's addPending).
type bucket struct {
	state   []int32 // sorted critical occurrences
	all     prefixBest
	per     map[int32]int32   // target → slot in the slab
	merged  *bucket           // non-nil once merged away
	next    map[int32]*bucket // cache: the bucket of state ∪ {k}
	stamp   int32             // query event that last indexed this bucket
	stampAt int32             // its pending in that event's group
	// q is scratch of one recentPredecessors query (stamp: which one).
	q struct {
		stamp int32
		val   score
		pred  int32
		found bool
	}
}

// live follows merges to the bucket that now holds b's schedules.
func (b *bucket) live() *bucket {
	for b.merged != nil {
		b = b.merged
	}
	return b
}

// label is one schedule: its last candidate, the label before it, its value
// and, on a night with a telescope, its bucket (recentPredecessors reads
// labels one by one, so it needs both from the label itself).
type label struct {
	cand int32
	pred int32
	val  score
	bk   *bucket // the bucket it was put in (nil without a telescope); follow live()
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
			switch {
			case c.pt != nil:
				if c.fitsAfter(-1e300, c.acqMax) {
					ev = append(ev, sweepEvent{c.start - c.acqMax, evQueryOther, int32(i)})
				}
			case c.acqFits(-1e300):
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
	sc.size(len(pr.cands), st.nGroups, pr.nTargets)
	labels, pool, slab := sc.labels[:0], sc.pool[:0], sc.per[:0]
	var buckets []*bucket // alive, in creation order (deterministic)
	byKey := map[string]*bucket{}
	closed := make([]bool, pr.nOcc)
	head := sc.head[:0]
	for range st.nGroups {
		head = append(head, -1)
	}
	checked := make([]bool, st.nGroups)
	defer func() { sc.labels, sc.pool, sc.head, sc.per = labels[:0], pool[:0], head[:0], slab[:0] }()
	maxLive := 0
	getBucket := func(state []int32) *bucket {
		key := stateKey(state)
		if b, ok := byKey[key]; ok {
			return b
		}
		b := &bucket{state: state, stamp: -1}
		byKey[key] = b
		buckets = append(buckets, b)
		maxLive = max(maxLive, len(buckets))
		return b
	}
	// perOf returns b's best pair for target t (nil: none yet); perAdd
	// creates the slot on first use.
	perOf := func(b *bucket, t int32) *prefixBest {
		if i, ok := b.per[t]; ok {
			return &slab[i]
		}
		return nil
	}
	perAdd := func(b *bucket, t int32) *prefixBest {
		if i, ok := b.per[t]; ok {
			return &slab[i]
		}
		if b.per == nil {
			b.per = map[int32]int32{}
		}
		b.per[t] = int32(len(slab))
		slab = append(slab, prefixBest{})
		return &slab[len(slab)-1]
	}
	root := getBucket(nil)
	// addPending keeps, per group and per source bucket, the best pending.
	// The group's list is indexed once per query event (stamp): each bucket
	// in it records its pending's position, the first-block pending (nil
	// source) is held in nilAt, so an insert finds its entry at once where a
	// search of the list would.
	stamp, nilAt := int32(-1), int32(-1)
	indexGroup := func(g int32) {
		stamp++
		nilAt = -1
		for j := head[g]; j >= 0; j = pool[j].next {
			if f := pool[j].from; f == nil {
				nilAt = j
			} else {
				f.stamp, f.stampAt = stamp, j
			}
		}
	}
	addPending := func(g int32, from *bucket, val score, pred int32) {
		j := int32(-1)
		switch {
		case from == nil:
			j = nilAt
		case from.stamp == stamp:
			j = from.stampAt
		}
		if j >= 0 {
			if pool[j].val.less(val) {
				pool[j].val, pool[j].pred = val, pred
			}
			return
		}
		pool = append(pool, pending{from: from, val: val, pred: pred, next: head[g]})
		j = int32(len(pool) - 1)
		head[g] = j
		if from == nil {
			nilAt = j
		} else {
			from.stamp, from.stampAt = stamp, j
		}
	}
	var serial int32
	// current is from's pending in group g, indexed by this event's
	// indexGroup(g) or added since (as addPending finds it).
	current := func(g int32, from *bucket) (score, bool) {
		if from.stamp == stamp {
			return pool[from.stampAt].val, true
		}
		return score{}, false
	}
	for _, e := range st.events {
		switch e.kind {
		case evQueryOther, evQuerySame:
			c := &pr.cands[e.idx]
			g := st.group[e.idx]
			k := int32(c.occ)
			indexGroup(g)
			if e.kind == evQueryOther {
				addPending(g, nil, score{}, -1)
			}
			if e.kind == evQuerySame && c.pt != nil {
				serial++
				pr.recentPredecessors(c, g, labels, critical, serial, current, addPending)
			}
			for _, b := range buckets {
				if critical[c.occ] && stateHas(b.state, k) {
					continue
				}
				var t topEntry
				if e.kind == evQueryOther {
					t = b.all.excluding(int32(c.target))
				} else if pb := perOf(b, int32(c.target)); pb != nil {
					t = pb.excluding(int32(c.occ))
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
				sc.order = prunePending(pool, head[g], sc.order[:0])
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
				if c.pt != nil {
					labels[id].bk = b
				}
				b.all.add(topEntry{val: v, key: int32(c.target), cand: id, ok: true})
				perAdd(b, int32(c.target)).add(topEntry{val: v, key: int32(c.occ), cand: id, ok: true})
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
				// Each target's pair merges on its own, so the map's
				// order does not matter.
				for t, i := range b.per {
					dst := perAdd(to, t) // may move the slab
					mergeBest(dst, &slab[i])
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

// recentPredecessors adds, on a night with a telescope, the pendings of
// candidate c (group g) that the other-target query at c.start − c.acqMax
// cannot see: in every bucket that c may extend, the best schedule whose
// last block is of another target and ends after that instant (all
// schedules when the query was not made: the longest slew would not fit the
// dark interval), among those from whose end the exact slew to c's start
// fits (candidate.follows); and c as the first block when its acquisition
// fits and the query was not made. Schedules ending after c.start − c.acq
// cannot precede c (no slew is shorter) and are not looked at. labels are
// in order of their blocks' ends (they are made at the ends, in time
// order); serial numbers the query (bucket.q).
func (pr *problem) recentPredecessors(c *candidate, g int32, labels []label, critical []bool, serial int32,
	current func(g int32, from *bucket) (score, bool), addPending func(g int32, from *bucket, val score, pred int32)) {
	lo := math.Inf(-1)
	if c.fitsAfter(-1e300, c.acqMax) {
		lo = c.start - c.acqMax
	} else if c.acqFits(-1e300) {
		addPending(g, nil, score{}, -1)
	}
	hi := c.start - c.acq + 1e-6
	k := int32(c.occ)
	var touched []*bucket
	i := sort.Search(len(labels), func(i int) bool { return pr.cands[labels[i].cand].end > lo })
	for ; i < len(labels); i++ {
		l := &labels[i]
		p := &pr.cands[l.cand]
		if p.end > hi {
			break
		}
		if p.target == c.target {
			continue
		}
		b := l.bk.live()
		if b.q.stamp != serial {
			if critical[c.occ] && stateHas(b.state, k) {
				b.q.stamp, b.q.found, b.q.pred = serial, true, -2 // c may not extend b
				b.q.val = score{}
				continue
			}
			b.q.val, b.q.found = current(g, b)
			b.q.stamp, b.q.pred = serial, -1
			touched = append(touched, b)
		}
		// Only a schedule better than the bucket's best pending so far
		// can change it: the slew is worked out for those alone.
		if b.q.pred == -2 || (b.q.found && !b.q.val.less(l.val)) || !c.fitsAfter(p.end, c.setupAfter(p)) {
			continue
		}
		b.q.val, b.q.found, b.q.pred = l.val, true, int32(i)
	}
	for _, b := range touched {
		if b.q.pred >= 0 {
			addPending(g, b, b.q.val, b.q.pred)
		}
	}
}

// sweepScratch holds buffers reused across rounds: labels, pendings, group
// heads, the slab of per-target pairs and prunePending's ordering.
type sweepScratch struct {
	labels []label
	pool   []pending
	head   []int32
	per    []prefixBest
	order  []pendingKey
}

// size gives the buffers a first capacity from the night's size, so the
// first round does not grow them step by step: labels 8 per candidate (96
// bytes each: two indices, the score and the bucket), pendings 2 per group (the query of another target's and of
// the same target's schedules), per-target pairs 4 per target. These are
// starting guesses (common practice: size from the input, let append grow
// the rest); later rounds reuse what the largest round needed.
func (sc *sweepScratch) size(nCands, nGroups, nTargets int) {
	if cap(sc.labels) < 8*nCands {
		sc.labels = make([]label, 0, 8*nCands)
	}
	if cap(sc.pool) < 2*nGroups {
		sc.pool = make([]pending, 0, 2*nGroups)
	}
	if cap(sc.head) < nGroups {
		sc.head = make([]int32, 0, nGroups)
	}
	if cap(sc.per) < 4*nTargets {
		sc.per = make([]prefixBest, 0, 4*nTargets)
	}
}

// pendingKey is a pending in prunePending's order, with its state and the
// state's signature (bit k mod 64 set for each occurrence k).
type pendingKey struct {
	i     int32
	state []int32
	sig   uint64
}

// prunePending marks the pendings of a group that another pending
// dominates, and returns order (the scratch it used). j dominates i when
// j's state (after following merges) is a subset of i's and j's value is at
// least i's, and j is strictly better in one of them, or equal in both and
// added later (the first of equals in the list is kept). That relation is a
// strict partial order, so the pendings kept are exactly its maximal
// elements, whatever order they are examined in: a dominated pending has a
// maximal dominator, which is never marked.
//
// They are examined in the order value descending, then state size
// ascending, then pool index descending: every dominator of a pending comes
// before it (a larger value; or an equal value and a state no larger, equal
// in size only when equal as sets, and then a later addition). So a pending
// is dominated iff one of the maximal pendings kept so far (the frontier)
// has a state that is a subset of its own (such a pending's value is at
// least its own, and if equal its state is smaller or the same and it came
// later): one pass against the frontier, with the states' signatures ruling
// out most non-subsets at once (a ⊆ b implies sig(a) &^ sig(b) = 0), and
// every later pending is dominated once an empty state is in the frontier.
func prunePending(pool []pending, head int32, order []pendingKey) []pendingKey {
	for i := head; i >= 0; i = pool[i].next {
		var s []int32
		if pool[i].from != nil {
			s = pool[i].from.live().state
		}
		var sig uint64
		for _, k := range s {
			sig |= 1 << (uint32(k) & 63)
		}
		order = append(order, pendingKey{i: i, state: s, sig: sig})
	}
	slices.SortFunc(order, func(a, b pendingKey) int {
		va, vb := pool[a.i].val, pool[b.i].val
		switch {
		case vb.less(va):
			return -1
		case va.less(vb):
			return 1
		case len(a.state) != len(b.state):
			return cmp.Compare(len(a.state), len(b.state))
		}
		return cmp.Compare(b.i, a.i)
	})
	front := 0 // order[:front] is the frontier
	for _, p := range order {
		dominated := false
		for _, f := range order[:front] {
			if f.sig&^p.sig == 0 && subset(f.state, p.state) {
				dominated = true
				break
			}
		}
		if dominated {
			pool[p.i].pruned = true
			continue
		}
		order[front] = p
		front++
	}
	return order
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
