package planner

import (
	"errors"
	"math"
	"math/rand/v2"
	"reflect"
	"testing"
	"time"

	"phasecast/ephem"
)

// TestPlanProperties plans seeded random nights and checks every rule of
// the plan against the full path (checkPlanRules).
func TestPlanProperties(t *testing.T) {
	r := rand.New(rand.NewPCG(2026, 4))
	nights := 40
	if testing.Short() {
		nights = 10
	}
	blocks, unsched, optimal := 0, 0, 0
	for n := range nights {
		req := randomNight(r, 6)
		p, err := PlanNight(req)
		if err != nil {
			t.Fatalf("night %d: %v", n, err)
		}
		checkPlanRules(t, req, p)
		if t.Failed() {
			t.Fatalf("night %d (site %+v, %s) failed", n, req.Site, req.From.Format(time.DateOnly))
		}
		blocks += len(p.Blocks)
		unsched += len(p.Unscheduled)
		if p.Optimal {
			optimal++
		}
	}
	if blocks == 0 {
		t.Fatal("no block in any random night: the generator tests nothing")
	}
	if optimal != nights {
		t.Errorf("%d of %d nights proven optimal", optimal, nights)
	}
	t.Logf("%d random nights: %d blocks, %d unscheduled goals, all rules hold", nights, blocks, unsched)
}

// TestPlanFill checks fillers obey the same rules (phases excepted: they
// serve no goal) and only use idle time.
func TestPlanFill(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	fillers := 0
	for n := range 12 {
		req := randomNight(r, 5)
		req.Options.Fill = true
		req.Options.FillMinS = 300
		p, err := PlanNight(req)
		if err != nil {
			t.Fatalf("night %d: %v", n, err)
		}
		checkPlanRules(t, req, p)
		for _, b := range p.Blocks {
			if b.Filler {
				fillers++
				if b.GoalIndex != -1 || b.End.Sub(b.Start).Seconds() < 300-1e-6 {
					t.Errorf("night %d: filler %s goal %d lasts %v", n, b.Target, b.GoalIndex, b.End.Sub(b.Start))
				}
			}
		}
		if t.Failed() {
			t.Fatalf("night %d failed", n)
		}
	}
	if fillers == 0 {
		t.Fatal("no filler block in 12 nights")
	}
	t.Logf("%d filler blocks, all rules hold", fillers)
}

// TestPlanSingleGoalFeasible: a goal that can be reached alone (found by a
// brute-force scan of the full path) is never left unscheduled when it is
// the only goal of the only target. "Can be reached" means: a one-exposure
// block, with its acquisition in dark time, meets every constraint for every
// start in a span of StepS + 10 s (so that the planner's start grid of
// StepS in UTC meets it), the first exposure's mid-time in the window.
func TestPlanSingleGoalFeasible(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	checked, reachable := 0, 0
	for n := 0; checked < 60; n++ {
		req := randomNight(r, 3)
		for ti, tg := range req.Targets {
			for gi, g := range tg.Goals {
				one := req
				tt := tg
				tt.Goals = []Goal{g}
				one.Targets = []Target{tt}
				p, err := PlanNight(one)
				if err != nil {
					t.Fatal(err)
				}
				checked++
				found, at := bruteReachable(t, one, p)
				if found {
					reachable++
				}
				if found && len(p.Blocks) == 0 {
					t.Errorf("night %d target %d goal %d: reachable at %s (brute force) but unscheduled: %s: %s",
						n, ti, gi, at.Format(time.RFC3339), p.Unscheduled[0].Reason, p.Unscheduled[0].Detail)
				}
				if len(p.Blocks) == 0 && len(p.Unscheduled) != 1 {
					t.Errorf("night %d target %d goal %d: no block and %d unscheduled entries", n, ti, gi, len(p.Unscheduled))
				}
			}
		}
	}
	if reachable == 0 {
		t.Fatal("no reachable goal in the sample: the test checks nothing")
	}
	t.Logf("%d single goals, %d reachable by brute force, all of those scheduled", checked, reachable)
}

