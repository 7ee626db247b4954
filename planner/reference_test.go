package planner

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"phasecast/ephem"
)

// fullRef evaluates the observing constraints by ephem's full path at single
// instants (ApparentPlace, Site.Horizontal, Site.SunAltDeg,
// Site.MoonTopocentric, MoonIlluminated), independently of the planner's fast
// path, interpolated Sun and Moon, and bisection.
type fullRef struct {
	site       ephem.Site
	c          Constraints
	mask       *horizonMask
	altAirmass float64
}

func newFullRef(tb testing.TB, site ephem.Site, c Constraints) fullRef {
	tb.Helper()
	rc, err := c.Resolved()
	if err != nil {
		tb.Fatal(err)
	}
	r := fullRef{site: site, c: rc, mask: newHorizonMask(rc.Horizon)}
	if rc.MaxAirmass > 0 {
		r.altAirmass = altForAirmass(rc.MaxAirmass)
	}
	return r
}

// dark reports whether the Sun's centre is below the twilight altitude.
func (r fullRef) dark(t time.Time) bool { return r.site.SunAltDeg(t) < r.c.SunAltMaxDeg }

// why returns the constraints (other than the Sun's altitude) that st
// violates at t.
func (r fullRef) why(st ephem.Star, t time.Time) reasonBits {
	ra, dec := ephem.ApparentPlace(st, t)
	h := r.site.Horizontal(ra, dec, t)
	altR := r.site.RefractedAltDeg(h.AltDeg)
	c := r.c
	var w reasonBits
	if altR < 0 {
		return bitBelowHorizon
	}
	if c.MaxAirmass > 0 {
		if x, ok := ephem.Airmass(altR); !ok || x > c.MaxAirmass {
			w |= bitAirmass
		}
	}
	if c.MinAltDeg != 0 && altR < c.MinAltDeg {
		w |= bitMinAlt
	}
	if r.mask != nil && altR < r.mask.minAltDeg(h.AzDeg) {
		w |= bitHorizonMask
	}
	if c.ZenithExclDeg > 0 && 90-altR < c.ZenithExclDeg {
		w |= bitZenith
	}
	if c.haApplied() && (h.HourAngleHours < c.HAMinHours || h.HourAngleHours > c.HAMaxHours) {
		w |= bitHourAngle
	}
	if c.MinMoonSepDeg > 0 || c.MaxMoonIllum > 0 {
		mra, mdec, _ := r.site.MoonTopocentric(t)
		if r.site.Horizontal(mra, mdec, t).AltDeg > moonUpAltDeg {
			if c.MinMoonSepDeg > 0 && ephem.SeparationDeg(ra, dec, mra, mdec) < c.MinMoonSepDeg {
				w |= bitMoonSep
			}
			if c.MaxMoonIllum > 0 && ephem.MoonIlluminated(t) > c.MaxMoonIllum {
				w |= bitMoonIllum
			}
		}
	}
	if c.SunAvoidDeg > 0 {
		sra, sdec, _ := ephem.SunApparent(t)
		if ephem.SeparationDeg(ra, dec, sra, sdec) < c.SunAvoidDeg {
			w |= bitSunAvoid
		}
	}
	return w
}

// airmass returns the target's airmass at t by the full path (40 below the
// horizon).
func (r fullRef) airmass(st ephem.Star, t time.Time) float64 {
	ra, dec := ephem.ApparentPlace(st, t)
	h := r.site.Horizontal(ra, dec, t)
	if x, ok := ephem.Airmass(r.site.RefractedAltDeg(h.AltDeg)); ok {
		return x
	}
	return 40
}

// fullPhase returns the phase at t from the full BJD_TDB.
func fullPhase(site ephem.Site, t Target, at time.Time) float64 {
	_, ph := t.Ephem.CyclePhase(ephem.BJDTDB(site, t.Star(), at))
	return ph
}

