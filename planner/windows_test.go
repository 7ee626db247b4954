package planner_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
)

// moonUpAltDeg is the Moon-centre altitude above which the Moon counts as up
// (upper limb on the refracted horizon: 34′ refraction + 15.5′ mean
// semidiameter, common practice), the planner's rule restated for the
// brute-force check.
const moonUpAltDeg = -(34.0 + 15.5) / 60

// bruteWindow is a run of 10-second samples at which a goal is reachable.
type bruteWindow struct{ first, last time.Time }

// bruteWindows scans [from, to] every step with ephem's full path (no fast
// path, no interpolation, no phase clock) and returns, per goal, the runs of
// samples at which the Sun is below the twilight altitude, the target is
// above the refracted horizon with airmass ≤ c.MaxAirmass, at least
// c.MinMoonSepDeg from the Moon while the Moon is up, and the phase lies in
// the goal window. The Sun-avoidance angle cannot bind in the scenarios
// used (the Sun below −12° and the target above 30°).
func bruteWindows(tb testing.TB, site ephem.Site, t planner.Target, c planner.Constraints, from, to time.Time, step time.Duration) [][]bruteWindow {
	tb.Helper()
	goals, err := t.ResolveGoals()
	if err != nil {
		tb.Fatal(err)
	}
	out := make([][]bruteWindow, len(goals))
	open := make([]bool, len(goals))
	st := t.Star()
	for u := from; !u.After(to); u = u.Add(step) {
		reach := make([]bool, len(goals))
		if site.SunAltDeg(u) < c.SunAltMaxDeg {
			_, phi, _ := ephem.PhaseAtUTC(site, st, t.Ephem, u)
			any := false
			for gi, g := range goals {
				reach[gi] = ephem.PhaseWindow{Center: g.Center, HalfWidth: g.HalfWidth}.Contains(phi)
				any = any || reach[gi]
			}
			if any {
				p := ephem.Observe(site, st, u)
				ok := p.AltRefractedDeg > 0 && p.AirmassOK && p.Airmass <= c.MaxAirmass
				if c.MinMoonSepDeg > 0 && p.MoonAltDeg > moonUpAltDeg && p.MoonSepDeg < c.MinMoonSepDeg {
					ok = false
				}
				for gi := range reach {
					reach[gi] = reach[gi] && ok
				}
			}
		}
		for gi := range goals {
			switch {
			case reach[gi] && !open[gi]:
				out[gi] = append(out[gi], bruteWindow{u, u})
			case reach[gi]:
				out[gi][len(out[gi])-1].last = u
			}
			open[gi] = reach[gi]
		}
	}
	return out
}

// reachableAt is the predicate of bruteWindows for one goal at one instant.
func reachableAt(site ephem.Site, t planner.Target, g planner.Goal, c planner.Constraints, u time.Time) bool {
	st := t.Star()
	if site.SunAltDeg(u) >= c.SunAltMaxDeg {
		return false
	}
	if _, phi, _ := ephem.PhaseAtUTC(site, st, t.Ephem, u); !(ephem.PhaseWindow{Center: g.Center, HalfWidth: g.HalfWidth}).Contains(phi) {
		return false
	}
	p := ephem.Observe(site, st, u)
	if !(p.AltRefractedDeg > 0 && p.AirmassOK && p.Airmass <= c.MaxAirmass) {
		return false
	}
	return !(c.MinMoonSepDeg > 0 && p.MoonAltDeg > moonUpAltDeg && p.MoonSepDeg < c.MinMoonSepDeg)
}

// refineEdge bisects between an instant where f is true and one where it
// is false, to 10 ms, and returns the instant on the true side.
func refineEdge(f func(time.Time) bool, in, out time.Time) time.Time {
	for absDur(out.Sub(in)) > 10*time.Millisecond {
		mid := in.Add(out.Sub(in) / 2)
		if f(mid) {
			in = mid
		} else {
			out = mid
		}
	}
	return in
}

// windowScenario is an invented southern-winter site and seeded random
// targets that are up at night, with two goals each.
func windowScenario(seed uint64, n int) (ephem.Site, []planner.Target, planner.Constraints) {
	r := rand.New(rand.NewPCG(seed, 6))
	site := ephem.Site{LatDeg: -29.26, LonEastDeg: -70.73, ElevM: 2350}
	c := planner.DefaultConstraints()
	c.MinMoonSepDeg = 25
	var ts []planner.Target
	for i := range n {
		t := planner.Target{
			Name: fmt.Sprintf("QW-%02d", i+1), RADeg: 200 + 110*r.Float64(), DecDeg: -70 + 80*r.Float64(),
			Priority: 1 + r.IntN(5), AcquireS: 120,
			Ephem: ephem.Ephemeris{T0: ephem.NewJD2(2461000.5 + r.Float64()), PeriodDays: 0.06 + 0.5*r.Float64(),
				PeriodErr: 2e-7, T0ErrDays: 2e-4, Convention: ephem.ConvInferiorConjunction},
		}
		hw := 0.03 + 0.07*r.Float64()
		for _, ph := range []float64{0.25, 0.75} {
			t.Goals = append(t.Goals, planner.Goal{Center: ph, HalfWidth: hw, ExposureS: 60 + 240*r.Float64(), OverheadS: 15})
		}
		ts = append(ts, t)
	}
	return site, ts, c
}