// bruteReachable scans the night every 20 s for a robust one-exposure block
// (see TestPlanSingleGoalFeasible), using the full path for the sky and the
// full BJD_TDB for the phase.
func bruteReachable(tb testing.TB, req NightRequest, p *Plan) (bool, time.Time) {
	tb.Helper()
	tg := req.Targets[0]
	g := tg.Goals[0]
	if tg.Ephem.PhaseErr(ephem.BJDTDB(req.Site, tg.Star(), req.From)) > 0.2 {
		return false, time.Time{}
	}
	ref := newFullRef(tb, req.Site, req.Constraints)
	L := g.ExposureS + g.OverheadS
	slack := req.Options.StepS
	if slack == 0 {
		slack = 60
	}
	slack += 10
	ok := func(s time.Time) bool {
		mid := s.Add(time.Duration(g.ExposureS / 2 * 1e9))
		if !inWindow(fullPhase(req.Site, tg, mid), g.Center, g.HalfWidth, -1e-4) {
			return false
		}
		for u := -tg.AcquireS - 3; u <= L+3; u += math.Max(10, (L+tg.AcquireS)/8) {
			if !ref.dark(s.Add(time.Duration(u * 1e9))) {
				return false
			}
		}
		for u := -3.0; u <= L+3; u += math.Min(30, L/2) {
			if ref.why(tg.Star(), s.Add(time.Duration(u*1e9))) != 0 {
				return false
			}
		}
		return ref.why(tg.Star(), s.Add(time.Duration((L+3)*1e9))) == 0
	}
	for _, d := range p.Dark {
		run := 0.0
		for s := d.Start; s.Before(d.End); s = s.Add(20 * time.Second) {
			if ok(s) {
				run += 20
				if run >= slack+20 {
					return true, s
				}
			} else {
				run = 0
			}
		}
	}
	return false, time.Time{}
}

// TestPlanRelaxMonotone: removing (or loosening) a constraint never lowers
// the objective's main value, on seeded random nights. The candidate starts
// do not depend on the constraints, so this holds exactly.
func TestPlanRelaxMonotone(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	relax := []struct {
		name string
		f    func(c *Constraints) bool // false: nothing to relax
	}{
		{"Airmass", func(c *Constraints) bool { ok := c.MaxAirmass != 0; c.MaxAirmass = 0; return ok }},
		{"Twilight", func(c *Constraints) bool { ok := c.Twilight != TwilightCivil; c.Twilight = TwilightCivil; return ok }},
		{"MoonSep", func(c *Constraints) bool { ok := c.MinMoonSepDeg != 0; c.MinMoonSepDeg = 0; return ok }},
		{"MoonIllum", func(c *Constraints) bool { ok := c.MaxMoonIllum != 0; c.MaxMoonIllum = 0; return ok }},
		{"HourAngle", func(c *Constraints) bool { ok := c.haApplied(); c.HAMinHours, c.HAMaxHours = 0, 0; return ok }},
		{"Horizon", func(c *Constraints) bool { ok := len(c.Horizon) > 0; c.Horizon = nil; return ok }},
		{"Zenith", func(c *Constraints) bool { ok := c.ZenithExclDeg != 0; c.ZenithExclDeg = 0; return ok }},
		{"MinAlt", func(c *Constraints) bool { ok := c.MinAltDeg != 0; c.MinAltDeg = 0; return ok }},
		{"SunAvoid", func(c *Constraints) bool { ok := c.SunAvoidDeg != 0; c.SunAvoidDeg = 0; return ok }},
	}
	pairs, gains := 0, 0
	for n := range 25 {
		req := randomNight(r, 5)
		base, err := PlanNight(req)
		if err != nil {
			t.Fatal(err)
		}
		for _, rx := range relax {
			loose := req
			if !rx.f(&loose.Constraints) {
				continue
			}
			p, err := PlanNight(loose)
			if err != nil {
				t.Fatal(err)
			}
			pairs++
			if !base.Optimal || !p.Optimal {
				t.Fatalf("night %d: not proven optimal", n)
			}
			if p.Objective.Less(base.Objective) {
				t.Errorf("night %d, %s removed: value %d < %d with it", n, rx.name, p.Value, base.Value)
			}
			if base.Objective.Less(p.Objective) {
				gains++
			}
		}
	}
	t.Logf("%d relaxations, %d scheduled more, none less", pairs, gains)
}