// checkPlanRules checks every rule the plan promises, against the full
// path: blocks in time order without overlap, acquisition charged before a
// change of target and before the first block, end − start = n(E+O), every
// constraint and the Sun's altitude met at every 30 s of every block and at
// its ends, every exposure's mid-time phase in its goal window, every goal
// either in a block or unscheduled (not both), objective ≥ greedy.
func checkPlanRules(tb testing.TB, req NightRequest, p *Plan) {
	tb.Helper()
	ref := newFullRef(tb, req.Site, req.Constraints)
	served := map[[2]int]bool{}
	for i, b := range p.Blocks {
		t := req.Targets[b.TargetIndex]
		name := fmt.Sprintf("block %d (%s goal %d %s)", i, b.Target, b.GoalIndex, b.Start.Format(time.RFC3339))
		L := b.ExposureS + b.OverheadS
		if d := b.End.Sub(b.Start).Seconds() - float64(b.N)*L; math.Abs(d) > 2e-6 {
			tb.Errorf("%s: end − start − n(E+O) = %g s", name, d)
		}
		wantAcq := t.AcquireS
		if i > 0 {
			prev := p.Blocks[i-1]
			if prev.TargetIndex == b.TargetIndex {
				wantAcq = 0
			}
			if gap := b.Start.Sub(prev.End).Seconds() - b.AcquireS; gap < -1e-6 {
				tb.Errorf("%s: overlaps the previous block and its acquisition by %g s", name, -gap)
			}
		}
		if b.AcquireS != wantAcq {
			tb.Errorf("%s: acquisition charged %g s, want %g s", name, b.AcquireS, wantAcq)
		}
		if b.AcquireS > 0 && !ref.dark(b.Start.Add(-time.Duration(b.AcquireS*1e9))) {
			tb.Errorf("%s: acquisition starts before dark time", name)
		}
		for u := b.Start; !u.After(b.End); u = u.Add(30 * time.Second) {
			checkInstant(tb, ref, t, u, name)
		}
		checkInstant(tb, ref, t, b.End, name)
		if !(b.AirmassMax <= req.Constraints.MaxAirmass || req.Constraints.MaxAirmass == 0) {
			tb.Errorf("%s: airmass_max %g above %g", name, b.AirmassMax, req.Constraints.MaxAirmass)
		}
		if b.Filler {
			continue
		}
		served[[2]int{b.TargetIndex, b.GoalIndex}] = true
		for k := 0; k < b.N; k++ {
			mid := b.Start.Add(time.Duration((float64(k)*L + b.ExposureS/2) * 1e9))
			ph := fullPhase(req.Site, t, mid)
			if !inWindow(ph, b.Goal.Center, b.Goal.HalfWidth, 0) {
				tb.Errorf("%s: exposure %d mid-time phase %.6f outside %.4f ± %.4f", name, k, ph, b.Goal.Center, b.Goal.HalfWidth)
			}
		}
	}
	listed := map[[2]int]bool{}
	for _, u := range p.Unscheduled {
		k := [2]int{u.TargetIndex, u.GoalIndex}
		if served[k] {
			tb.Errorf("%s goal %d is both in a block and unscheduled (%s)", u.Target, u.GoalIndex, u.Reason)
		}
		if listed[k] {
			tb.Errorf("%s goal %d listed twice as unscheduled", u.Target, u.GoalIndex)
		}
		listed[k] = true
		if u.Detail == "" || u.Reason == "" {
			tb.Errorf("%s goal %d unscheduled without a reason", u.Target, u.GoalIndex)
		}
	}
	for i, t := range req.Targets {
		goals, _ := t.ResolveGoals()
		for g := range goals {
			if k := [2]int{i, g}; !served[k] && !listed[k] {
				tb.Errorf("%s goal %d neither scheduled nor listed", t.Name, g)
			}
		}
	}
	if p.Objective.Less(p.GreedyObjective) {
		tb.Errorf("objective %v below greedy's %v", p.Objective, p.GreedyObjective)
	}
}

