package planner

import (
	"math"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
)

// Worked scenarios. Each sets up an invented site and target so that the
// expected plan can be reasoned out by hand; the reasoning is written beside
// the checks. All plans are also checked against every rule
// (checkPlanRules).

// phasedTarget returns a target at (ra, dec) whose ephemeris (inferior
// conjunction convention) puts phase `phase` at UTC instant `at`.
func phasedTarget(site ephem.Site, name string, ra, dec, P, phase float64, at time.Time, goals ...Goal) Target {
	st := ephem.Star{RADeg: ra, DecDeg: dec}
	t0 := ephem.BJDTDB(site, st, at).AddDays(-phase * P)
	return Target{Name: name, RADeg: ra, DecDeg: dec, Priority: 1, AcquireS: 120, Goals: goals,
		Ephem: ephem.Ephemeris{T0: t0, PeriodDays: P, Convention: ephem.ConvInferiorConjunction}}
}

// raOnMeridian returns the right ascension (degrees) on the site's meridian
// at t.
func raOnMeridian(site ephem.Site, t time.Time) float64 {
	return math.Mod(ephem.GMSTHours(t)*15+site.LonEastDeg+720, 360)
}

func planOrFail(t *testing.T, req NightRequest) *Plan {
	t.Helper()
	p, err := PlanNight(req)
	if err != nil {
		t.Fatal(err)
	}
	checkPlanRules(t, req, p)
	return p
}

// A quadrature falls exactly at astronomical dusk. The goal window is the
// quadrature ± 0.04 in phase (P = 6 h: ± 13.8 min); twilight is
// astronomical, so the first half of the window is lost. The acquisition
// (120 s) must lie in dark time, so no block starts before dusk + 120 s.
// Starts are whole UTC minutes or, for n exposures, the latest whole second
// that keeps the last exposure's mid-time in the window:
// s_n = ⌊w1 − (n−1)(E+O) − E/2⌋. So the most exposures possible is the
// largest n with s_n ≥ dusk + 120 s; with "as many as fit" the optimum
// takes exactly that many (value grows with n), every mid-time after the
// quadrature.
func TestScenarioQuadratureAtDusk(t *testing.T) {
	site := ephem.Site{LatDeg: -30.2, LonEastDeg: -70.8, ElevM: 2200}
	loc := time.FixedZone("CLT", -4*3600)
	from, to := NightWindow(2026, 4, 15, loc)
	ev := ephem.Night(site, 2026, 4, 15, loc)
	dusk := *ev.AstronomicalDusk
	const P, E, O, hw = 0.25, 180.0, 20.0, 0.04
	ra := raOnMeridian(site, dusk.Add(time.Hour))
	probe := Target{Ephem: ephem.Ephemeris{T0: ephem.NewJD2(2460000.5), PeriodDays: P, Convention: ephem.ConvInferiorConjunction}}
	quad, err := probe.Ephem.EventPhase(ephem.EventMaxRecession, 0)
	if err != nil {
		t.Fatal(err)
	}
	tg := phasedTarget(site, "Dusk-Q", ra, -35, P, quad, dusk,
		Goal{Event: string(ephem.EventMaxRecession), HalfWidth: hw, ExposureS: E, OverheadS: O})
	c := DefaultConstraints()
	c.Twilight = TwilightAstronomical
	req := NightRequest{Site: site, From: from, To: to, Constraints: c, Targets: []Target{tg}}
	p := planOrFail(t, req)

	darkLo := unixSec(p.Dark[0].Start)
	if d := math.Abs(darkLo - unixSec(dusk)); d > 1 {
		t.Errorf("dark starts %.3f s from ephem's astronomical dusk", d)
	}
	w1 := unixSec(dusk) + hw*P*86400 // the window's close, to well under a second
	nmax := 0
	for n := 1; ; n++ {
		if math.Floor(w1-float64(n-1)*(E+O)-E/2) < darkLo+tg.AcquireS {
			break
		}
		nmax = n
	}
	if len(p.Blocks) == 0 || p.Blocks[0].Start.Sub(dusk) > 15*time.Minute {
		t.Fatalf("no block in the window at dusk (blocks %d)", len(p.Blocks))
	}
	b := p.Blocks[0]
	t.Logf("dusk %s; block %s–%s, %d×%gs, first mid-time phase %.4f (quadrature %.4f)",
		dusk.Format("15:04:05"), b.Start.Format("15:04:05"), b.End.Format("15:04:05"), b.N, E, b.PhaseFirstMid, quad)
	if b.N != nmax || nmax < 2 {
		t.Errorf("n = %d, want %d (the most that fit after dusk + acquisition)", b.N, nmax)
	}
	if unixSec(b.Start)-b.AcquireS < darkLo {
		t.Errorf("acquisition starts before dusk")
	}
	if lead := b.PhaseFirstMid - quad; lead < (tg.AcquireS+E/2)/(P*86400)-1e-6 {
		t.Errorf("first mid-time only %.4f after the quadrature; the acquisition and half an exposure must come first", lead)
	}
}