// TestPlanBeatsGreedyRealNight: a priority-1 goal with a long window and a
// priority-2 goal whose short window opens at the same time (and again 4.8 h
// later: its period is 0.2 d). First fit by priority puts the priority-1
// block at the start of its window and the short window's first occurrence
// is lost; the optimum serves the short window first.
func TestPlanBeatsGreedyRealNight(t *testing.T) {
	site := ephem.Site{LatDeg: 20, LonEastDeg: -156, ElevM: 3000}
	loc := time.FixedZone("HST", -10*3600)
	from, to := NightWindow(2027, 1, 10, loc)
	ev := ephem.Night(site, 2027, 1, 10, loc)
	start := ev.AstronomicalDusk.Add(40 * time.Minute)
	// A target crossing the meridian about two hours after dusk.
	mid := ev.AstronomicalDusk.Add(2 * time.Hour)
	ra := math.Mod(ephem.GMSTHours(mid)*15+site.LonEastDeg+720, 360)
	mk := func(name string, prio int, P, hw float64, ra float64) Target {
		st := ephem.Star{RADeg: ra, DecDeg: 15}
		b := ephem.BJDTDB(site, st, start)
		// Phase 0.5 opens (centre − hw) exactly at `start`.
		t0 := b.AddDays(-(0.5 - hw) * P)
		return Target{Name: name, RADeg: ra, DecDeg: 15, Priority: prio, AcquireS: 120,
			Ephem: ephem.Ephemeris{T0: t0, PeriodDays: P, Convention: ephem.ConvInferiorConjunction},
			Goals: []Goal{{Center: 0.5, HalfWidth: hw, ExposureS: 600, OverheadS: 30, NExposures: 1}}}
	}
	req := NightRequest{Site: site, From: from, To: to, Constraints: DefaultConstraints(), Targets: []Target{
		mk("Long-1", 1, 1.0, 0.05, ra),      // 2.4 h window
		mk("Short-2", 2, 0.2, 0.01, ra+0.5), // 5.8 min window
	}}
	p, err := PlanNight(req)
	if err != nil {
		t.Fatal(err)
	}
	checkPlanRules(t, req, p)
	if len(p.Unscheduled) != 0 {
		t.Fatalf("%d goals unscheduled, want both goals served", len(p.Unscheduled))
	}
	if p.Blocks[0].Target != "Short-2" {
		t.Errorf("first block %s, want Short-2 (its window is short)", p.Blocks[0].Target)
	}
	if !p.GreedyObjective.Less(p.Objective) {
		t.Errorf("optimum %d does not beat greedy %d", p.Value, p.GreedyValue)
	}
	t.Logf("optimum %d (2 goals) against greedy %d", p.Value, p.GreedyValue)
}

// TestPlanDeterministic: the same request gives the same plan.
func TestPlanDeterministic(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 9))
	for range 5 {
		req := randomNight(r, 6)
		a, err := PlanNight(req)
		if err != nil {
			t.Fatal(err)
		}
		b, err := PlanNight(req)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(a, b) {
			t.Fatal("two plans of the same request differ")
		}
	}
}

