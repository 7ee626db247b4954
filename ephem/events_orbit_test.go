package ephem_test

import (
	"errors"
	"math"
	"testing"
	"time"

	"phasecast/ephem"
)

// orbitModel is an independent model of a binary for the tests: the
// primary's position from Kepler's equation (solved here by Newton's method,
// not by the code under test), the line of sight along z, positive away from
// the observer, inclination 90°. Time is measured by the mean anomaly M.
type orbitModel struct {
	ecc, omegaRad float64
}

// state returns the primary's distance r (semi-major axis 1), its sky-plane
// coordinate along the line of nodes x₁ = r cos u and its depth z₁ = r sin u
// (u = ν + ω, from the ascending node; z₁ > 0 behind the centre of mass).
func (m orbitModel) state(M float64) (r, x1, z1 float64) {
	E := M
	for range 50 {
		d := (E - m.ecc*math.Sin(E) - M) / (1 - m.ecc*math.Cos(E))
		E -= d
		if math.Abs(d) < 1e-15 {
			break
		}
	}
	nu := 2 * math.Atan2(math.Sqrt(1+m.ecc)*math.Sin(E/2), math.Sqrt(1-m.ecc)*math.Cos(E/2))
	r = 1 - m.ecc*math.Cos(E)
	u := nu + m.omegaRad
	return r, r * math.Cos(u), r * math.Sin(u)
}

// v1 returns the primary's radial velocity (dz₁/dM, positive receding), by
// the five-point central difference of the position (error ~h⁴): no velocity
// formula is assumed.
func (m orbitModel) v1(M float64) float64 {
	const h = 1e-3
	z := func(x float64) float64 { _, _, z := m.state(x); return z }
	return (-z(M+2*h) + 8*z(M+h) - 8*z(M-h) + z(M-2*h)) / (12 * h)
}

// argMax returns the M in [0, 2π) maximising f: dense grid, then
// golden-section refinement.
func argMax(f func(float64) float64) float64 {
	const n = 4000
	best, bv := 0.0, math.Inf(-1)
	for i := range n {
		M := 2 * math.Pi * float64(i) / n
		if v := f(M); v > bv {
			best, bv = M, v
		}
	}
	a, b := best-2*math.Pi/n, best+2*math.Pi/n
	g := (math.Sqrt(5) - 1) / 2
	for range 80 {
		c, d := b-g*(b-a), a+g*(b-a)
		if f(c) > f(d) {
			b = d
		} else {
			a = c
		}
	}
	return math.Mod(0.5*(a+b)+2*math.Pi, 2*math.Pi)
}

// bruteEvents finds, in the model, the mean anomaly of each event from its
// physical definition.
func bruteEvents(m orbitModel) map[ephem.Event]float64 {
	out := map[ephem.Event]float64{}
	// Companion in front (primary behind, z₁ > 0) and aligned (x₁ = 0).
	out[ephem.EventInferiorConjunction] = argMax(func(M float64) float64 {
		_, x, z := m.state(M)
		if z <= 0 {
			return math.Inf(-1)
		}
		return -math.Abs(x)
	})
	out[ephem.EventSuperiorConjunction] = argMax(func(M float64) float64 {
		_, x, z := m.state(M)
		if z >= 0 {
			return math.Inf(-1)
		}
		return -math.Abs(x)
	})
	// Companion's velocity v₂ = −(M₁/M₂)·v₁: its maximum recession is the
	// primary's maximum approach (v₁ most negative).
	out[ephem.EventMaxRecession] = argMax(func(M float64) float64 { return -m.v1(M) })
	out[ephem.EventMaxApproach] = argMax(func(M float64) float64 { return m.v1(M) })
	// Ascending node: z₁ crosses zero going up (largest dz₁/dM among z₁ ≈ 0).
	out[ephem.EventAscendingNode] = argMax(func(M float64) float64 {
		_, _, z := m.state(M)
		if m.v1(M) <= 0 {
			return math.Inf(-1)
		}
		return -math.Abs(z)
	})
	if m.ecc > 0 {
		out[ephem.EventPeriastron] = argMax(func(M float64) float64 { r, _, _ := m.state(M); return -r })
	}
	return out
}

func phaseDiff(a, b float64) float64 { return math.Abs(a - b - math.Round(a-b)) }