// A circumpolar target (Dec +75° from 52° N: lowest altitude 37°, airmass
// 1.66) never leaves the airmass limit 2: its one observable interval is
// the whole dark time, and its gaps are daylight only. Alone, with a 6-hour
// orbit and goals at both quadratures, it gets a block in every goal window
// that lies in dark time with room to spare (about five in a 15-hour
// December night).
func TestScenarioCircumpolar(t *testing.T) {
	site := ephem.Site{LatDeg: 52, LonEastDeg: 5, ElevM: 30}
	loc := time.FixedZone("CET", 3600)
	from, to := NightWindow(2026, 12, 10, loc)
	midnight := to.Add(-12 * time.Hour)
	g := []Goal{{Center: 0.25, HalfWidth: 0.05, ExposureS: 300, OverheadS: 15}, {Center: 0.75, HalfWidth: 0.05, ExposureS: 300, OverheadS: 15}}
	tg := phasedTarget(site, "Pole-1", 40, 75, 0.25, 0.0, midnight, g...)
	req := NightRequest{Site: site, From: from, To: to, Constraints: DefaultConstraints(), Targets: []Target{tg}}
	p := planOrFail(t, req)
	v := p.Visibility[0]
	if len(v.Intervals) != 1 || len(p.Dark) != 1 ||
		v.Intervals[0].Start.Sub(p.Dark[0].Start).Abs() > time.Millisecond || v.Intervals[0].End.Sub(p.Dark[0].End).Abs() > time.Millisecond {
		t.Fatalf("visibility %v, want exactly the dark time %v", v.Intervals, p.Dark)
	}
	for _, gp := range v.Gaps {
		if len(gp.Reasons) != 1 || gp.Reasons[0] != ReasonDaylight {
			t.Errorf("gap %v–%v reasons %v, want only daylight", gp.Start, gp.End, gp.Reasons)
		}
	}
	// Windows lying in dark time with 10 minutes to spare: each must have
	// its block (cycle and goal).
	want := 0
	for gi, gl := range g {
		for _, w := range ephem.WindowOccurrences(site, tg.Star(), tg.Ephem, ephem.PhaseWindow{Center: gl.Center, HalfWidth: gl.HalfWidth}, from, to) {
			if w.Start.Before(p.Dark[0].Start.Add(10*time.Minute)) || w.End.After(p.Dark[0].End.Add(-10*time.Minute)) {
				continue
			}
			want++
			found := false
			for _, b := range p.Blocks {
				if b.GoalIndex == gi && !b.Start.After(w.End) && !b.End.Before(w.Start) {
					found = true
				}
			}
			if !found {
				t.Errorf("goal %d window %s–%s has no block", gi, w.Start.Format("15:04"), w.End.Format("15:04"))
			}
		}
	}
	if want < 4 {
		t.Fatalf("only %d windows in a 15-hour night of a 6-hour orbit", want)
	}
	t.Logf("dark %.1f h, %d windows inside, %d blocks", p.Dark[0].End.Sub(p.Dark[0].Start).Hours(), want, len(p.Blocks))
}

