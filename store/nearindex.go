package store

import (
	"math"
	"sort"
)

// nearPoint is one position of an import's duplicate search: an ICRS
// position in degrees, its unit vector, and the file line it came from (0
// for a target already on the list).
type nearPoint struct {
	ra, dec float64
	v       [3]float64
	line    int
	name    string
}

func newNearPoint(raDeg, decDeg float64, line int, name string) nearPoint {
	ra, dec := raDeg*math.Pi/180, decDeg*math.Pi/180
	return nearPoint{ra: raDeg, dec: decDeg, line: line, name: name,
		v: [3]float64{math.Cos(dec) * math.Cos(ra), math.Cos(dec) * math.Sin(ra), math.Sin(dec)}}
}

// dupChord is DuplicateRadiusArcsec as the straight-line distance between
// unit vectors: 2 sin(θ/2).
var dupChord = 2 * math.Sin(DuplicateRadiusArcsec/3600*math.Pi/180/2)

// nearLeaf is the most points a leaf of a nearIndex holds.
const nearLeaf = 8

// nearIndex is a static k-d tree over the unit vectors of nearPoints. Each
// node keeps its bounding box and the earliest line below it, so that a
// query for "the earliest point within the radius" skips a box wholly
// outside the radius or holding no earlier line, and takes a box wholly
// inside the radius by its earliest point without looking further. A
// query visits O(n^(2/3)) nodes at worst (3-d range search), and a
// cluster of identical positions is answered at its root.
type nearIndex struct {
	pts   []nearPoint
	nodes []nearNode
}

type nearNode struct {
	lo, hi      [3]float64
	first, end  int // the points pts[first:end]
	min         int // index in pts of the earliest line under the node
	left, right int // child nodes, -1 for a leaf
}

func newNearIndex(pts []nearPoint) *nearIndex {
	ix := &nearIndex{pts: pts, nodes: make([]nearNode, 0, 2*len(pts)/nearLeaf+1)}
	if len(pts) > 0 {
		ix.build(0, len(pts))
	}
	return ix
}

// build makes the node of pts[first:end] and its children, returning its
// index.
func (ix *nearIndex) build(first, end int) int {
	n := nearNode{first: first, end: end, min: first, left: -1, right: -1}
	n.lo, n.hi = ix.pts[first].v, ix.pts[first].v
	for i := first; i < end; i++ {
		p := ix.pts[i]
		for k := range 3 {
			n.lo[k], n.hi[k] = math.Min(n.lo[k], p.v[k]), math.Max(n.hi[k], p.v[k])
		}
		if p.line < ix.pts[n.min].line {
			n.min = i
		}
	}
	at := len(ix.nodes)
	ix.nodes = append(ix.nodes, n)
	if end-first <= nearLeaf || n.lo == n.hi {
		return at
	}
	axis := 0
	for k := 1; k < 3; k++ {
		if n.hi[k]-n.lo[k] > n.hi[axis]-n.lo[axis] {
			axis = k
		}
	}
	part := ix.pts[first:end]
	sort.SliceStable(part, func(i, j int) bool { return part[i].v[axis] < part[j].v[axis] })
	mid := first + (end-first)/2
	l := ix.build(first, mid)
	r := ix.build(mid, end)
	// The children moved the points: the earliest is one of theirs.
	m := ix.nodes[l].min
	if rm := ix.nodes[r].min; ix.pts[rm].line < ix.pts[m].line {
		m = rm
	}
	ix.nodes[at].left, ix.nodes[at].right, ix.nodes[at].min = l, r, m
	return at
}

// earliestWithin returns the point of the earliest line before p.line
// within DuplicateRadiusArcsec of p (the first one built for a tie), or
// false.
func (ix *nearIndex) earliestWithin(p nearPoint) (nearPoint, bool) {
	best := -1
	if len(ix.nodes) > 0 {
		ix.search(0, p, &best)
	}
	if best < 0 {
		return nearPoint{}, false
	}
	return ix.pts[best], true
}

func (ix *nearIndex) search(at int, p nearPoint, best *int) {
	n := &ix.nodes[at]
	limit := p.line
	if *best >= 0 {
		limit = ix.pts[*best].line
	}
	if ix.pts[n.min].line >= limit {
		return // nothing earlier below
	}
	near, far := boxDist(p.v, n.lo, n.hi)
	const slack = 1e-12 // rounding of the vectors; sepArcsec decides at the edge
	if near > dupChord+slack {
		return
	}
	if far < dupChord-slack {
		*best = n.min
		return
	}
	if n.left < 0 {
		for i := n.first; i < n.end; i++ {
			q := ix.pts[i]
			if q.line < limit && sepArcsec(p.ra, p.dec, q.ra, q.dec) <= DuplicateRadiusArcsec {
				*best, limit = i, q.line
			}
		}
		return
	}
	ix.search(n.left, p, best)
	ix.search(n.right, p, best)
}

// boxDist returns the least and the greatest distance from v to the box
// [lo, hi].
func boxDist(v, lo, hi [3]float64) (near, far float64) {
	var n2, f2 float64
	for k := range 3 {
		switch {
		case v[k] < lo[k]:
			n2 += (lo[k] - v[k]) * (lo[k] - v[k])
		case v[k] > hi[k]:
			n2 += (v[k] - hi[k]) * (v[k] - hi[k])
		}
		d := math.Max(math.Abs(v[k]-lo[k]), math.Abs(v[k]-hi[k]))
		f2 += d * d
	}
	return math.Sqrt(n2), math.Sqrt(f2)
}
