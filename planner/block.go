package planner

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"phasecast/ephem"
)

// twilightDarkDeg is the Sun altitude below which the sky counts as fully
// dark for the "block starts in twilight" warning: astronomical twilight's
// end, −18°.
const twilightDarkDeg = -18.0

// block builds a Block of n exposures of target ts starting at Unix second
// s: goal gi (−1 for a filler, which then uses the target's first goal's
// exposure setup), with acq seconds of acquisition charged before it.
// exposureS is the length of one exposure: the goal's, or the one sized for
// its S/N (sized true).
func (en *engine) block(ts *targetState, gi int, exposureS float64, sized bool, s float64, n int, acq float64, filler bool) Block {
	g := ts.goals[max(gi, 0)]
	E, O := exposureS, g.OverheadS
	L := E + O
	e := s + float64(n)*L
	mid := 0.5 * (s + e)
	b := Block{
		Target: ts.t.Name, TargetIndex: ts.idx, GoalIndex: gi, Filler: filler, Priority: ts.t.Priority,
		Start: timeOf(s), End: timeOf(e), AcquireS: acq, N: n, ExposureS: E, OverheadS: O,
		Smear: ephem.PhaseSmear(E, ts.t.Ephem), PhaseErr: ts.phaseErr,
	}
	if !filler {
		b.Goal = g
	}
	var cyc int64
	cyc, b.PhaseStart = ts.clock.phase(s)
	_, b.PhaseMid = ts.clock.phase(mid)
	_, b.PhaseEnd = ts.clock.phase(e)
	_, b.PhaseFirstMid = ts.clock.phase(s + E/2)
	_, b.PhaseLastMid = ts.clock.phase(s + float64(n-1)*L + E/2)
	if filler {
		b.Cycle = cyc
	}
	b.AirmassMin, b.AirmassMax = en.airmassRange(ts, s, e)
	b.MoonSepDeg = 180
	for _, u := range samplePoints(s, e, 60) {
		ev := en.sky.at(u)
		alt, az := ts.track.AltAzUnix(u)
		b.MoonSepDeg = math.Min(b.MoonSepDeg, sepDeg(horizonVec(alt, az), ev.moon))
		b.MoonUp = b.MoonUp || ev.moonUp()
	}
	tm := timeOf(mid)
	b.MoonIllum = en.sky.at(mid).illum
	ra, dec := ephem.ApparentPlace(ts.star, tm)
	h := en.site.Horizontal(ra, dec, tm)
	b.Parallactic, b.HourAngle = h.ParallacticDeg, h.HourAngleHours
	b.SunAltStart = en.site.SunAltDeg(timeOf(s))
	b.SizedBySNR = sized
	b.SNR, b.SkyMag, b.SNROK = snrAt(en.site, ts.t, en.instrument, E, tm, b.PhaseMid)
	b.Warnings = en.blockWarnings(b)
	return b
}

// blockWarnings returns the warnings about one block.
func (en *engine) blockWarnings(b Block) []Warning {
	var ws []Warning
	add := func(code WarningCode, format string, a ...any) {
		ws = append(ws, Warning{Code: code, Target: b.Target, GoalIndex: b.GoalIndex, Message: fmt.Sprintf(format, a...)})
	}
	if !b.Filler {
		width := 2 * b.Goal.HalfWidth
		if b.Smear > en.opt.SmearFrac*width {
			add(WarnSmear, "one %gs exposure spans %.4f in phase, %.0f%% of the goal window (%.3f wide)",
				b.ExposureS, b.Smear, 100*b.Smear/width, width)
		}
		if UncertaintyRule(b.PhaseErr, b.Goal.HalfWidth, en.opt.MaxPhaseErr) == PhaseFlagged {
			add(WarnPhaseUncertain, "the ephemeris' phase uncertainty tonight: %s", UncertaintyNote(b.PhaseErr, b.Goal.HalfWidth, en.opt.MaxPhaseErr))
		}
	}
	if b.MoonUp && b.MoonSepDeg < en.opt.MoonWarnSepDeg {
		add(WarnMoonNear, "the Moon (%.0f%% illuminated) is up and %.1f° away", 100*b.MoonIllum, b.MoonSepDeg)
	}
	if b.SunAltStart > twilightDarkDeg {
		add(WarnTwilightStart, "starts in twilight: the Sun is at %.1f°, above −18°; the sky is not fully dark", b.SunAltStart)
	}
	return ws
}