// TestEventPhasesAgainstRVCurve: every named event lands, in the ephemeris'
// own convention, where the brute-force model puts it — circular and
// eccentric, inferior-conjunction and ascending-node conventions.
func TestEventPhasesAgainstRVCurve(t *testing.T) {
	cases := []struct {
		name     string
		ecc, om  float64
		conv     ephem.Convention
		refEvent ephem.Event
	}{
		{"CircularInferiorConjunction", 0, 0, ephem.ConvInferiorConjunction, ephem.EventInferiorConjunction},
		{"CircularAscendingNode", 0, 0, ephem.ConvAscendingNode, ephem.EventAscendingNode},
		{"CircularSuperiorConjunction", 0, 0, ephem.ConvSuperiorConjunction, ephem.EventSuperiorConjunction},
		{"Eccentric03Omega40", 0.3, 40, ephem.ConvInferiorConjunction, ephem.EventInferiorConjunction},
		{"Eccentric06Omega250TASC", 0.6, 250, ephem.ConvAscendingNode, ephem.EventAscendingNode},
		{"Eccentric01OmegaMinus100", 0.1, -100, ephem.ConvSuperiorConjunction, ephem.EventSuperiorConjunction},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e := testEphem()
			e.Ecc, e.OmegaDeg, e.Convention = c.ecc, c.om, c.conv
			brute := bruteEvents(orbitModel{c.ecc, c.om * math.Pi / 180})
			ref := brute[c.refEvent]
			worst := 0.0
			for ev, M := range brute {
				want := (M - ref) / (2 * math.Pi)
				got, err := e.EventPhase(ev, 0)
				if err != nil {
					t.Fatalf("%s: %v", ev, err)
				}
				d := phaseDiff(got, want)
				worst = math.Max(worst, d)
				if d > 1e-6 {
					t.Errorf("%s: EventPhase = %.7f, RV/geometry model says %.7f", ev, got, want-math.Floor(want))
				}
			}
			t.Logf("worst phase difference %.2g", worst)
		})
	}
}

// TestRVSignCircular pins the signs with the plain circular curve in the
// inferior-conjunction convention: v₁(φ) = −K₁ sin 2πφ (primary approaching
// just after the companion passes in front), so the companion (v₂ = −v₁/q)
// recedes fastest at 0.25 and approaches fastest at 0.75; in the TASC
// convention the companion's inferior conjunction is at 0.25.
func TestRVSignCircular(t *testing.T) {
	m := orbitModel{0, 0}
	ic := bruteEvents(m)[ephem.EventInferiorConjunction]
	// Companion's velocity in the model, sampled a quarter cycle after IC.
	v2 := -m.v1(ic + math.Pi/2)
	if v2 <= 0 {
		t.Fatalf("model: companion velocity a quarter cycle after inferior conjunction is %v, want receding (> 0)", v2)
	}
	e := testEphem()
	cases := []struct {
		ev   ephem.Event
		conv ephem.Convention
		want float64
	}{
		{ephem.EventMaxRecession, ephem.ConvInferiorConjunction, 0.25},
		{ephem.EventSuperiorConjunction, ephem.ConvInferiorConjunction, 0.5},
		{ephem.EventMaxApproach, ephem.ConvInferiorConjunction, 0.75},
		{ephem.EventAscendingNode, ephem.ConvInferiorConjunction, 0.75},
		{ephem.EventInferiorConjunction, ephem.ConvAscendingNode, 0.25},
		{ephem.EventMaxRecession, ephem.ConvAscendingNode, 0.5},
		{ephem.EventMaxApproach, ephem.ConvAscendingNode, 0},
	}
	for _, c := range cases {
		t.Run(string(c.conv)+"/"+string(c.ev), func(t *testing.T) {
			e.Convention = c.conv
			got, err := e.EventPhase(c.ev, 0)
			if err != nil {
				t.Fatal(err)
			}
			if phaseDiff(got, c.want) > 1e-12 {
				t.Errorf("EventPhase = %v, want %v", got, c.want)
			}
		})
	}
}

