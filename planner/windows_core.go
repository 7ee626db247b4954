package planner

// The lean sky path shared by the queue windows (QueueWindows) and the run's
// best-night search (PlanRun): many targets over many nights, where the night
// planner's own set-up (a sky frame, hourly phase-clock anchors and a scan of
// the whole dark time for every target and night) would cost too much.
//
// What it shares with the night planner, so that both apply the very same
// rules: the Sun and Moon series (newNightSky), the dark spans (the same scan
// of the Sun's altitude), the constraint margins (engine.marginAt), the
// scan with edge refinement to 1 ms (scan), and the goal occurrences of the
// phase clock (phaseClock.occurrences). What it does differently:
//
//   - one ephem.SkyFrame over the whole date range, so each target's apparent
//     place is reduced once per 36-hour knot, not twice per night (the fast
//     path's accuracy, 0.1″, is the same);
//   - a sparse phase clock: BJD_TDB computed by ephem.BJDTDB at the ends of
//     every night (and its middle for run nights) and interpolated linearly
//     between them. The annual Rømer term departs from its chord over a day by
//     at most A·ω²·h²/8 = 499 s × (2π/365.25 d)² × (1 d)²/8 ≈ 0.02 s, the
//     diurnal term (the site's light time, ≤ 21.3 ms) by at most twice its
//     amplitude, so phase-window edges are good to about 0.07 s (against the
//     night planner's 0.2 ms): far inside the 10 s the queue windows promise;
//   - the constraints are scanned only where the phase windows are (widened
//     by pad), not over the whole dark time.

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"sync"
	"sync/atomic"
	"time"

	"phasecast/ephem"
)

// leanBase is the validated set-up of the lean path: site, constraints
// (resolved), options (defaults filled in), horizon mask and the altitude of
// the airmass limit.
type leanBase struct {
	site       ephem.Site
	c          Constraints
	opt        Options
	mask       *horizonMask
	altAirmass float64
}

func newLeanBase(site ephem.Site, c Constraints, opt Options) (*leanBase, error) {
	if err := site.Validate(); err != nil {
		return nil, err
	}
	rc, err := c.Resolved()
	if err != nil {
		return nil, err
	}
	o, err := opt.withDefaults()
	if err != nil {
		return nil, err
	}
	b := &leanBase{site: site, c: rc, opt: o, mask: newHorizonMask(rc.Horizon)}
	if rc.MaxAirmass > 0 {
		b.altAirmass = altForAirmass(rc.MaxAirmass)
	}
	return b, nil
}

// night returns the engine of one night [from, to] (Unix seconds): the Sun
// and the Moon and the dark spans, as newEngine computes them.
func (b *leanBase) night(from, to float64) *engine {
	en := &engine{site: b.site, c: b.c, opt: b.opt, mask: b.mask, altAirmass: b.altAirmass, air: b.site.AirTable(), from: from, to: to}
	en.sky = newNightSky(b.site, from, to)
	en.dark, en.day = scan(from, to, b.opt.StepS, func(u float64) (float64, reasonBits) {
		m := b.c.SunAltMaxDeg - en.sky.sunAlt(u)
		if m <= 0 {
			return m, bitDaylight
		}
		return m, 0
	})
	// Every target's scan samples the Sun and the Moon on the same grid:
	// compute them once per night for all (the values are those en.sky.at
	// gives, so nothing changes but the time).
	en.fillEnvCache()
	return en
}

// leapProbe is how long before a UTC midnight TT − UTC is read to see
// whether a leap second ends that day: 1 ms, since ephem's UTC Julian date
// resolves about a microsecond and puts an instant 1 ns before midnight on
// midnight itself.
const leapProbe = time.Millisecond