// airmassRange returns the lowest and highest airmass of the target over
// [s, e]: the altitude sampled every 60 s and at both ends, each interior
// extremum refined by golden-section search.
func (en *engine) airmassRange(ts *targetState, s, e float64) (lo, hi float64) {
	us := samplePoints(s, e, 60)
	alts := make([]float64, len(us))
	for i, u := range us {
		alts[i] = ts.track.AltUnix(u)
	}
	amin, amax := alts[0], alts[0]
	for i, a := range alts {
		amin, amax = math.Min(amin, a), math.Max(amax, a)
		if i == 0 || i+1 == len(alts) {
			continue
		}
		if a <= alts[i-1] && a <= alts[i+1] {
			u := goldenMin(func(u float64) float64 { return ts.track.AltUnix(u) }, us[i-1], us[i+1])
			amin = math.Min(amin, ts.track.AltUnix(u))
		}
		if a >= alts[i-1] && a >= alts[i+1] {
			u := goldenMin(func(u float64) float64 { return -ts.track.AltUnix(u) }, us[i-1], us[i+1])
			amax = math.Max(amax, ts.track.AltUnix(u))
		}
	}
	xhi, ok1 := ephem.Airmass(en.site.RefractedAltDeg(amin))
	xlo, ok2 := ephem.Airmass(en.site.RefractedAltDeg(amax))
	if !ok1 {
		xhi = 40
	}
	if !ok2 {
		xlo = 40
	}
	return xlo, xhi
}

// explain lists every goal without a block with its reason, and the
// warnings for goals no night-time instant can reach.
func (en *engine) explain(targets []*targetState, occs []occMeta, pr *problem, chosen []int, ws []Warning) ([]Unscheduled, []Warning) {
	type key struct{ t, g int }
	served := map[key]bool{}
	for _, i := range chosen {
		m := occs[pr.cands[i].occ]
		served[key{m.target, m.goal}] = true
	}
	// The time each unserved goal's candidates would occupy (with their
	// acquisition): one hull per occurrence.
	hull := map[int]span{}
	for i := range pr.cands {
		c := &pr.cands[i]
		m := occs[c.occ]
		if served[key{m.target, m.goal}] {
			continue
		}
		h, ok := hull[c.occ]
		if !ok {
			h = span{math.Inf(1), math.Inf(-1)}
		}
		hull[c.occ] = span{math.Min(h.lo, c.start-c.acq), math.Max(h.hi, c.end)}
	}
	need := map[key][]span{}
	for k := range occs {
		if h, ok := hull[k]; ok {
			gk := key{occs[k].target, occs[k].goal}
			need[gk] = append(need[gk], h)
		}
	}
	var out []Unscheduled
	for _, ts := range targets {
		for gi, g := range ts.goals {
			k := key{ts.idx, gi}
			if served[k] {
				continue
			}
			u := Unscheduled{Target: ts.t.Name, TargetIndex: ts.idx, GoalIndex: gi, Goal: g}
			u.Reason, u.Detail = en.reason(ts, gi, g, occs, need[k], pr, chosen, targets)
			out = append(out, u)
			switch u.Reason {
			case UnschedLostToPriority, UnschedLostToSchedule, UnschedEphemerisUncertain:
			default:
				ws = append(ws, Warning{Code: WarnUnreachable, Target: ts.t.Name, GoalIndex: gi,
					Message: fmt.Sprintf("goal at phase %.3f cannot be reached tonight: %s", g.Center, u.Detail)})
			}
		}
	}
	return out, ws
}

