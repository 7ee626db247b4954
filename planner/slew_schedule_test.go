package planner

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"sort"
	"strings"
	"testing"
)

// slewBruteForce returns the best schedule value of pr by exhaustive search
// over start-ordered sequences, written from the statement of the problem
// with a telescope (Options.Telescope), not from the solver's helpers: a
// block may follow one of its own target when it starts at or after its
// end; after another target's block p when SlewTime(tel, p's end pointing,
// its start pointing) fits between p's end and its start and after its
// acquisition floor; as the first block when settling and acquisition fit
// after the floor; one block per occurrence.
func slewBruteForce(pr *problem, tel Telescope) (score, []int) {
	idx := make([]int, len(pr.cands))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return pr.cands[idx[a]].start < pr.cands[idx[b]].start })
	best, bestSeq := score{}, []int(nil)
	used := make(map[int]bool)
	var seq []int
	var rec func(from int, prev *candidate, acc score)
	rec = func(from int, prev *candidate, acc score) {
		if best.less(acc) {
			best, bestSeq = acc, append([]int(nil), seq...)
		}
		for k := from; k < len(idx); k++ {
			c := &pr.cands[idx[k]]
			if used[c.occ] {
				continue
			}
			switch {
			case prev == nil:
				if c.start-(tel.SettleS+tel.AcquireS) < c.acqFloor-1e-6 {
					continue
				}
			case prev.target == c.target:
				if c.start < prev.end-1e-6 {
					continue
				}
			default:
				need := SlewTime(tel, prev.pt.end, c.pt.start).Seconds
				if c.start-need < math.Max(prev.end, c.acqFloor)-1e-6 {
					continue
				}
			}
			used[c.occ] = true
			seq = append(seq, idx[k])
			rec(k+1, c, acc.plus(c.val))
			seq = seq[:len(seq)-1]
			used[c.occ] = false
		}
	}
	rec(0, nil, score{})
	return best, bestSeq
}

// randomTelescope is a valid telescope: either mount, rates 0.5..4 °/s,
// accelerations 0 or 0.2..2 °/s², a dome in half the cases, a cable wrap
// of 360..540° in half the alt-azimuth cases.
func randomTelescope(r *rand.Rand) Telescope {
	ax := func() Axis {
		a := Axis{RateDegS: 0.5 + 3.5*r.Float64()}
		if r.IntN(3) > 0 {
			a.AccelDegS2 = 0.2 + 1.8*r.Float64()
		}
		return a
	}
	tel := Telescope{Mount: MountAltAz, Axis1: ax(), Axis2: ax(), SettleS: float64(r.IntN(4) * 5), AcquireS: float64(r.IntN(4) * 10)}
	if r.IntN(2) == 0 {
		tel.Mount = MountEquatorial
	}
	if r.IntN(2) == 0 {
		tel.Dome = Axis{RateDegS: 0.5 + 2*r.Float64(), AccelDegS2: 0.1 + r.Float64()}
	}
	if tel.Mount == MountAltAz && r.IntN(2) == 0 {
		half := 180 + 90*r.Float64()
		tel.WrapMinDeg, tel.WrapMaxDeg = -half, half
	}
	if err := tel.Validate(); err != nil {
		panic(err)
	}
	return tel
}