// newSparseClock returns a phase clock for target st whose BJD_TDB is
// computed by ephem.BJDTDB at the given anchors (Unix seconds, increasing)
// and interpolated linearly between them (accuracy in the notes above). A
// leap second between two anchors gets its own anchor, so the step is not
// smeared: the piece before it ends on the value just before the step.
//
// Where the anchors are evenly spaced (the days of QueueWindows), every
// other one is not computed but interpolated by the parabola through its
// computed neighbours (anchors k−1, k+1, k+3, or k−3, k−1, k+1 at the end):
// the error is about |f‴|·h³/2 for spacing h, with f‴ of the annual Rømer
// term A·ω³ = 499 s × (2π/365.25 d)³ ≈ 2.5 ms/d³, so about 1 ms for daily
// anchors (all at the same local time, where the diurnal term repeats).
func newSparseClock(site ephem.Site, st ephem.Star, e ephem.Ephemeris, anchors []float64) phaseClock {
	var all []float64
	leapAt := map[int]bool{} // indices of anchors inserted at a leap second
	for k, u := range anchors {
		if k > 0 {
			prev := anchors[k-1]
			if ephem.TTMinusUTC(timeOf(prev)) != ephem.TTMinusUTC(timeOf(u)) {
				for m := math.Floor(prev/86400)*86400 + 86400; m < u; m += 86400 {
					t := timeOf(m)
					if ephem.TTMinusUTC(t.Add(-leapProbe)) != ephem.TTMinusUTC(t) {
						leapAt[len(all)] = true
						all = append(all, m)
					}
				}
			}
		}
		all = append(all, u)
	}
	c := phaseClock{e: e, pieces: make([]clockPiece, 0, len(all))}
	if len(all) == 1 {
		b := ephem.BJDTDB(site, st, timeOf(all[0]))
		c.pieces = append(c.pieces, clockPiece{u0: all[0], u1: all[0] + 1, b0: b, scale: 1})
		return c
	}
	n := len(all)
	vals := make([]ephem.JD2, n)
	exact := make([]bool, n)
	for k := range all {
		exact[k] = k%2 == 0 || k == n-1 || leapAt[k] || (k > 0 && leapAt[k-1]) || (k+1 < n && leapAt[k+1])
		if exact[k] {
			vals[k] = ephem.BJDTDB(site, st, timeOf(all[k]))
		}
	}
	even := func(i, j int) bool { return math.Abs((all[j]-all[i])-(all[i+1]-all[i])*float64(j-i)) < 1 }
	for k := range all {
		if exact[k] {
			continue
		}
		var a, b, d int
		switch {
		case k+3 < n && exact[k+3] && exact[k-1] && exact[k+1] && even(k-1, k+3):
			a, b, d = k-1, k+1, k+3
		case k >= 3 && exact[k-3] && exact[k-1] && exact[k+1] && even(k-3, k+1):
			a, b, d = k-3, k-1, k+1
		default:
			vals[k] = ephem.BJDTDB(site, st, timeOf(all[k]))
			continue
		}
		// Lagrange parabola through a, b, d in days from vals[a].
		x := all[k]
		ya, yb, yd := 0.0, vals[b].SubDays(vals[a]), vals[d].SubDays(vals[a])
		xa, xb, xd := all[a], all[b], all[d]
		y := ya*(x-xb)*(x-xd)/((xa-xb)*(xa-xd)) + yb*(x-xa)*(x-xd)/((xb-xa)*(xb-xd)) + yd*(x-xa)*(x-xb)/((xd-xa)*(xd-xb))
		vals[k] = vals[a].AddDays(y)
	}
	for k := 0; k+1 < n; k++ {
		u0, u1 := all[k], all[k+1]
		t1 := timeOf(u1)
		end := vals[k+1]
		before := t1.Add(-leapProbe)
		if ephem.TTMinusUTC(before) != ephem.TTMinusUTC(t1) {
			end = ephem.BJDTDB(site, st, before).AddSeconds(leapProbe.Seconds())
		}
		c.pieces = append(c.pieces, clockPiece{u0: u0, u1: u1, b0: vals[k], scale: end.SubDays(vals[k]) * 86400 / (u1 - u0)})
	}
	return c
}

// reachSpan is one stretch of a night in which a goal can be observed: the
// goal occurrence (one cycle's phase window) intersected with an observable
// interval of the target (every constraint met, in dark time).
type reachSpan struct {
	occ    occurrence
	lo, hi float64 // occ ∩ observable, Unix seconds
	vis    span    // the observable interval holding it (cut at the scanned stretch)
}

// errTooManyOccurrences reports a goal with more windows in one night than
// the limit (a very short period).
type errTooManyOccurrences struct {
	target string
	limit  int
}