// reason classifies why goal gi of ts got no block.
func (en *engine) reason(ts *targetState, gi int, g Goal, occs []occMeta, need []span, pr *problem, chosen []int, targets []*targetState) (UnscheduledReason, string) {
	c := en.c
	if len(en.dark) == 0 {
		return UnschedNoDarkTime, fmt.Sprintf("no dark time: the Sun's centre stays above %s° (%s twilight) all night", fmtNum(c.SunAltMaxDeg), c.Twilight)
	}
	if UncertaintyRule(ts.phaseErr, g.HalfWidth, en.opt.MaxPhaseErr) >= PhaseRefused {
		return UnschedEphemerisUncertain, "the ephemeris tonight: " + UncertaintyNote(ts.phaseErr, g.HalfWidth, en.opt.MaxPhaseErr)
	}
	if sh, ok := en.short[[2]int{ts.idx, gi}]; ok && len(need) == 0 {
		return UnschedSNRUnreachable, sh.detail(g, ts.t.Ephem.PeriodDays)
	}
	var inDark, inVis []span
	for _, m := range occs {
		if m.target != ts.idx || m.goal != gi {
			continue
		}
		w := []span{{m.occ.lo, m.occ.hi}}
		inDark = append(inDark, intersectSpans(w, en.dark)...)
		inVis = append(inVis, intersectSpans(w, ts.vis)...)
	}
	if len(inDark) == 0 {
		list := en.windowList(ts, g, false)
		if list == "" {
			return UnschedWindowInDaylight, "its phase window does not come round between this night's two local noons (the orbit is longer than the night)"
		}
		return UnschedWindowInDaylight, "its phase windows tonight " + list + " all fall outside dark time"
	}
	if len(ts.vis) == 0 {
		var why reasonBits
		for _, b := range ts.bad {
			why |= b.why
		}
		return UnschedNeverObservable, "the target is never observable while dark: " + describeReasons(why.reasons(), c)
	}
	if len(inVis) == 0 {
		var why reasonBits
		for _, b := range ts.bad {
			for _, d := range inDark {
				if b.lo < d.hi && d.lo < b.hi {
					why |= b.why
				}
			}
		}
		return UnschedWindowNotObservable, "during its windows in dark time " + en.windowList(ts, g, true) + " the target is " + describeReasons(why.reasons(), c)
	}
	if len(need) == 0 {
		longest := 0.0
		for _, s := range inVis {
			longest = math.Max(longest, s.length())
		}
		return UnschedNoRoom, fmt.Sprintf("the observable part of its windows (at most %.1f min) cannot hold one %gs exposure plus %gs overhead inside an observable interval, with the %gs acquisition in dark time",
			longest/60, g.ExposureS, g.OverheadS, ts.t.AcquireS)
	}
	// It had candidates: some chosen blocks took the time.
	need = normalizeSpans(need)
	var rivals []string
	higher := false
	seen := map[string]bool{}
	for _, i := range chosen {
		cd := &pr.cands[i]
		sp := []span{{cd.start - cd.acq, cd.end}}
		if len(intersectSpans(sp, need)) == 0 {
			continue
		}
		rt := targets[cd.target].t
		if rt.Priority < ts.t.Priority {
			higher = true
		}
		if !seen[rt.Name] {
			seen[rt.Name] = true
			rivals = append(rivals, fmt.Sprintf("%s (priority %d)", rt.Name, rt.Priority))
		}
	}
	sort.Strings(rivals)
	if higher {
		return UnschedLostToPriority, "its windows are taken by higher-priority targets: " + strings.Join(rivals, ", ")
	}
	if len(rivals) == 0 {
		return UnschedLostToSchedule, "its blocks would force the acquisition of other blocks out of their windows; the schedule is worth more without it"
	}
	return UnschedLostToSchedule, "its windows conflict with blocks worth more together: " + strings.Join(rivals, ", ")
}