// randomSlewProblem builds a small abstract night with a telescope: nOcc
// occurrences over nTargets targets, each target at a random place in the
// sky moving steadily (its azimuth, altitude and hour angle drift through
// the night), candidates on a 30-second grid, at most maxCands in all.
func randomSlewProblem(r *rand.Rand, tel *Telescope, nTargets, nOcc, maxCands int) *problem {
	pr := &problem{nTargets: nTargets, nOcc: nOcc}
	type place struct{ az, alt, ha, dec, daz, dalt float64 }
	places := make([]place, nTargets)
	prio := make([]int, nTargets)
	for t := range places {
		places[t] = place{az: 360 * r.Float64(), alt: 15 + 70*r.Float64(), ha: -6 + 12*r.Float64(), dec: -60 + 120*r.Float64(),
			daz: -0.05 + 0.1*r.Float64(), dalt: -0.01 + 0.02*r.Float64()}
		prio[t] = 1 + r.IntN(3)
	}
	at2 := func(t int, u float64) Pointing {
		p := places[t]
		az := math.Mod(p.az+p.daz*u+720, 360)
		return Pointing{AzDeg: az, AltDeg: p.alt + p.dalt*u, HAHours: math.Remainder(p.ha+u/3600, 24), DecDeg: p.dec}
	}
	for len(pr.cands) < maxCands {
		k := r.IntN(nOcc)
		tg := k % nTargets
		s := float64(r.IntN(30) * 30)
		n := 1 + r.IntN(3)
		e := s + float64(n)*60
		c := candidate{start: s, end: e, acq: tel.minSlewS(), acqFloor: float64(r.IntN(2) * 30), target: tg, occ: k, n: n,
			val: at(priorityLevel(prio[tg]), int64(math.Pow(3, float64(5-prio[tg])))*int64(500000+n*100000), -int64(r.IntN(50)))}
		pe := &slewEnds{tel: tel, start: at2(tg, s), end: at2(tg, e)}
		pe.start.WrapDeg, pe.start.Wrapped = tel.centreWrap(pe.start.AzDeg), true
		pe.end.WrapDeg, pe.end.Wrapped = pe.start.WrapDeg+places[tg].daz*(e-s), true
		c.pt = pe
		pr.cands = append(pr.cands, c)
	}
	sortCandidates(pr.cands)
	setSlewBounds(pr.cands)
	return pr
}

// TestSlewSolveMatchesBruteForce: on 200 random small nights with a
// telescope (at most 7 candidate blocks each) the exact scheduler's value
// equals exhaustive search, its schedule obeys the slews, and each bound
// setSlewBounds sets holds for every move the night can ask for.
func TestSlewSolveMatchesBruteForce(t *testing.T) {
	r := rand.New(rand.NewPCG(17, 2026))
	slewsMattered := 0
	for trial := range 200 {
		tel := randomTelescope(r)
		pr := randomSlewProblem(r, &tel, 1+r.IntN(4), 2+r.IntN(5), 2+r.IntN(6))
		for i := range pr.cands {
			for j := range pr.cands {
				if s := SlewTime(tel, pr.cands[j].pt.end, pr.cands[i].pt.start).Seconds; s > pr.cands[i].acqMax+1e-9 || s < pr.cands[i].acq-1e-9 {
					t.Fatalf("trial %d: slew %v s outside the bounds %v..%v", trial, s, pr.cands[i].acq, pr.cands[i].acqMax)
				}
			}
		}
		want, wantSeq := slewBruteForce(pr, tel)
		sol := pr.solve(nil, 100000)
		if !sol.optimal {
			t.Fatalf("trial %d: not proven optimal", trial)
		}
		if !pr.feasible(sol.chosen) {
			t.Fatalf("trial %d: schedule %v breaks a rule", trial, sol.chosen)
		}
		if got := pr.value(sol.chosen); got != want || sol.value != want {
			t.Fatalf("trial %d: got %v (reported %v), exhaustive %v (%v)", trial, got, sol.value, want, wantSeq)
		}
		// Would the fixed minimum (settle + acquire) have allowed more?
		fixed := *pr
		fixed.cands = append([]candidate(nil), pr.cands...)
		for i := range fixed.cands {
			fixed.cands[i].pt = nil
		}
		if want.less(fixed.solve(nil, 100000).value) {
			slewsMattered++
		}
	}
	if slewsMattered < 20 {
		t.Errorf("slews changed the optimum on only %d of 200 nights: the check does not exercise them", slewsMattered)
	}
	t.Logf("200 random nights with a telescope: scheduler = exhaustive search; slews lowered the optimum on %d", slewsMattered)
}