// checkInstant checks every constraint at one instant of a block.
func checkInstant(tb testing.TB, ref fullRef, t Target, u time.Time, name string) {
	tb.Helper()
	if !ref.dark(u) {
		tb.Errorf("%s: Sun at %.4f° at %s, above %g°", name, ref.site.SunAltDeg(u), u.Format(time.RFC3339), ref.c.SunAltMaxDeg)
	}
	if w := ref.why(t.Star(), u); w != 0 {
		tb.Errorf("%s: at %s violates %v (full path)", name, u.Format(time.RFC3339), w.reasons())
	}
}

// randomNight builds a seeded random night: a site anywhere between 65° S
// and 65° N, a date in 2020–2035, 1–6 invented targets with random orbits and
// goals, and a random subset of the constraints.
func randomNight(r *rand.Rand, maxTargets int) NightRequest {
	site := ephem.Site{LatDeg: -65 + 130*r.Float64(), LonEastDeg: -180 + 360*r.Float64(), ElevM: 3000 * r.Float64()}
	loc := time.FixedZone("local", int(math.Round(site.LonEastDeg/15))*3600)
	day := time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC).AddDate(0, 0, r.IntN(16*365))
	from, to := NightWindow(day.Year(), day.Month(), day.Day(), loc)
	c := DefaultConstraints()
	c.Twilight = []Twilight{TwilightCivil, TwilightNautical, TwilightAstronomical, TwilightCustom}[r.IntN(4)]
	c.SunAltMaxDeg = -15
	c.MaxAirmass = []float64{0, 1.5, 2, 3}[r.IntN(4)]
	if r.IntN(3) == 0 {
		c.MinMoonSepDeg = 10 + 40*r.Float64()
	}
	if r.IntN(4) == 0 {
		c.MaxMoonIllum = 0.2 + 0.6*r.Float64()
	}
	if r.IntN(4) == 0 {
		c.HAMinHours, c.HAMaxHours = -1-4*r.Float64(), 1+4*r.Float64()
	}
	if r.IntN(3) == 0 {
		for az := 0.0; az < 360; az += 60 + 60*r.Float64() {
			c.Horizon = append(c.Horizon, HorizonPoint{AzDeg: az, AltDeg: 25 * r.Float64()})
		}
	}
	if r.IntN(4) == 0 {
		c.ZenithExclDeg = 1 + 5*r.Float64()
	}
	if r.IntN(4) == 0 {
		c.MinAltDeg = 10 + 20*r.Float64()
	}
	req := NightRequest{Site: site, From: from, To: to, Constraints: c}
	nt := 1 + r.IntN(maxTargets)
	jd0 := 2458849.5 + float64(day.Sub(time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC)).Hours()/24)
	for i := range nt {
		// Targets near the meridian at local midnight half of the time, so
		// that most nights have something to do.
		ra := 360 * r.Float64()
		if r.IntN(2) == 0 {
			mid := to.Add(-12 * time.Hour)
			ra = math.Mod(ephem.GMSTHours(mid)*15+site.LonEastDeg+30*r.NormFloat64()+720, 360)
		}
		dec := math.Max(-89, math.Min(89, site.LatDeg+40*r.NormFloat64()))
		P := math.Exp(math.Log(0.02) + r.Float64()*math.Log(100)) // 0.02–2 d
		t := Target{
			Name: fmt.Sprintf("RT-%d", i+1), RADeg: ra, DecDeg: dec, Priority: 1 + r.IntN(5), AcquireS: float64(r.IntN(4) * 90),
			Ephem: ephem.Ephemeris{T0: ephem.NewJD2(jd0 - 2000*r.Float64()), PeriodDays: P, Convention: ephem.ConvInferiorConjunction,
				T0ErrDays: 1e-5 * r.Float64(), PeriodErr: 1e-9 * r.Float64()},
		}
		ng := 1 + r.IntN(3)
		for range ng {
			t.Goals = append(t.Goals, Goal{
				Center: r.Float64(), HalfWidth: 0.02 + 0.15*r.Float64(),
				ExposureS: math.Round(math.Min(20+600*r.Float64(), 0.3*P*86400)), OverheadS: float64(r.IntN(40)),
				NExposures: []int{0, 0, 1, 3}[r.IntN(4)],
			})
		}
		req.Targets = append(req.Targets, t)
	}
	return req
}
