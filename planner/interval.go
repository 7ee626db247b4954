package planner

import (
	"math"
	"sort"
	"time"
)

// Interval is a closed span of time [Start, End], UTC, Start ≤ End.
type Interval struct {
	Start time.Time
	End   time.Time
}

// Duration returns End − Start.
func (iv Interval) Duration() time.Duration { return iv.End.Sub(iv.Start) }

// span is an interval in Unix seconds (UTC, float64: about 0.2 µs
// resolution in this century), the planner's internal time axis.
type span struct{ lo, hi float64 }

func (s span) length() float64 { return s.hi - s.lo }

func (s span) contains(t float64) bool { return t >= s.lo && t <= s.hi }

// unixSec returns t as Unix seconds (UTC) with its nanoseconds.
func unixSec(t time.Time) float64 {
	return float64(t.Unix()) + float64(t.Nanosecond())*1e-9
}

// timeOf returns the UTC instant of Unix seconds u, rounded to the nearest
// microsecond.
func timeOf(u float64) time.Time {
	whole := math.Floor(u)
	us := math.Round((u - whole) * 1e6)
	return time.Unix(int64(whole), 0).Add(time.Duration(us) * time.Microsecond).UTC()
}

func (s span) interval() Interval { return Interval{Start: timeOf(s.lo), End: timeOf(s.hi)} }

func toIntervals(ss []span) []Interval {
	out := make([]Interval, len(ss))
	for i, s := range ss {
		out[i] = s.interval()
	}
	return out
}

// normalizeSpans sorts spans by start, drops empty ones (hi < lo) and merges
// those that overlap or touch. The result is sorted and disjoint.
func normalizeSpans(ss []span) []span {
	out := make([]span, 0, len(ss))
	for _, s := range ss {
		if s.hi >= s.lo {
			out = append(out, s)
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].lo < out[j].lo })
	merged := out[:0]
	for _, s := range out {
		if n := len(merged); n > 0 && s.lo <= merged[n-1].hi {
			if s.hi > merged[n-1].hi {
				merged[n-1].hi = s.hi
			}
			continue
		}
		merged = append(merged, s)
	}
	return merged
}

// intersectSpans returns the intersection of two sorted disjoint span lists.
func intersectSpans(a, b []span) []span {
	var out []span
	i, j := 0, 0
	for i < len(a) && j < len(b) {
		lo := math.Max(a[i].lo, b[j].lo)
		hi := math.Min(a[i].hi, b[j].hi)
		if lo <= hi {
			out = append(out, span{lo, hi})
		}
		if a[i].hi < b[j].hi {
			i++
		} else {
			j++
		}
	}
	return out
}

// subtractSpans returns the parts of the sorted disjoint list a not covered
// by the sorted disjoint list b (a − b; the boundary points of b are removed
// only in the measure-theoretic sense: touching spans remain).
func subtractSpans(a, b []span) []span {
	var out []span
	j := 0
	for _, s := range a {
		lo := s.lo
		for j < len(b) && b[j].hi <= lo {
			j++
		}
		k := j
		for k < len(b) && b[k].lo < s.hi {
			if b[k].lo > lo {
				out = append(out, span{lo, b[k].lo})
			}
			if b[k].hi > lo {
				lo = b[k].hi
			}
			k++
		}
		if lo < s.hi {
			out = append(out, span{lo, s.hi})
		}
	}
	return out
}

// totalLength returns the summed length of the spans, seconds.
func totalLength(ss []span) float64 {
	sum := 0.0
	for _, s := range ss {
		sum += s.length()
	}
	return sum
}

// spanContaining returns the index of the span of the sorted disjoint list
// that contains [lo, hi] entirely, or −1.
func spanContaining(ss []span, lo, hi float64) int {
	i := sort.Search(len(ss), func(i int) bool { return ss[i].hi >= hi })
	if i < len(ss) && ss[i].lo <= lo {
		return i
	}
	return -1
}
