package planner

import (
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"phasecast/ephem"
)

// TestVisibilityEdgesFullPath: every edge of every observable interval (the
// fast path, interpolated Sun and Moon, bisection) lies within 1 s of the
// edge found by bisection on ephem's full path, on seeded random nights
// with random constraints.
func TestVisibilityEdgesFullPath(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	worst, edges := 0.0, 0
	for n := range 30 {
		req := randomNight(r, 4)
		ref := newFullRef(t, req.Site, req.Constraints)
		p, err := PlanNight(req)
		if err != nil {
			t.Fatal(err)
		}
		for i, v := range p.Visibility {
			st := req.Targets[i].Star()
			ok := func(u time.Time) bool { return ref.dark(u) && ref.why(st, u) == 0 }
			for _, iv := range v.Intervals {
				for _, e := range []struct {
					at     time.Time
					inside time.Duration
				}{{iv.Start, time.Second}, {iv.End, -time.Second}} {
					if e.at.Equal(p.From) || e.at.Equal(p.To) {
						continue
					}
					in, out := e.at.Add(e.inside), e.at.Add(-e.inside)
					if !ok(in) || ok(out) {
						t.Errorf("night %d %s: edge %s: full path observable %v 1 s inside, %v 1 s outside",
							n, v.Target, e.at.Format(time.RFC3339Nano), ok(in), ok(out))
						continue
					}
					good, bad := in, out
					for good.Sub(bad).Abs() > time.Millisecond {
						mid := bad.Add(good.Sub(bad) / 2)
						if ok(mid) {
							good = mid
						} else {
							bad = mid
						}
					}
					worst = math.Max(worst, good.Sub(e.at).Abs().Seconds())
					edges++
				}
			}
		}
	}
	if edges == 0 {
		t.Fatal("no interval edge checked")
	}
	if worst >= 1 {
		t.Errorf("worst edge difference %.3f s, want < 1 s", worst)
	}
	t.Logf("%d interval edges: worst difference from the full path %.4f s", edges, worst)
}

// TestVisibilityReasons: gaps cover the window with the intervals, in
// order, and carry the reasons of the constraints applied.
func TestVisibilityReasons(t *testing.T) {
	site := ephem.Site{LatDeg: 40, LonEastDeg: -4, ElevM: 700}
	from, to := NightWindow(2026, 10, 5, time.FixedZone("CEST", 2*3600))
	c := DefaultConstraints()
	c.MaxAirmass = 1.5
	req := NightRequest{Site: site, From: from, To: to, Constraints: c, Targets: []Target{{
		Name: "Low-1", RADeg: 300, DecDeg: -20, Priority: 1,
		Ephem: ephem.Ephemeris{T0: ephem.NewJD2(2460000.5), PeriodDays: 0.3, Convention: ephem.ConvInferiorConjunction},
		Goals: []Goal{{Center: 0.25, HalfWidth: 0.1, ExposureS: 120}},
	}}}
	p, err := PlanNight(req)
	if err != nil {
		t.Fatal(err)
	}
	v := p.Visibility[0]
	type piece struct {
		s, e time.Time
		gap  bool
	}
	var all []piece
	for _, iv := range v.Intervals {
		all = append(all, piece{iv.Start, iv.End, false})
	}
	seen := map[Reason]bool{}
	for _, g := range v.Gaps {
		all = append(all, piece{g.Start, g.End, true})
		if len(g.Reasons) == 0 {
			t.Errorf("gap %v–%v without a reason", g.Start, g.End)
		}
		for _, r := range g.Reasons {
			seen[r] = true
		}
	}
	// Sorted by start, they must tile [From, To].
	for i := 1; i < len(all); i++ {
		for j := i; j > 0 && all[j].s.Before(all[j-1].s); j-- {
			all[j], all[j-1] = all[j-1], all[j]
		}
	}
	at := p.From
	for _, pc := range all {
		if pc.s.Sub(at).Abs() > time.Microsecond {
			t.Errorf("pieces do not tile the night: %v then %v", at, pc.s)
		}
		at = pc.e
	}
	if at.Sub(p.To).Abs() > time.Microsecond {
		t.Errorf("pieces end at %v, want %v", at, p.To)
	}
	for _, want := range []Reason{ReasonDaylight, ReasonAirmass} {
		if !seen[want] {
			t.Errorf("no gap with reason %s; seen %v", want, seen)
		}
	}
}

// TestScanFindsShortDip: a margin that dips below zero for 20 s between two
// samples 60 s apart is found, and its edges are exact to a millisecond.
func TestScanFindsShortDip(t *testing.T) {
	f := func(u float64) (float64, reasonBits) {
		m := math.Abs(u-1030) - 10 // negative on (1020, 1040)
		if m < 0 {
			return m, bitZenith
		}
		return m, 0
	}
	ok, bad := scan(900, 1200, 60, f)
	if len(ok) != 2 || len(bad) != 1 {
		t.Fatalf("got %d observable and %d excluded spans, want 2 and 1: %v %v", len(ok), len(bad), ok, bad)
	}
	if math.Abs(bad[0].lo-1020) > 2e-3 || math.Abs(bad[0].hi-1040) > 2e-3 || bad[0].why != bitZenith {
		t.Errorf("dip %v, want (1020, 1040) zenith", bad[0])
	}
}

