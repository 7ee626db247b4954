package store

import (
	"math/rand/v2"
	"testing"
)

// TestNearIndexMatchesAllPairs: on random clusters of positions (some
// identical, some just inside or outside DuplicateRadiusArcsec, near the
// pole and across RA 0), the k-d tree finds for every row the same
// earliest neighbour within the radius as comparing every pair does.
func TestNearIndexMatchesAllPairs(t *testing.T) {
	rng := rand.New(rand.NewPCG(20, 4))
	for trial := range 200 {
		var pts []nearPoint
		n := 1 + rng.IntN(120)
		centers := [][2]float64{{rng.Float64() * 360, rng.Float64()*180 - 90}, {359.9995, 10}, {0.0004, 10}, {33, 89.9995}}
		for i := range n {
			c := centers[rng.IntN(len(centers))]
			ra := c[0] + (rng.Float64()-0.5)*12/3600
			dec := c[1] + (rng.Float64()-0.5)*12/3600
			if rng.IntN(4) == 0 {
				ra, dec = c[0], c[1] // identical positions
			}
			if ra < 0 {
				ra += 360
			}
			if ra >= 360 {
				ra -= 360
			}
			if dec > 90 {
				dec = 90
			}
			line := i + 2
			if rng.IntN(6) == 0 {
				line = 0 // already on the list
			}
			pts = append(pts, newNearPoint(ra, dec, line, "T"))
		}
		want := make([]int, len(pts)) // earliest line within the radius, -1 none
		for i, p := range pts {
			want[i] = -1
			for _, q := range pts {
				if q.line < p.line && sepArcsec(p.ra, p.dec, q.ra, q.dec) <= DuplicateRadiusArcsec && (want[i] < 0 || q.line < want[i]) {
					want[i] = q.line
				}
			}
		}
		queries := append([]nearPoint(nil), pts...)
		ix := newNearIndex(pts)
		for i, p := range queries {
			q, ok := ix.earliestWithin(p)
			got := -1
			if ok {
				got = q.line
			}
			if got != want[i] {
				t.Fatalf("trial %d, point %d (line %d at %.7f %+.7f): earliest neighbour line %d, all pairs give %d",
					trial, i, p.line, p.ra, p.dec, got, want[i])
			}
		}
	}
}