// A target sets (reaches airmass 2) in the middle of its goal window. The
// window is ± 0.08 of a 4.8-hour orbit (± 23 min) centred on the setting
// time; exposures are as many as fit. The block must end before the target
// crosses airmass 2 (found here by bisection on the full path), and since
// the value grows with every exposure it ends less than one exposure plus
// one grid step before it.
func TestScenarioSetsDuringWindow(t *testing.T) {
	site := ephem.Site{LatDeg: -25, LonEastDeg: 16, ElevM: 1800}
	loc := time.FixedZone("SAST", 2*3600)
	from, to := NightWindow(2026, 8, 20, loc)
	ev := ephem.Night(site, 2026, 8, 20, loc)
	mid := ev.NauticalDusk.Add(4 * time.Hour)
	// On the meridian 3 h before `mid` at Dec −10°: at hour angle 3 h it is
	// near 60° altitude, setting through 30° (airmass 2) some 2.4 h later.
	ra := raOnMeridian(site, mid.Add(-3*time.Hour))
	st := ephem.Star{RADeg: ra, DecDeg: -10}
	ref := newFullRef(t, site, DefaultConstraints())
	up := func(u time.Time) bool { return ref.why(st, u) == 0 }
	lo, hi := mid, mid.Add(4*time.Hour)
	if !up(lo) || up(hi) {
		t.Fatalf("test geometry: target not setting between %v and %v", lo, hi)
	}
	for hi.Sub(lo) > time.Millisecond {
		m := lo.Add(hi.Sub(lo) / 2)
		if up(m) {
			lo = m
		} else {
			hi = m
		}
	}
	set := lo
	const E, O = 240.0, 20.0
	tg := phasedTarget(site, "Setting-1", ra, -10, 0.2, 0.5, set, Goal{Center: 0.5, HalfWidth: 0.08, ExposureS: E, OverheadS: O})
	req := NightRequest{Site: site, From: from, To: to, Constraints: DefaultConstraints(), Targets: []Target{tg}}
	p := planOrFail(t, req)
	var b *Block
	for i := range p.Blocks {
		if p.Blocks[i].Start.Before(set) && p.Blocks[i].End.After(set.Add(-time.Hour)) {
			b = &p.Blocks[i]
		}
	}
	if b == nil {
		t.Fatalf("no block before the setting at %s", set.Format("15:04:05"))
	}
	slack := set.Sub(b.End).Seconds()
	t.Logf("sets %s; block %s–%s, %d exposures, airmass %.3f–%.3f, ends %.0f s before",
		set.Format("15:04:05"), b.Start.Format("15:04:05"), b.End.Format("15:04:05"), b.N, b.AirmassMin, b.AirmassMax, slack)
	if slack < guardS || slack > E+O+60+guardS {
		t.Errorf("block ends %.1f s before the target sets, want between %g and %g s", slack, guardS, E+O+60+guardS)
	}
	if b.AirmassMax > 2 || b.AirmassMax < 1.9 {
		t.Errorf("airmass_max %.4f, want just below 2", b.AirmassMax)
	}
	if v := p.Visibility[0].Intervals; len(v) == 0 || v[len(v)-1].End.Sub(set).Abs() > time.Second {
		t.Errorf("visibility ends %v, want the setting %v within 1 s", v, set)
	}
}