// windowList formats the goal's windows overlapping the night window (only
// their parts in dark time when darkOnly) as "(HH:MM–HH:MM, …) UTC", at most
// five; "" when there is none.
func (en *engine) windowList(ts *targetState, g Goal, darkOnly bool) string {
	var parts []string
	for _, o := range ts.clock.occurrences(g.Center, g.HalfWidth, en.from, en.to, 50) {
		ws := []span{{math.Max(o.lo, en.from), math.Min(o.hi, en.to)}}
		if darkOnly {
			ws = intersectSpans(ws, en.dark)
		}
		for _, w := range ws {
			if len(parts) == 5 {
				return "(" + strings.Join(parts, ", ") + ", … UTC)"
			}
			parts = append(parts, timeOf(w.lo).Format("15:04")+"–"+timeOf(w.hi).Format("15:04"))
		}
	}
	if len(parts) == 0 {
		return ""
	}
	return "(" + strings.Join(parts, ", ") + " UTC)"
}

// fill puts filler blocks into idle dark time: for each idle gap, the
// target that is observable there with the highest priority (then the most
// exposures, then the request order), as many exposures of its first goal's
// setup as fit, if they last at least Options.FillMinS. Acquisition is
// charged as for goal blocks. Repeats until nothing more fits.
func (en *engine) fill(targets []*targetState, blocks []Block) []Block {
	for range 10000 {
		sort.SliceStable(blocks, func(i, j int) bool { return blocks[i].Start.Before(blocks[j].Start) })
		placed := false
		for _, d := range en.dark {
			var prev *Block
			for k := 0; k <= len(blocks) && !placed; k++ {
				var next *Block
				if k < len(blocks) {
					next = &blocks[k]
					ns := unixSec(next.Start)
					if ns < d.lo || ns > d.hi {
						if ns > d.hi {
							next = nil
						} else {
							continue
						}
					}
				}
				if b, ok := en.bestFiller(targets, d, prev, next); ok {
					if next != nil && next.TargetIndex != b.TargetIndex {
						next.AcquireS = targets[next.TargetIndex].t.AcquireS
					} else if next != nil {
						next.AcquireS = 0
					}
					blocks = append(blocks, b)
					placed = true
					break
				}
				if next == nil {
					break
				}
				prev = next
			}
			if placed {
				break
			}
		}
		if !placed {
			break
		}
	}
	sort.SliceStable(blocks, func(i, j int) bool { return blocks[i].Start.Before(blocks[j].Start) })
	return blocks
}

// bestFiller chooses the filler for the idle time between prev and next
// (either may be nil) in dark span d.
func (en *engine) bestFiller(targets []*targetState, d span, prev, next *Block) (Block, bool) {
	type pick struct {
		ts    *targetState
		start float64
		n     int
	}
	var best *pick
	for _, ts := range targets {
		if len(ts.vis) == 0 || !ts.hasClock {
			continue
		}
		g := ts.goals[0]
		L := g.ExposureS + g.OverheadS
		acq := ts.t.AcquireS
		var s0, e0 float64
		switch {
		case prev == nil:
			s0 = d.lo + acq
		case prev.TargetIndex == ts.idx:
			s0 = unixSec(prev.End)
		default:
			s0 = unixSec(prev.End) + acq
		}
		switch {
		case next == nil:
			e0 = d.hi
		case next.TargetIndex == ts.idx:
			e0 = unixSec(next.Start)
		default:
			e0 = unixSec(next.Start) - targets[next.TargetIndex].t.AcquireS
		}
		for _, v := range ts.vis {
			lo := math.Ceil(math.Max(s0, v.lo+guardS))
			hi := math.Min(e0, v.hi-guardS)
			n := int(math.Floor((hi - lo) / L))
			if n < 1 || float64(n)*L < en.opt.FillMinS {
				continue
			}
			if best == nil || ts.t.Priority < best.ts.t.Priority ||
				(ts.t.Priority == best.ts.t.Priority && float64(n)*L > float64(best.n)*(best.ts.goals[0].ExposureS+best.ts.goals[0].OverheadS)) {
				best = &pick{ts, lo, n}
			}
		}
	}
	if best == nil {
		return Block{}, false
	}
	acq := best.ts.t.AcquireS
	if prev != nil && prev.TargetIndex == best.ts.idx {
		acq = 0
	}
	return en.block(best.ts, -1, best.ts.goals[0].ExposureS, false, best.start, best.n, acq, true), true
}