// TestQueueWindowsBruteForce checks the queue windows against a scan of the
// full computation every 10 s: every window of more than 30 s on one side
// has a partner on the other, and each edge lies within the 10-s bracket the
// scan gives it (allowing 1 s for the fast path's own tolerance). The log
// gives the worst edge error against the full computation's edge refined by
// bisection.
func TestQueueWindowsBruteForce(t *testing.T) {
	site, targets, c := windowScenario(1, 4)
	from := time.Date(2026, 6, 10, 16, 0, 0, 0, time.UTC)
	to := from.Add(72 * time.Hour)
	got, err := planner.QueueWindows(context.Background(), planner.WindowRequest{Site: site, From: from, To: to, Targets: targets, Constraints: c}, nil)
	if err != nil {
		t.Fatal(err)
	}
	rc, _ := c.Resolved()
	const step = 10 * time.Second
	const tol = time.Second
	worst := time.Duration(0)
	matched := 0
	k := 0
	for _, tg := range targets {
		brute := bruteWindows(t, site, tg, rc, from, to, step)
		for gi := range brute {
			gw := got[k]
			k++
			if gw.Target != tg.Name || gw.GoalIndex != gi {
				t.Fatalf("list %d is %s goal %d, want %s goal %d", k-1, gw.Target, gw.GoalIndex, tg.Name, gi)
			}
			t.Run(fmt.Sprintf("%s/goal%d", tg.Name, gi), func(t *testing.T) {
				for _, w := range gw.Windows {
					if w.Duration() < 30*time.Second {
						continue
					}
					b, ok := findBrute(brute[gi], w.Interval)
					if !ok {
						t.Errorf("window %s–%s has no partner in the scan", w.Start.Format(time.RFC3339), w.End.Format(time.RFC3339))
						continue
					}
					// True start lies in (b.first − step, b.first]; true end in [b.last, b.last + step).
					if w.Start.Before(b.first.Add(-step-tol)) || w.Start.After(b.first.Add(tol)) {
						t.Errorf("start %s outside the scan's bracket (%s − 10 s, %s]", w.Start.Format(time.RFC3339Nano), b.first.Format(time.RFC3339), b.first.Format(time.RFC3339))
					}
					if w.End.Before(b.last.Add(-tol)) || w.End.After(b.last.Add(step+tol)) {
						t.Errorf("end %s outside the scan's bracket [%s, %s + 10 s)", w.End.Format(time.RFC3339Nano), b.last.Format(time.RFC3339), b.last.Format(time.RFC3339))
					}
					// The full computation's own edges, refined to 10 ms.
					f := func(u time.Time) bool { return reachableAt(site, tg, gw.Goal, rc, u) }
					s0 := refineEdge(f, b.first, b.first.Add(-step))
					e0 := refineEdge(f, b.last, b.last.Add(step))
					worst = max(worst, absDur(w.Start.Sub(s0)), absDur(w.End.Sub(e0)))
					matched++
				}
				for _, b := range brute[gi] {
					if b.last.Sub(b.first) < 30*time.Second {
						continue
					}
					if _, ok := findWindow(gw.Windows, b); !ok {
						t.Errorf("scan window %s–%s missing from the queue windows", b.first.Format(time.RFC3339), b.last.Format(time.RFC3339))
					}
				}
			})
		}
	}
	if k != len(got) {
		t.Errorf("%d lists, want %d", len(got), k)
	}
	if matched == 0 {
		t.Fatal("no window matched: the scenario tests nothing")
	}
	t.Logf("%d windows matched; worst edge error against the full computation (refined to 10 ms): %v", matched, worst)
}

func absDur(d time.Duration) time.Duration {
	if d < 0 {
		return -d
	}
	return d
}

func findBrute(bs []bruteWindow, iv planner.Interval) (bruteWindow, bool) {
	for _, b := range bs {
		if !b.first.After(iv.End) && !iv.Start.After(b.last) {
			return b, true
		}
	}
	return bruteWindow{}, false
}

func findWindow(ws []planner.QueueWindow, b bruteWindow) (planner.QueueWindow, bool) {
	for _, w := range ws {
		if !b.first.After(w.End) && !w.Start.After(b.last) {
			return w, true
		}
	}
	return planner.QueueWindow{}, false
}