// TestNightSkyInterpolation: the interpolated Sun and Moon agree with the
// full path over a whole day: Sun altitude within 0.1″, Moon direction
// within 1″ and its illumination within 1e-6.
func TestNightSkyInterpolation(t *testing.T) {
	site := ephem.Site{LatDeg: -33, LonEastDeg: 151, ElevM: 1100}
	from, to := NightWindow(2026, 5, 3, time.FixedZone("AEST", 10*3600))
	ns := newNightSky(site, unixSec(from), unixSec(to))
	var worstSun, worstMoon, worstIllum float64
	for u := unixSec(from); u <= unixSec(to); u += 137 {
		tm := timeOf(u)
		ev := ns.at(u)
		worstSun = math.Max(worstSun, math.Abs(ev.sunAlt-site.SunAltDeg(tm))*3600)
		ra, dec, _ := site.MoonTopocentric(tm)
		h := site.Horizontal(ra, dec, tm)
		worstMoon = math.Max(worstMoon, sepDeg(ev.moon, horizonVec(h.AltDeg, h.AzDeg))*3600)
		worstIllum = math.Max(worstIllum, math.Abs(ev.illum-ephem.MoonIlluminated(tm)))
	}
	t.Logf("worst: Sun altitude %.4f″, Moon direction %.3f″, illumination %.2e", worstSun, worstMoon, worstIllum)
	if worstSun > 0.1 || worstMoon > 1 || worstIllum > 1e-6 {
		t.Errorf("interpolation errors too large")
	}
}

// TestPhaseClock: the piecewise-linear BJD_TDB clock is within 1 ms of
// ephem.BJDTDB everywhere in a night, and its inverse returns the instant,
// including on a night with a leap second (2016-12-31, west of Greenwich).
func TestPhaseClock(t *testing.T) {
	tests := []struct {
		name string
		site ephem.Site
		star ephem.Star
		from time.Time
	}{
		{"MidLatitude", ephem.Site{LatDeg: 31, LonEastDeg: -111, ElevM: 2000}, ephem.Star{RADeg: 80, DecDeg: 20}, time.Date(2026, 12, 1, 19, 0, 0, 0, time.UTC)},
		{"EquatorEcliptic", ephem.Site{LatDeg: 0, LonEastDeg: 35, ElevM: 0}, ephem.Star{RADeg: 180, DecDeg: 0}, time.Date(2030, 3, 20, 9, 0, 0, 0, time.UTC)},
		{"HighLatitude", ephem.Site{LatDeg: 69, LonEastDeg: 19, ElevM: 100}, ephem.Star{RADeg: 270, DecDeg: 66}, time.Date(2025, 1, 5, 11, 0, 0, 0, time.UTC)},
		{"LeapSecond", ephem.Site{LatDeg: 19.8, LonEastDeg: -155.5, ElevM: 4200}, ephem.Star{RADeg: 100, DecDeg: -10}, time.Date(2016, 12, 31, 22, 0, 0, 0, time.UTC)},
	}
	e := ephem.Ephemeris{T0: ephem.NewJD2(2457000.5), PeriodDays: 0.0731, Convention: ephem.ConvInferiorConjunction}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			from := unixSec(tc.from)
			to := from + 24*3600
			c := newPhaseClock(tc.site, tc.star, e, from, to)
			worst, worstInv := 0.0, 0.0
			for u := from; u <= to; u += 97.3 {
				want := ephem.BJDTDB(tc.site, tc.star, timeOf(u))
				got := c.bjd(u)
				worst = math.Max(worst, math.Abs(got.SubDays(want))*86400)
				worstInv = math.Max(worstInv, math.Abs(c.utc(got)-u))
			}
			t.Logf("worst BJD_TDB error %.3f ms, inverse %.3g s", worst*1e3, worstInv)
			if worst > 1e-3 || worstInv > 1e-6 {
				t.Errorf("clock error %.3f ms (want < 1), inverse %.3g s (want < 1 µs)", worst*1e3, worstInv)
			}
		})
	}
}

// TestPhaseOccurrences: windows found by the clock match
// ephem.WindowOccurrences (full-precision inversion) within 1 ms, including
// a window that wraps through phase 0.
func TestPhaseOccurrences(t *testing.T) {
	site := ephem.Site{LatDeg: -29, LonEastDeg: -70.7, ElevM: 2300}
	st := ephem.Star{RADeg: 210, DecDeg: -40}
	e := ephem.Ephemeris{T0: ephem.NewJD2(2459500.1234), PeriodDays: 0.1123, Convention: ephem.ConvInferiorConjunction}
	from := time.Date(2026, 7, 1, 22, 0, 0, 0, time.UTC)
	to := from.Add(12 * time.Hour)
	c := newPhaseClock(site, st, e, unixSec(from), unixSec(to))
	for _, w := range []ephem.PhaseWindow{{Center: 0.25, HalfWidth: 0.05}, {Center: 0.98, HalfWidth: 0.05}} {
		want := ephem.WindowOccurrences(site, st, e, w, from, to)
		got := c.occurrences(w.Center, w.HalfWidth, unixSec(from), unixSec(to), 100)
		// WindowOccurrences clips to [from, to]; compare the interior edges.
		var edges, gotEdges []float64
		for _, iv := range want {
			edges = append(edges, unixSec(iv.Start), unixSec(iv.End))
		}
		for _, o := range got {
			gotEdges = append(gotEdges, math.Max(o.lo, unixSec(from)), math.Min(o.hi, unixSec(to)))
		}
		if len(edges) != len(gotEdges) {
			t.Fatalf("window %+v: %d edges, want %d", w, len(gotEdges), len(edges))
		}
		for i := range edges {
			if d := math.Abs(edges[i] - gotEdges[i]); d > 1e-3 {
				t.Errorf("window %+v edge %d differs by %.4f s", w, i, d)
			}
		}
	}
}