func (e *errTooManyOccurrences) Error() string {
	return fmt.Sprintf("target %q: more than %d goal windows in one night (max_occurrences); the period is too short for this list", e.target, e.limit)
}

// reach returns, for each goal of ts, the stretches of night en in which the
// goal can be observed, in time order, and the ephemeris' 1σ phase
// uncertainty at the middle of the dark time (as PlanNight computes it).
// The constraints are scanned over each goal occurrence widened by pad
// seconds on both sides (within dark time), so the observable intervals
// returned are exact within pad of every occurrence: enough for a block
// that starts pad before or ends pad after the phase window.
func (en *engine) reach(ts *targetState, clock *phaseClock, pad float64) ([][]reachSpan, float64, error) {
	out := make([][]reachSpan, len(ts.goals))
	if len(en.dark) == 0 {
		return out, 0, nil
	}
	lo, hi := en.dark[0].lo, en.dark[len(en.dark)-1].hi
	phaseErr := ts.t.Ephem.PhaseErr(clock.bjd(0.5 * (lo + hi)))
	occs := make([][]occurrence, len(ts.goals))
	var want []span
	for gi, g := range ts.goals {
		occs[gi] = clock.occurrences(g.Center, en.opt.halfWidth(g.HalfWidth, phaseErr), lo, hi, en.opt.MaxOccurrences+1)
		if len(occs[gi]) > en.opt.MaxOccurrences {
			return nil, 0, &errTooManyOccurrences{ts.t.Name, en.opt.MaxOccurrences}
		}
		for _, o := range occs[gi] {
			want = append(want, span{o.lo - pad, o.hi + pad})
		}
	}
	var vis []span
	floor := en.altFloorDeg() - (en.site.RefractedAltDeg(-2) + 2) - 0.01
	for _, s := range intersectSpans(normalizeSpans(want), en.dark) {
		if !en.mightReach(ts, s.lo, s.hi, floor) {
			continue
		}
		ok, _ := scan(s.lo, s.hi, en.opt.StepS, func(u float64) (float64, reasonBits) { return en.margin(ts, u) })
		vis = append(vis, ok...)
	}
	for gi := range ts.goals {
		for _, o := range occs[gi] {
			for _, v := range vis {
				a, b := math.Max(o.lo, v.lo), math.Min(o.hi, v.hi)
				if b > a {
					out[gi] = append(out[gi], reachSpan{occ: o, lo: a, hi: b, vis: v})
				}
			}
		}
	}
	return out, phaseErr, nil
}

// siderealRateDegPerS bounds the rate of change of any star's altitude,
// degrees per second: the Earth turns 360° in a sidereal day
// (86164.0905 s, Meeus ch. 12), and |dh/dt| = ω·cos φ·|sin A| ≤ ω; the
// 1.001 covers the stars' own apparent motion many times over.
const siderealRateDegPerS = 360 / 86164.0905 * 1.001

// altFloorDeg returns the lowest refracted altitude at which any target can
// be observable under the constraints: the horizon, the airmass limit, the
// minimum altitude and the lowest point of the horizon mask.
func (en *engine) altFloorDeg() float64 {
	floor := 0.0
	if en.altAirmass > 0 {
		floor = math.Max(floor, en.altAirmass)
	}
	if en.c.MinAltDeg != 0 {
		floor = math.Max(floor, en.c.MinAltDeg)
	}
	if en.mask != nil {
		lowest := math.Inf(1)
		for _, a := range en.mask.alt {
			lowest = math.Min(lowest, a)
		}
		floor = math.Max(floor, lowest)
	}
	return floor
}

// mightReach reports whether target ts can be above the altitude floor at
// any instant of [a, b], from its airless altitude on the fast path at a,
// b and every 600 s between: between two samples h apart with altitudes
// a₁ and a₂, no altitude exceeds (a₁ + a₂ + ω·h)/2 (the meeting point of
// the two cones a_k + ω·|u − u_k|, ω the bound siderealRateDegPerS on the
// altitude's rate). The target is out of reach when that peak stays below
// the floor less the largest refraction (the one at −2° airless) in every
// gap. The test is conservative: it never excludes an observable instant.
func (en *engine) mightReach(ts *targetState, a, b, floor float64) bool {
	const h = 600.0
	prevU, prevA := a, ts.track.AltUnix(a)
	for u := a; u < b; {
		u = math.Min(u+h, b)
		alt := ts.track.AltUnix(u)
		if 0.5*(prevA+alt+siderealRateDegPerS*(u-prevU)) >= floor {
			return true
		}
		prevU, prevA = u, alt
	}
	return prevA >= floor
}