// A goal window that wraps through phase 0 (centre 0.98 ± 0.06: phases
// 0.92 to 0.04). With one-minute exposures as many as fit, the block covers
// the window and crosses phase 0: it starts near 0.92 and ends near 0.04, so
// its start phase is above its end phase, and every exposure's mid-time
// phase is in the window (checkPlanRules).
func TestScenarioWindowWrapsPhaseZero(t *testing.T) {
	site := ephem.Site{LatDeg: 28.7, LonEastDeg: -17.9, ElevM: 2300}
	loc := time.UTC
	from, to := NightWindow(2026, 1, 20, loc)
	midnight := to.Add(-12 * time.Hour)
	ra := raOnMeridian(site, midnight)
	tg := phasedTarget(site, "Wrap-1", ra, 30, 0.15, 0.98, midnight, Goal{Center: 0.98, HalfWidth: 0.06, ExposureS: 60, OverheadS: 10})
	tg.AcquireS = 60
	req := NightRequest{Site: site, From: from, To: to, Constraints: DefaultConstraints(), Targets: []Target{tg}}
	p := planOrFail(t, req)
	var b *Block
	for i := range p.Blocks {
		if p.Blocks[i].Start.Before(midnight) && p.Blocks[i].End.After(midnight) {
			b = &p.Blocks[i]
		}
	}
	if b == nil {
		t.Fatalf("no block across the window at midnight; blocks %d", len(p.Blocks))
	}
	t.Logf("block %s–%s n=%d phases %.4f → %.4f (first mid %.4f, last mid %.4f)",
		b.Start.Format("15:04:05"), b.End.Format("15:04:05"), b.N, b.PhaseStart, b.PhaseEnd, b.PhaseFirstMid, b.PhaseLastMid)
	if !(b.PhaseStart > 0.9 && b.PhaseEnd < 0.1) {
		t.Errorf("phases %.4f → %.4f do not cross phase 0", b.PhaseStart, b.PhaseEnd)
	}
	// The window is 0.12 × 3.6 h = 25.9 min: one-minute exposures every
	// 70 s fit floor(1555.2/70) + 1 = 23 times; the optimum fills it.
	if b.N != 23 {
		t.Errorf("n = %d, want 23 (the window's capacity)", b.N)
	}
}

// A 1.92-hour orbit in a night of about ten dark hours: the one goal comes
// round five times. A target near the zenith all night, alone, gets a block
// in every window that lies wholly in dark time, each in a different cycle.
func TestScenarioPeriodShorterThanNight(t *testing.T) {
	site := ephem.Site{LatDeg: -31, LonEastDeg: 149, ElevM: 1150}
	loc := time.FixedZone("AEST", 10*3600)
	from, to := NightWindow(2026, 6, 12, loc)
	midnight := to.Add(-12 * time.Hour)
	tg := phasedTarget(site, "Fast-1", raOnMeridian(site, midnight), -60, 0.08, 0.1, midnight,
		Goal{Center: 0.75, HalfWidth: 0.05, ExposureS: 120, OverheadS: 10, NExposures: 3})
	req := NightRequest{Site: site, From: from, To: to, Constraints: DefaultConstraints(), Targets: []Target{tg}}
	p := planOrFail(t, req)
	inside := 0
	for _, w := range ephem.WindowOccurrences(site, tg.Star(), tg.Ephem, ephem.PhaseWindow{Center: 0.75, HalfWidth: 0.05}, p.Dark[0].Start.Add(3*time.Minute), p.Dark[0].End) {
		if w.End.Sub(w.Start) > 11*time.Minute { // whole windows are 11.52 min
			inside++
		}
	}
	cycles := map[int64]bool{}
	for _, b := range p.Blocks {
		if cycles[b.Cycle] {
			t.Errorf("two blocks in cycle %d", b.Cycle)
		}
		cycles[b.Cycle] = true
		if b.N != 3 {
			t.Errorf("cycle %d: n = %d, want the 3 asked for", b.Cycle, b.N)
		}
	}
	t.Logf("%d windows wholly in dark time, %d blocks", inside, len(p.Blocks))
	if inside < 4 || len(p.Blocks) < inside {
		t.Errorf("%d blocks for %d windows in dark time", len(p.Blocks), inside)
	}
}

