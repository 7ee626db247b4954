package planner

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// The sweep as it was before its data structures changed (dense per-target
// pairs in every bucket, a linear search of the group's pendings on every
// insert, an all-pairs dominance check), kept here unchanged apart from its
// names as the oracle of TestSweepMatchesReference.

// refLabel is the reference sweep's label, which also held the value.
type refLabel struct {
	cand int32
	pred int32
	val  score
}

// refScratch is the reference sweep's reused buffers.
type refScratch struct {
	labels []refLabel
	pool   []refPending
	head   []int32
}

// refBucket holds the best schedules with one state: the best two over distinct
// last targets, and for each target the best two over distinct last
// occurrences. Entries hold label ids. A refBucket whose state loses an
// occurrence (closed) is merged into the refBucket of the smaller state and
// points to it.
type refBucket struct {
	state  []int32 // sorted critical occurrences
	all    prefixBest
	per    []prefixBest
	merged *refBucket           // non-nil once merged away
	next   map[int32]*refBucket // cache: the refBucket of state ∪ {k}
}

// live follows merges to the refBucket that now holds b's schedules.
func (b *refBucket) live() *refBucket {
	for b.merged != nil {
		b = b.merged
	}
	return b
}

// refPending is, for one candidate, the best predecessor found in one refBucket;
// pendings of a candidate are chained through next (an index, −1 ends).
type refPending struct {
	from   *refBucket // nil: no predecessor (the block is first)
	val    score
	pred   int32
	next   int32
	pruned bool // dominated by another refPending of the group
}

// sweep solves the relaxation in which only the critical occurrences are
// limited to one block (plus, for all, no two consecutive blocks of one
// occurrence). maxBuckets bounds the number of states alive at once.
func (pr *problem) refSweep(st *sweepStatic, critical []bool, maxBuckets int, sc *refScratch) sweepResult {
	labels := sc.labels[:0]
	var buckets []*refBucket // alive, in creation order (deterministic)
	byKey := map[string]*refBucket{}
	closed := make([]bool, pr.nOcc)
	head := sc.head[:0]
	for range st.nGroups {
		head = append(head, -1)
	}
	checked := make([]bool, st.nGroups)
	pool := sc.pool[:0]
	defer func() { sc.labels, sc.pool, sc.head = labels[:0], pool[:0], head[:0] }()
	maxLive := 0
	getBucket := func(state []int32) *refBucket {
		key := stateKey(state)
		if b, ok := byKey[key]; ok {
			return b
		}
		b := &refBucket{state: state, per: make([]prefixBest, pr.nTargets)}
		byKey[key] = b
		buckets = append(buckets, b)
		maxLive = max(maxLive, len(buckets))
		return b
	}
	root := getBucket(nil)
	addPending := func(g int32, from *refBucket, val score, pred int32) {
		for j := head[g]; j >= 0; j = pool[j].next {
			if pool[j].from == from {
				if pool[j].val.less(val) {
					pool[j].val, pool[j].pred = val, pred
				}
				return
			}
		}
		pool = append(pool, refPending{from: from, val: val, pred: pred, next: head[g]})
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
				refPrunePending(pool, head[g], root)
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
							b.next = map[int32]*refBucket{}
						}
						b.next[k] = nb
					}
					b = nb
				}
				v := p.val.plus(c.val)
				id := int32(len(labels))
				labels = append(labels, refLabel{cand: e.idx, pred: p.pred, val: v})
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
			buckets = slices.DeleteFunc(buckets, func(b *refBucket) bool { return b.merged != nil })
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

// prunePending marks the pendings of a group that another refPending
// dominates: a subset state (after following merges) with at least the
// value. The first of equals is kept.
func refPrunePending(pool []refPending, head int32, root *refBucket) {
	stateOf := func(p *refPending) []int32 {
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

// TestSweepMatchesReference runs DSSR on 200 random nights (randomNight, up
// to 12 targets, every rule drawn at random) for PlanNight's priority
// weights and for random run weights (1..5000 per goal) with the sweep and
// with the reference sweep above, round by round on the same critical
// occurrences: every round's value, schedule, state count and outcome must be
// identical, and so the solve's result.
func TestSweepMatchesReference(t *testing.T) {
	r := rand.New(rand.NewPCG(21, 2021))
	rounds := 0
	nights := eachRandomNight(t, r, 200, func(nights int, m *nightModel, weightings map[string][][]int64) {
		for name, w := range weightings {
			m.setWeights(w)
			pr := m.pr
			st := pr.sweepStatic()
			critical := make([]bool, pr.nOcc)
			var sc sweepScratch
			var rs refScratch
			for round := 1; ; round++ {
				got := pr.sweep(st, critical, m.en.opt.MaxStates, &sc)
				want := pr.refSweep(st, critical, m.en.opt.MaxStates, &rs)
				rounds++
				if got.ok != want.ok || got.value != want.value || got.buckets != want.buckets || !slices.Equal(got.chosen, want.chosen) {
					t.Fatalf("night %d (%s weights) round %d: sweep %+v, reference %+v", nights, name, round, got, want)
				}
				if !got.ok {
					break
				}
				seen := map[int]int{}
				added := false
				for _, i := range got.chosen {
					occ := pr.cands[i].occ
					if seen[occ]++; seen[occ] == 2 && !critical[occ] {
						critical[occ], added = true, true
					}
				}
				if !added {
					break
				}
			}
		}
	})
	t.Logf("%d nights × 2 weightings, %d rounds identical", nights, rounds)
}