// capacity returns the most exposures of goal g (exposure E, overhead O,
// L = E + O) one block can hold in reach span r, by the night planner's rules
// in continuous time: every exposure's mid-time in the phase window, the
// whole block inside the observable interval (guardS inside its ends), and
// the target's acquisition (acq seconds) before the block within the same
// dark span. It is an upper bound of what the planner's start grid gives
// (the planner may lose one exposure to its grid) and zero exactly when no
// block of one exposure fits anywhere.
func (en *engine) capacity(r reachSpan, g Goal, acq float64) int {
	E, L := g.ExposureS, g.ExposureS+g.OverheadS
	vlo, vhi := r.vis.lo+guardS, r.vis.hi-guardS
	sLo := math.Max(math.Max(r.occ.lo-E/2, vlo), en.darkStart(r.vis.lo)+acq)
	if sLo > r.occ.hi-E/2 || sLo+L > vhi {
		return 0
	}
	n1 := math.Floor((r.occ.hi-E/2-sLo)/L) + 1
	n2 := math.Floor((vhi - sLo) / L)
	return int(math.Max(0, math.Min(n1, n2)))
}

// airmassRangeLean returns the lowest and highest airmass of ts over
// [a, b] (at most 12 hours) on the fast path. The airless altitude is
// extreme at the ends or at a transit (hour angle 0 or 12 h), and the
// airmass falls monotonically with altitude, so the airmass at the ends and
// at the transits inside the span gives both extremes (the transit instant
// from the hour angle at a and the sidereal rate, to a few seconds, where
// the altitude is flat).
func (en *engine) airmassRangeLean(ts *targetState, a, b float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	at := func(u float64) {
		x := en.airmassAt(ts, u)
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	at(a)
	at(b)
	ha := ts.track.HourAngleHours(timeOf(a))
	const sidS = 3600 / 1.00273790935 // seconds of time per hour of hour angle
	for _, target := range []float64{0, 12} {
		dh := math.Mod(target-ha+48, 24)
		if u := a + dh*sidS; u > a && u < b {
			at(u)
		}
	}
	return lo, hi
}

// forEach runs fn(i) for i in 0..n−1 on a bounded pool of workers
// (GOMAXPROCS, at most n). Items are handed out in increasing order; after
// the first error no new item starts, and the error of the lowest item that
// failed is returned (the same error whatever the scheduling). When ctx is
// cancelled no new item starts and ctx.Err() is returned. tick is called
// after every item that succeeded, from one goroutine at a time.
func forEach(ctx context.Context, n int, fn func(i int) error, tick func()) error {
	if err := ctx.Err(); err != nil || n == 0 {
		return err
	}
	workers := min(runtime.GOMAXPROCS(0), n)
	var next atomic.Int64
	var stop atomic.Bool
	var mu sync.Mutex
	errIdx, firstErr := n, error(nil)
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for !stop.Load() && ctx.Err() == nil {
				i := int(next.Add(1) - 1)
				if i >= n {
					return
				}
				err := fn(i)
				mu.Lock()
				if err != nil {
					if i < errIdx {
						errIdx, firstErr = i, err
					}
					stop.Store(true)
				} else if tick != nil {
					tick()
				}
				mu.Unlock()
			}
		}()
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return err
	}
	return firstErr
}

// forAll runs fn(i) for i in 0..n−1 on a bounded pool of workers
// (GOMAXPROCS, at most n), for work that cannot fail or be cancelled.
func forAll(n int, fn func(i int)) {
	workers := min(runtime.GOMAXPROCS(0), n)
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := int(next.Add(1) - 1); i < n; i = int(next.Add(1) - 1) {
				fn(i)
			}
		}()
	}
	wg.Wait()
}

// progressCounter calls progress(done, total) as items complete.
type progressCounter struct {
	done, total int
	fn          func(done, total int)
}

func (p *progressCounter) tick() {
	p.done++
	if p.fn != nil {
		p.fn(p.done, p.total)
	}
}