// TestConventionRoundTrip: one circular system described from its
// ascending node (pulsar timing) and from its companion's inferior
// conjunction (found on the model's geometry) gives the same event times to
// 1 ms, for every event.
func TestConventionRoundTrip(t *testing.T) {
	asc := testEphem()
	asc.Convention = ephem.ConvAscendingNode
	asc.Pdot = 3e-12
	brute := bruteEvents(orbitModel{0, 0})
	dPhase := (brute[ephem.EventInferiorConjunction] - brute[ephem.EventAscendingNode]) / (2 * math.Pi)
	dPhase -= math.Floor(dPhase)
	ic := asc
	ic.Convention = ephem.ConvInferiorConjunction
	ic.T0 = asc.TimeAt(0, dPhase)
	ic.PeriodDays = asc.PeriodDays * (1 + asc.Pdot*dPhase)
	ic.Pdot = asc.Pdot / (1 + asc.Pdot*dPhase)
	conv, err := asc.WithConvention(ephem.ConvInferiorConjunction, 0)
	if err != nil {
		t.Fatal(err)
	}
	from, to := asc.T0.AddDays(-1000), asc.T0.AddDays(1000)
	worst := 0.0
	for _, ev := range ephem.Events {
		if ev == ephem.EventPeriastron {
			continue
		}
		a, err1 := asc.EventTimes(ev, 0.004, from, to)
		b, err2 := ic.EventTimes(ev, 0.004, from, to)
		c, err3 := conv.EventTimes(ev, 0.004, from, to)
		if err := errors.Join(err1, err2, err3); err != nil {
			t.Fatal(err)
		}
		if len(a) != len(b) || len(a) != len(c) || len(a) < 30000 {
			t.Fatalf("%s: %d, %d and %d occurrences", ev, len(a), len(b), len(c))
		}
		for i := range a {
			d := math.Max(math.Abs(a[i].SubDays(b[i])), math.Abs(a[i].SubDays(c[i]))) * 86400
			worst = math.Max(worst, d)
			if d > 1e-3 {
				t.Fatalf("%s #%d: times differ by %.3g s", ev, i, d)
			}
		}
	}
	t.Logf("worst difference %.3g s over ±1000 days", worst)
}

func TestEclipseContacts(t *testing.T) {
	e := testEphem()
	dur := 0.0031 // days
	in, err1 := e.EventPhase(ephem.EventEclipseIngress, dur)
	out, err2 := e.EventPhase(ephem.EventEclipseEgress, dur)
	if err := errors.Join(err1, err2); err != nil {
		t.Fatal(err)
	}
	half := dur / 2 / e.PeriodDays
	if phaseDiff(in, -half) > 1e-12 || phaseDiff(out, half) > 1e-12 {
		t.Errorf("ingress %v, egress %v; want ∓%v about phase 0", in, out, half)
	}
	bad := []struct {
		name  string
		ev    ephem.Event
		dur   float64
		ecc   float64
		field string
	}{
		{"ErrNoDuration", ephem.EventEclipseIngress, 0, 0, "eclipse_duration"},
		{"ErrDurationNaN", ephem.EventEclipseEgress, math.NaN(), 0, "eclipse_duration"},
		{"ErrDurationLongerThanPeriod", ephem.EventEclipseEgress, 1, 0, "eclipse_duration"},
		{"ErrPeriastronCircular", ephem.EventPeriastron, 0, 0, "event"},
		{"ErrUnknownEvent", "transit", 0, 0, "event"},
	}
	for _, b := range bad {
		t.Run(b.name, func(t *testing.T) {
			f := e
			f.Ecc = b.ecc
			_, err := f.EventPhase(b.ev, b.dur)
			var ie *ephem.InputError
			if !errors.As(err, &ie) || ie.Field != b.field {
				t.Errorf("err = %v, want *InputError on %q", err, b.field)
			}
		})
	}
}

var (
	testSite = ephem.Site{LatDeg: -23.456, LonEastDeg: -67.891, ElevM: 2345}
	testStar = ephem.Star{RADeg: 263.417, DecDeg: -13.58}
)

func TestNextEventsUTC(t *testing.T) {
	e := testEphem()
	from := time.Date(2026, 3, 14, 0, 0, 0, 0, time.UTC)
	to := from.Add(24 * time.Hour)
	got := ephem.NextEventsUTC(testSite, testStar, e, 0.25, from, to)
	want := int(1 / e.PeriodDays)
	if len(got) < want || len(got) > want+1 {
		t.Fatalf("%d occurrences in a day, want %d or %d", len(got), want, want+1)
	}
	for i, tm := range got {
		_, ph, _ := ephem.PhaseAtUTC(testSite, testStar, e, tm)
		if phaseDiff(ph, 0.25)*e.PeriodDays*86400 > 2e-6 {
			t.Errorf("#%d at %v: phase %.9f, want 0.25", i, tm, ph)
		}
		if tm.Before(from) || tm.After(to) {
			t.Errorf("#%d at %v outside the range", i, tm)
		}
	}
}