// TestQueueWindowsSortedMerged checks the shape of every list: windows
// sorted, disjoint and not touching, inside the range, with finite figures.
func TestQueueWindowsSortedMerged(t *testing.T) {
	site, targets, c := windowScenario(2, 6)
	from := time.Date(2026, 9, 1, 0, 0, 0, 0, time.UTC)
	got, err := planner.QueueWindows(context.Background(), planner.WindowRequest{Site: site, From: from, To: from.AddDate(0, 0, 20), Targets: targets, Constraints: c}, nil)
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, gw := range got {
		for i, w := range gw.Windows {
			n++
			if !w.End.After(w.Start) || w.Start.Before(from) || w.End.After(from.AddDate(0, 0, 20)) {
				t.Errorf("%s goal %d window %d: %v–%v empty or outside the range", gw.Target, gw.GoalIndex, i, w.Start, w.End)
			}
			if i > 0 && !w.Start.After(gw.Windows[i-1].End) {
				t.Errorf("%s goal %d window %d starts %v, not after the previous end %v", gw.Target, gw.GoalIndex, i, w.Start, gw.Windows[i-1].End)
			}
			for _, x := range []float64{w.PhaseErr, w.AirmassMin, w.AirmassMax} {
				if math.IsNaN(x) || math.IsInf(x, 0) {
					t.Errorf("%s goal %d window %d: non-finite figure %v", gw.Target, gw.GoalIndex, i, x)
				}
			}
			if w.AirmassMax > c.MaxAirmass+1e-6 || w.AirmassMin < 1 {
				t.Errorf("%s goal %d window %d: airmass %.4f–%.4f outside 1..%g", gw.Target, gw.GoalIndex, i, w.AirmassMin, w.AirmassMax, c.MaxAirmass)
			}
		}
	}
	if n == 0 {
		t.Fatal("no windows: the scenario tests nothing")
	}
}

// TestQueueWindowsDeterministic checks that two runs (parallel workers)
// give the same lists.
func TestQueueWindowsDeterministic(t *testing.T) {
	site, targets, c := windowScenario(3, 8)
	from := time.Date(2026, 4, 1, 0, 0, 0, 0, time.UTC)
	req := planner.WindowRequest{Site: site, From: from, To: from.AddDate(0, 0, 10), Targets: targets, Constraints: c}
	a, err := planner.QueueWindows(context.Background(), req, nil)
	if err != nil {
		t.Fatal(err)
	}
	b, err := planner.QueueWindows(context.Background(), req, nil)
	if err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(a) != fmt.Sprint(b) {
		t.Error("two runs of the same request differ")
	}
}

// TestQueueWindowsProgressAndCancel checks the progress callback's counts
// and that a cancelled context stops the work with ctx.Err().
func TestQueueWindowsProgressAndCancel(t *testing.T) {
	site, targets, c := windowScenario(4, 5)
	from := time.Date(2026, 4, 1, 0, 0, 0, 0, time.UTC)
	req := planner.WindowRequest{Site: site, From: from, To: from.AddDate(0, 0, 6), Targets: targets, Constraints: c}
	t.Run("Progress", func(t *testing.T) {
		var calls, last, total int
		_, err := planner.QueueWindows(context.Background(), req, func(done, tot int) {
			calls++
			if done != last+1 {
				t.Errorf("done went from %d to %d", last, done)
			}
			last, total = done, tot
		})
		if err != nil {
			t.Fatal(err)
		}
		if last != total || calls != total || total != 7+len(targets) {
			t.Errorf("progress ended at %d/%d after %d calls, want %d/%d", last, total, calls, 7+len(targets), 7+len(targets))
		}
	})
	t.Run("Cancelled", func(t *testing.T) {
		ctx, cancel := context.WithCancel(context.Background())
		_, err := planner.QueueWindows(ctx, req, func(done, total int) {
			if done == 3 {
				cancel()
			}
		})
		if !errors.Is(err, context.Canceled) {
			t.Errorf("err = %v, want context.Canceled", err)
		}
	})
}

// TestQueueWindowsBadInput checks the errors for a bad range and targets.
func TestQueueWindowsBadInput(t *testing.T) {
	site, targets, c := windowScenario(5, 2)
	from := time.Date(2026, 4, 1, 0, 0, 0, 0, time.UTC)
	dup := append([]planner.Target(nil), targets...)
	dup[1].Name = dup[0].Name
	for _, tc := range []struct {
		name  string
		req   planner.WindowRequest
		field string
	}{
		{"ErrRangeTooLong", planner.WindowRequest{Site: site, From: from, To: from.AddDate(0, 0, 367), Targets: targets, Constraints: c}, "to"},
		{"ErrRangeReversed", planner.WindowRequest{Site: site, From: from, To: from.Add(-time.Hour), Targets: targets, Constraints: c}, "to"},
		{"ErrNoTargets", planner.WindowRequest{Site: site, From: from, To: from.AddDate(0, 0, 1), Constraints: c}, "targets"},
		{"ErrDuplicateName", planner.WindowRequest{Site: site, From: from, To: from.AddDate(0, 0, 1), Targets: dup, Constraints: c}, "targets[1].name"},
		{"ErrAirmass", planner.WindowRequest{Site: site, From: from, To: from.AddDate(0, 0, 1), Targets: targets, Constraints: planner.Constraints{MaxAirmass: 0.5}}, "max_airmass"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := planner.QueueWindows(context.Background(), tc.req, nil)
			var ie *ephem.InputError
			if !errors.As(err, &ie) {
				t.Fatalf("err = %v, want an *ephem.InputError", err)
			}
			if ie.Field != tc.field {
				t.Errorf("field %q, want %q (%v)", ie.Field, tc.field, err)
			}
		})
	}
}