// At 60° N on the June solstice the Sun's lowest altitude is about
// −(90° − 60° − 23.44°) = −6.6°: civil darkness lasts about an hour and a
// half, nautical and astronomical darkness never come. With astronomical
// twilight nothing can be scheduled and every goal says why; with civil
// twilight a short dark span exists and the goal reachable in it is served.
func TestScenarioHighLatitudeSummer(t *testing.T) {
	site := ephem.Site{LatDeg: 60, LonEastDeg: 10, ElevM: 100}
	loc := time.FixedZone("CEST", 2*3600)
	from, to := NightWindow(2026, 6, 21, loc)
	ev := ephem.Night(site, 2026, 6, 21, loc)
	if ev.AstronomicalDusk != nil || ev.NauticalDusk != nil || ev.CivilDusk == nil {
		t.Fatalf("test geometry: ephem gives nautical dusk %v, civil dusk %v", ev.NauticalDusk, ev.CivilDusk)
	}
	solarMidnight := ev.CivilDusk.Add(ev.CivilDawn.Sub(*ev.CivilDusk) / 2)
	tg := phasedTarget(site, "North-1", math.Mod(raOnMeridian(site, solarMidnight)+180, 360), 80, 0.3, 0.5, solarMidnight,
		Goal{Center: 0.5, HalfWidth: 0.05, ExposureS: 120, OverheadS: 10})
	for _, tc := range []struct {
		tw    Twilight
		dark  bool
		block bool
	}{{TwilightAstronomical, false, false}, {TwilightNautical, false, false}, {TwilightCivil, true, true}} {
		t.Run(string(tc.tw), func(t *testing.T) {
			c := DefaultConstraints()
			c.Twilight = tc.tw
			req := NightRequest{Site: site, From: from, To: to, Constraints: c, Targets: []Target{tg}}
			p := planOrFail(t, req)
			if got := len(p.Dark) > 0; got != tc.dark {
				t.Fatalf("dark time %v, want %v", p.Dark, tc.dark)
			}
			if got := len(p.Blocks) > 0; got != tc.block {
				t.Fatalf("%d blocks, want some: %v", len(p.Blocks), tc.block)
			}
			if !tc.dark {
				if len(p.Unscheduled) != 1 || p.Unscheduled[0].Reason != UnschedNoDarkTime {
					t.Fatalf("unscheduled %+v, want no_dark_time", p.Unscheduled)
				}
				return
			}
			d := p.Dark[0]
			t.Logf("civil darkness %s–%s UTC (%.0f min); block %s–%s", d.Start.Format("15:04"), d.End.Format("15:04"),
				d.End.Sub(d.Start).Minutes(), p.Blocks[0].Start.Format("15:04"), p.Blocks[0].End.Format("15:04"))
			if d.Start.Sub(*ev.CivilDusk).Abs() > time.Second || d.End.Sub(*ev.CivilDawn).Abs() > time.Second {
				t.Errorf("dark %v, want ephem's civil dusk %v to dawn %v within 1 s", d, ev.CivilDusk, ev.CivilDawn)
			}
		})
	}
}

// An orbit longer than the night: P = 3 d, and the goal (phase 0.5 ± 0.02,
// ± 1.44 h) is centred at local midnight plus 1.5 d, so no part of any of
// its windows lies between the night's two local noons (the nearest window
// edges are 1.5 d − 1.44 h away from midnight, well outside the ± 12 h
// span). The goal must be unscheduled, with a reason that says the window
// does not come round tonight (not an empty list of windows).
func TestScenarioWindowNotTonight(t *testing.T) {
	site := ephem.Site{LatDeg: 52, LonEastDeg: 5, ElevM: 30}
	loc := time.FixedZone("CET", 3600)
	from, to := NightWindow(2026, 12, 10, loc)
	midnight := to.Add(-12 * time.Hour)
	g := Goal{Center: 0.5, HalfWidth: 0.02, ExposureS: 300, OverheadS: 15}
	// Phase 0.5 at midnight + 1.5 d means phase 0 at midnight.
	tg := phasedTarget(site, "Slow-1", 40, 75, 3, 0.0, midnight, g)
	p := planOrFail(t, NightRequest{Site: site, From: from, To: to, Constraints: DefaultConstraints(), Targets: []Target{tg}})
	if len(p.Blocks) != 0 || len(p.Unscheduled) != 1 {
		t.Fatalf("%d blocks, %d unscheduled; want 0 and 1", len(p.Blocks), len(p.Unscheduled))
	}
	u := p.Unscheduled[0]
	if u.Reason != UnschedWindowInDaylight || !strings.Contains(u.Detail, "does not come round") || strings.Contains(u.Detail, "( UTC)") {
		t.Errorf("reason %s %q; want %s saying the window does not come round tonight", u.Reason, u.Detail, UnschedWindowInDaylight)
	}
}