func TestWindowOccurrences(t *testing.T) {
	e := testEphem()
	from := time.Date(2026, 3, 14, 0, 7, 0, 0, time.UTC)
	to := from.Add(10 * time.Hour)
	for _, w := range []ephem.PhaseWindow{{0.5, 0.1}, {0.98, 0.05}, {0.01, 0.2}} {
		t.Run("", func(t *testing.T) {
			ivs := ephem.WindowOccurrences(testSite, testStar, e, w, from, to)
			if len(ivs) < 5 {
				t.Fatalf("%d intervals", len(ivs))
			}
			for i, iv := range ivs {
				if !iv.Start.Before(iv.End) {
					t.Fatalf("#%d: empty interval %v", i, iv)
				}
				for _, f := range []float64{0.001, 0.5, 0.999} {
					at := iv.Start.Add(time.Duration(f * float64(iv.End.Sub(iv.Start))))
					if _, ph, _ := ephem.PhaseAtUTC(testSite, testStar, e, at); !w.Contains(ph) {
						t.Errorf("#%d: phase %.5f at %v inside the interval is outside the window", i, ph, at)
					}
				}
				// Just outside the ends (unless clipped by the range).
				for _, at := range []time.Time{iv.Start.Add(-time.Second), iv.End.Add(time.Second)} {
					if at.Before(from) || at.After(to) {
						continue
					}
					if _, ph, _ := ephem.PhaseAtUTC(testSite, testStar, e, at); w.Contains(ph) {
						t.Errorf("#%d: phase %.5f at %v, a second outside the interval, is inside the window", i, ph, at)
					}
				}
				if iv.Start.After(from) && iv.End.Before(to) {
					want := 2 * w.HalfWidth * e.PeriodDays * 86400
					if d := math.Abs(iv.End.Sub(iv.Start).Seconds() - want); d > 1e-3*want {
						t.Errorf("#%d: lasts %.3f s, want %.3f s", i, iv.End.Sub(iv.Start).Seconds(), want)
					}
				}
			}
		})
	}
	t.Run("WholeCycle", func(t *testing.T) {
		ivs := ephem.WindowOccurrences(testSite, testStar, e, ephem.PhaseWindow{Center: 0.3, HalfWidth: 0.5}, from, to)
		if len(ivs) != 1 || !ivs[0].Start.Equal(from) || !ivs[0].End.Equal(to) {
			t.Errorf("got %v, want the whole range", ivs)
		}
	})
	t.Run("ErrBadWindow", func(t *testing.T) {
		w := ephem.PhaseWindow{Center: math.NaN(), HalfWidth: 0.1}
		var ie *ephem.InputError
		if !errors.As(w.Validate(), &ie) || ie.Field != "phase_center" {
			t.Errorf("Validate() = %v", w.Validate())
		}
		if ivs := ephem.WindowOccurrences(testSite, testStar, e, w, from, to); ivs != nil {
			t.Errorf("got %v for an invalid window", ivs)
		}
	})
}

func TestPhaseSmearAndSpan(t *testing.T) {
	e := testEphem()
	if got, want := ephem.PhaseSmear(300, e), 300.0/86400/e.PeriodDays; math.Abs(got-want) > 1e-15 {
		t.Errorf("PhaseSmear = %v, want %v", got, want)
	}
	if got := ephem.PhaseSmear(math.NaN(), e); got != 0 {
		t.Errorf("PhaseSmear(NaN) = %v, want 0", got)
	}
	start := time.Date(2026, 3, 14, 3, 0, 0, 0, time.UTC)
	end := start.Add(2 * time.Hour)
	ps, pe := ephem.PhaseSpan(e, testSite, testStar, start, end)
	_, p0, _ := ephem.PhaseAtUTC(testSite, testStar, e, start)
	_, p1, _ := ephem.PhaseAtUTC(testSite, testStar, e, end)
	if ps != p0 || phaseDiff(pe, p1) > 1e-12 {
		t.Errorf("PhaseSpan = (%v, %v), phases at the ends %v, %v", ps, pe, p0, p1)
	}
	if want := 2.0 / 24 / e.PeriodDays; math.Abs(pe-ps-want) > 1e-3*want {
		t.Errorf("span %v cycles, want about %v", pe-ps, want)
	}
}