// TestPlanBadInput: each bad field gives an *ephem.InputError naming it.
func TestPlanBadInput(t *testing.T) {
	good := func() NightRequest {
		from, to := NightWindow(2026, 6, 1, time.UTC)
		return NightRequest{
			Site: ephem.Site{LatDeg: -30, LonEastDeg: 20}, From: from, To: to, Constraints: DefaultConstraints(),
			Targets: []Target{{Name: "T1", RADeg: 10, DecDeg: -20, Priority: 3,
				Ephem: ephem.Ephemeris{T0: ephem.NewJD2(2460000.5), PeriodDays: 0.1, Convention: ephem.ConvInferiorConjunction},
				Goals: []Goal{{Center: 0.25, HalfWidth: 0.05, ExposureS: 60}}}},
		}
	}
	tests := []struct {
		name  string
		mod   func(r *NightRequest)
		field string
	}{
		{"SiteLat", func(r *NightRequest) { r.Site.LatDeg = 95 }, "lat"},
		{"WindowReversed", func(r *NightRequest) { r.To = r.From.Add(-time.Hour) }, "to"},
		{"WindowTooLong", func(r *NightRequest) { r.To = r.From.Add(49 * time.Hour) }, "to"},
		{"Twilight", func(r *NightRequest) { r.Constraints.Twilight = "dusky" }, "twilight"},
		{"CustomSunAlt", func(r *NightRequest) {
			r.Constraints.Twilight, r.Constraints.SunAltMaxDeg = TwilightCustom, 5
		}, "sun_alt_max"},
		{"Airmass", func(r *NightRequest) { r.Constraints.MaxAirmass = 0.5 }, "max_airmass"},
		{"AirmassNaN", func(r *NightRequest) { r.Constraints.MaxAirmass = math.NaN() }, "max_airmass"},
		{"MoonIllum", func(r *NightRequest) { r.Constraints.MaxMoonIllum = 1.5 }, "max_moon_illum"},
		{"HAOrder", func(r *NightRequest) { r.Constraints.HAMinHours, r.Constraints.HAMaxHours = 2, -2 }, "ha_max"},
		{"HorizonAz", func(r *NightRequest) { r.Constraints.Horizon = []HorizonPoint{{AzDeg: 360, AltDeg: 5}} }, "horizon[0].az"},
		{"HorizonDup", func(r *NightRequest) {
			r.Constraints.Horizon = []HorizonPoint{{AzDeg: 10, AltDeg: 5}, {AzDeg: 10, AltDeg: 6}}
		}, "horizon[1].az"},
		{"Zenith", func(r *NightRequest) { r.Constraints.ZenithExclDeg = 45 }, "zenith_excl"},
		{"Name", func(r *NightRequest) { r.Targets[0].Name = " " }, `targets[0].name`},
		{"DupName", func(r *NightRequest) { r.Targets = append(r.Targets, r.Targets[0]) }, "targets[1].name"},
		{"RA", func(r *NightRequest) { r.Targets[0].RADeg = 360 }, `targets[0] "T1".ra`},
		{"Priority", func(r *NightRequest) { r.Targets[0].Priority = 0 }, `targets[0] "T1".priority`},
		{"NoGoals", func(r *NightRequest) { r.Targets[0].Goals = nil }, `targets[0] "T1".goals`},
		{"HalfWidth", func(r *NightRequest) { r.Targets[0].Goals[0].HalfWidth = 0.5 }, `targets[0] "T1".goals[0].phase_halfwidth`},
		{"Center", func(r *NightRequest) { r.Targets[0].Goals[0].Center = 1 }, `targets[0] "T1".goals[0].center`},
		{"Exposure", func(r *NightRequest) { r.Targets[0].Goals[0].ExposureS = 0 }, `targets[0] "T1".goals[0].exposure_s`},
		{"Overhead", func(r *NightRequest) { r.Targets[0].Goals[0].OverheadS = -1 }, `targets[0] "T1".goals[0].overhead_s`},
		{"Period", func(r *NightRequest) { r.Targets[0].Ephem.PeriodDays = 0 }, "period"},
		{"Event", func(r *NightRequest) { r.Targets[0].Goals[0].Event = "apastron" }, `targets[0] "T1".goals[0].event`},
		{"Step", func(r *NightRequest) { r.Options.StepS = 0.5 }, "step_s"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			req := good()
			tc.mod(&req)
			p, err := PlanNight(req)
			var ie *ephem.InputError
			if !errors.As(err, &ie) {
				t.Fatalf("got plan %v, error %v; want an *ephem.InputError", p != nil, err)
			}
			if ie.Field != tc.field {
				t.Errorf("field %q, want %q (%v)", ie.Field, tc.field, err)
			}
		})
	}
	if _, err := PlanNight(good()); err != nil {
		t.Fatalf("the good request fails: %v", err)
	}
}