// TestPlanNightTelescope plans the benchmark night with a telescope: every
// block after another target is charged its slew from that target (at the
// previous block's end) to its own (at its start), which fits between the
// blocks, names the previous target, and the first block is charged
// settling and acquisition only.
func TestPlanNightTelescope(t *testing.T) {
	req := benchNight(12)
	tel := Telescope{Mount: MountAltAz, Axis1: Axis{RateDegS: 2, AccelDegS2: 0.5}, Axis2: Axis{RateDegS: 1.5, AccelDegS2: 0.5},
		Dome: Axis{RateDegS: 1, AccelDegS2: 0.2}, SettleS: 10, AcquireS: 60, WrapMinDeg: -270, WrapMaxDeg: 270}
	req.Options.Telescope = &tel
	p, err := PlanNight(req)
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Blocks) < 3 || !p.Optimal {
		t.Fatalf("%d blocks, optimal %v: want a proven plan of several blocks", len(p.Blocks), p.Optimal)
	}
	en, tss, err := newEngine(req)
	if err != nil {
		t.Fatal(err)
	}
	var sawSlew bool
	for i, b := range p.Blocks {
		if i == 0 {
			if b.AcquireS != tel.SettleS+tel.AcquireS || b.PrevTarget != "" || b.SlewS != 0 {
				t.Errorf("first block: acquire %v, slew %v, previous %q; want %v, 0, none", b.AcquireS, b.SlewS, b.PrevTarget, tel.SettleS+tel.AcquireS)
			}
			continue
		}
		prev := p.Blocks[i-1]
		if b.PrevTarget != prev.Target {
			t.Errorf("block %d: previous target %q, want %q", i, b.PrevTarget, prev.Target)
		}
		if prev.TargetIndex == b.TargetIndex {
			if b.AcquireS != 0 {
				t.Errorf("block %d: %v s charged after the same target", i, b.AcquireS)
			}
			continue
		}
		ts, tp := tss[b.TargetIndex], tss[prev.TargetIndex]
		from := en.pointing(tp, unixSec(prev.End))
		to := en.pointing(ts, unixSec(b.Start))
		// The wrap positions the scheduler assumes: its start nearest the
		// wrap's centre, then following the target.
		to.WrapDeg, to.Wrapped = tel.centreWrap(to.AzDeg), true
		from.WrapDeg, from.Wrapped = tel.centreWrap(en.pointing(tp, unixSec(prev.Start)).AzDeg), true
		from.WrapDeg += wrap180(from.AzDeg - math.Mod(from.WrapDeg+720, 360))
		want := SlewTime(tel, from, to)
		if math.Abs(b.AcquireS-want.Seconds) > 0.5 || math.Abs(b.SlewS-(want.Seconds-tel.SettleS-tel.AcquireS)) > 0.5 {
			t.Errorf("block %d (%s after %s): charged %v s (slew %v), hand-made move %v s", i, b.Target, prev.Target, b.AcquireS, b.SlewS, want.Seconds)
		}
		if gap := b.Start.Sub(prev.End).Seconds(); gap < b.AcquireS-1e-3 {
			t.Errorf("block %d: %v s between the blocks, %v s of slew charged", i, gap, b.AcquireS)
		}
		sawSlew = sawSlew || b.SlewS > 0
	}
	if !sawSlew {
		t.Error("no block was charged a slew")
	}
	bad := tel
	bad.Mount = "fork"
	req.Options.Telescope = &bad
	if _, err := PlanNight(req); err == nil || !strings.Contains(err.Error(), "telescope.mount") || !strings.Contains(err.Error(), `"fork"`) || !strings.Contains(err.Error(), "altaz or equatorial") {
		t.Errorf("unknown mount: %v", err)
	}
}

// TestParseTelescope reads the written form back (benchTelescope round
// trip) and refuses bad documents naming the field, the value and what is
// accepted.
func TestParseTelescope(t *testing.T) {
	data, err := json.Marshal(benchTelescope.JSON())
	if err != nil {
		t.Fatal(err)
	}
	got, err := ParseTelescope(data)
	if err != nil || got != benchTelescope {
		t.Fatalf("round trip: %+v, %v; want %+v", got, err, benchTelescope)
	}
	for _, tc := range []struct{ doc, want string }{
		{`{"mount":"fork","axis1":{"rate_deg_s":2},"axis2":{"rate_deg_s":2}}`, `telescope.mount: "fork"`},
		{`{"mount":"equatorial","axis1":{"rate_deg_s":-2},"axis2":{"rate_deg_s":2}}`, "telescope.axis1.rate_deg_s: -2"},
		{`{"mount":"altaz","axis1":{"rate_deg_s":2},"axis2":{"rate_deg_s":2},"dome":{"rate_deg_s":1,"accel_deg_s2":-1}}`, "telescope.dome.accel_deg_s2: -1"},
		{`{"mount":"altaz","axis1":{"rate_deg_s":2},"axis2":{"rate_deg_s":2},"speed":3}`, `unknown field "speed"`},
		{`{"mount":"altaz"} {}`, "more than one JSON value"},
	} {
		_, err := ParseTelescope([]byte(tc.doc))
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: %v, want it to say %q", tc.doc, err, tc.want)
		}
	}
}
