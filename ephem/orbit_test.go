package ephem_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"phasecast/ephem"
)

// testEphem is an invented short-period binary (linear, with uncertainties).
func testEphem() ephem.Ephemeris {
	return ephem.Ephemeris{
		T0:         ephem.JD2{Day: 2459500.5, Frac: 0.3141592},
		T0ErrDays:  2e-5,
		PeriodDays: 0.0573921,
		PeriodErr:  3e-9,
		CovT0P:     -1e-14,
		Convention: ephem.ConvInferiorConjunction,
	}
}

func TestEphemerisValidate(t *testing.T) {
	ok := testEphem()
	cases := []struct {
		name  string
		edit  func(*ephem.Ephemeris)
		field string
	}{
		{"OK", func(*ephem.Ephemeris) {}, ""},
		{"OKQuadratic", func(e *ephem.Ephemeris) { e.Pdot, e.PdotErr = -3e-12, 1e-13 }, ""},
		{"OKCustom", func(e *ephem.Ephemeris) { e.Convention, e.PhaseOffset = ephem.ConvCustom, 0.6 }, ""},
		{"OKEccentric", func(e *ephem.Ephemeris) { e.Ecc, e.OmegaDeg = 0.4, -30 }, ""},
		{"ErrPeriodZero", func(e *ephem.Ephemeris) { e.PeriodDays = 0 }, "period"},
		{"ErrPeriodNegative", func(e *ephem.Ephemeris) { e.PeriodDays = -0.1 }, "period"},
		{"ErrPeriodNaN", func(e *ephem.Ephemeris) { e.PeriodDays = math.NaN() }, "period"},
		{"ErrPeriodInf", func(e *ephem.Ephemeris) { e.PeriodDays = math.Inf(1) }, "period"},
		{"ErrT0Missing", func(e *ephem.Ephemeris) { e.T0 = ephem.JD2{} }, "t0"},
		{"ErrT0NaN", func(e *ephem.Ephemeris) { e.T0.Frac = math.NaN() }, "t0"},
		{"ErrT0ErrNegative", func(e *ephem.Ephemeris) { e.T0ErrDays = -1e-5 }, "t0_err"},
		{"ErrPeriodErrNegative", func(e *ephem.Ephemeris) { e.PeriodErr = -1e-9 }, "period_err"},
		{"ErrPeriodErrInf", func(e *ephem.Ephemeris) { e.PeriodErr = math.Inf(1) }, "period_err"},
		{"ErrCovTooLarge", func(e *ephem.Ephemeris) { e.CovT0P = 1e-12 }, "cov_t0_p"},
		{"ErrPdotTooLarge", func(e *ephem.Ephemeris) { e.Pdot = 1e-6 }, "pdot"},
		{"ErrPdotErrNegative", func(e *ephem.Ephemeris) { e.PdotErr = -1 }, "pdot_err"},
		{"ErrConventionMissing", func(e *ephem.Ephemeris) { e.Convention = "" }, "convention"},
		{"ErrConventionUnknown", func(e *ephem.Ephemeris) { e.Convention = "mid_transit" }, "convention"},
		{"ErrOffsetWithoutCustom", func(e *ephem.Ephemeris) { e.PhaseOffset = 0.2 }, "phase_offset"},
		{"ErrCustomOffsetRange", func(e *ephem.Ephemeris) { e.Convention, e.PhaseOffset = ephem.ConvCustom, 1 }, "phase_offset"},
		{"ErrEcc", func(e *ephem.Ephemeris) { e.Ecc = 1 }, "ecc"},
		{"ErrOmegaNaN", func(e *ephem.Ephemeris) { e.OmegaDeg = math.NaN() }, "omega"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e := ok
			c.edit(&e)
			err := e.Validate()
			if c.field == "" {
				if err != nil {
					t.Fatalf("Validate() = %v, want nil", err)
				}
				return
			}
			var ie *ephem.InputError
			if !errors.As(err, &ie) {
				t.Fatalf("Validate() = %v, want *InputError", err)
			}
			if ie.Field != c.field || ie.Value == "" || ie.Accepted == "" {
				t.Errorf("Validate() = %+v, want field %q with value and accepted range", ie, c.field)
			}
		})
	}
}

// TestCyclePhaseProperties checks, for random instants over ±20 years and
// periods from 5 minutes to 1 day, linear and quadratic: 0 ≤ phase < 1, the
// cycle never decreases in time, and TimeAt(CyclePhase(t)) = t to 1 µs.
func TestCyclePhaseProperties(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, quad := range []bool{false, true} {
		name := map[bool]string{false: "Linear", true: "Quadratic"}[quad]
		t.Run(name, func(t *testing.T) {
			worst := 0.0
			for trial := range 200 {
				e := testEphem()
				e.PeriodDays = math.Exp(rng.Float64()*math.Log(1440/5)) * 5 / 1440
				if quad {
					e.Pdot = (rng.Float64()*2 - 1) * 1e-10
				}
				times := make([]ephem.JD2, 50)
				for i := range times {
					times[i] = e.T0.AddDays((rng.Float64()*2 - 1) * 20 * 365.25)
				}
				sortJD(times)
				prevC, prevP := int64(math.MinInt64), 0.0
				for _, tm := range times {
					c, ph := e.CyclePhase(tm)
					if !(ph >= 0 && ph < 1) {
						t.Fatalf("trial %d: phase %v outside [0,1)", trial, ph)
					}
					if c < prevC || (c == prevC && ph < prevP) {
						t.Fatalf("trial %d: (cycle, phase) went back in time: (%d, %v) after (%d, %v)", trial, c, ph, prevC, prevP)
					}
					prevC, prevP = c, ph
					back := e.TimeAt(c, ph)
					d := math.Abs(back.SubDays(tm)) * 86400
					worst = math.Max(worst, d)
					if d > 1e-6 {
						t.Fatalf("trial %d: TimeAt(CyclePhase(t)) − t = %.3g s, want ≤ 1 µs", trial, d)
					}
				}
			}
			t.Logf("worst round trip %.3g s", worst)
		})
	}
}

func sortJD(ts []ephem.JD2) {
	for i := 1; i < len(ts); i++ {
		for j := i; j > 0 && ts[j].SubDays(ts[j-1]) < 0; j-- {
			ts[j], ts[j-1] = ts[j-1], ts[j]
		}
	}
}

// TestCyclePhaseQuadraticExact: an instant built from t(E) = T0 + P·E + ½PṖE²
// inverts to the same cycle and phase, and differs from the linear answer.
func TestCyclePhaseQuadraticExact(t *testing.T) {
	e := testEphem()
	e.Pdot = -4e-11
	for _, E := range []float64{-150000.3, -2.75, 0.5, 7.125, 98765.875} {
		c := int64(math.Floor(E))
		ph := E - math.Floor(E)
		// Independent construction of t(E) in two parts.
		P := e.PeriodDays
		tm := e.T0.AddDays(P*float64(c) + 0.5*P*e.Pdot*float64(c)*float64(c)).
			AddDays(P*ph + P*e.Pdot*float64(c)*ph + 0.5*P*e.Pdot*ph*ph)
		gc, gph := e.CyclePhase(tm)
		if gc != c || math.Abs(gph-ph) > 1e-9 {
			t.Errorf("E = %v: CyclePhase = (%d, %.12f), want (%d, %.12f)", E, gc, gph, c, ph)
		}
		lin := e
		lin.Pdot = 0
		lc, lph := lin.CyclePhase(tm)
		if math.Abs(E) > 1000 && lc == c && math.Abs(lph-ph) < 1e-6 {
			t.Errorf("E = %v: the linear inversion agrees with the quadratic one; the test cannot tell them apart", E)
		}
	}
}

func TestNeverNaN(t *testing.T) {
	for _, e := range []ephem.Ephemeris{
		{},
		{PeriodDays: math.NaN(), T0: ephem.JD2{Day: 2459000.5}},
		{PeriodDays: -1, T0: ephem.JD2{Day: 2459000.5}},
		{PeriodDays: 0.1, T0: ephem.JD2{Day: math.Inf(1)}},
	} {
		at := ephem.JD2{Day: 2460000.5, Frac: 0.25}
		c, ph := e.CyclePhase(at)
		tm := e.TimeAt(3, 0.2)
		pe := e.PhaseErr(at)
		if math.IsNaN(ph) || math.IsNaN(pe) || math.IsNaN(tm.Day) || math.IsNaN(tm.Frac) ||
			math.IsInf(ph, 0) || math.IsInf(pe, 0) || c != 0 {
			t.Errorf("%+v: CyclePhase = (%d, %v), TimeAt = %v, PhaseErr = %v; want zeros, never NaN", e, c, ph, tm, pe)
		}
		if _, _, err := e.Locate(at); err == nil {
			t.Errorf("%+v: Locate gave no error", e)
		}
	}
}

// TestPhaseErr compares with σφ(E) = √(σT0² + E²σP² + 2E·cov)/P written out.
func TestPhaseErr(t *testing.T) {
	e := testEphem()
	for _, E := range []float64{0, 1, -5000.5, 12345.25, 3e5} {
		at := e.T0.AddDays(E * e.PeriodDays)
		want := math.Sqrt(e.T0ErrDays*e.T0ErrDays+E*E*e.PeriodErr*e.PeriodErr+2*E*e.CovT0P) / e.PeriodDays
		if got := e.PhaseErr(at); math.Abs(got-want) > 1e-9*want+1e-15 {
			t.Errorf("E = %v: PhaseErr = %.9g, want %.9g", E, got, want)
		}
	}
	t.Run("PdotTerm", func(t *testing.T) {
		q := e
		q.PdotErr = 1e-12
		E := 1e5
		at := q.TimeAt(int64(E), 0)
		want := math.Sqrt(e.T0ErrDays*e.T0ErrDays+E*E*e.PeriodErr*e.PeriodErr+2*E*e.CovT0P+
			math.Pow(0.5*e.PeriodDays*E*E*q.PdotErr, 2)) / e.PeriodDays
		if got := q.PhaseErr(at); math.Abs(got-want) > 1e-9*want {
			t.Errorf("PhaseErr = %.9g, want %.9g", got, want)
		}
	})
}

// TestWhenPhaseErrExceeds compares with the root of σP²E² + 2cov·E + σT0² =
// tol²P² (linear ephemeris).
func TestWhenPhaseErrExceeds(t *testing.T) {
	e := testEphem()
	tol := 0.05
	a, b, c := e.PeriodErr*e.PeriodErr, 2*e.CovT0P, e.T0ErrDays*e.T0ErrDays-tol*tol*e.PeriodDays*e.PeriodDays
	Eroot := (-b + math.Sqrt(b*b-4*a*c)) / (2 * a)
	want := e.T0.AddDays(Eroot * e.PeriodDays)
	got, ok := e.WhenPhaseErrExceeds(tol, e.T0)
	if !ok {
		t.Fatal("WhenPhaseErrExceeds: not found")
	}
	if d := math.Abs(got.SubDays(want)); d > 1.0/1440+1e-4*want.SubDays(e.T0) {
		t.Errorf("WhenPhaseErrExceeds = %.6f, want %.6f (off by %.3g d)", got.Float(), want.Float(), d)
	}
	t.Logf("σφ reaches %.2f after %.0f days (%.0f cycles)", tol, got.SubDays(e.T0), Eroot)
	t.Run("AlreadyExceeded", func(t *testing.T) {
		after := want.AddDays(100)
		if got, ok := e.WhenPhaseErrExceeds(tol, after); !ok || got != after {
			t.Errorf("got (%v, %v), want (%v, true)", got, ok, after)
		}
	})
	t.Run("NeverWithoutPeriodError", func(t *testing.T) {
		f := e
		f.PeriodErr, f.CovT0P = 0, 0
		if _, ok := f.WhenPhaseErrExceeds(tol, e.T0); ok {
			t.Error("found a crossing with σP = 0")
		}
	})
	t.Run("BadTolerance", func(t *testing.T) {
		for _, tol := range []float64{0, -1, math.NaN()} {
			if _, ok := e.WhenPhaseErrExceeds(tol, e.T0); ok {
				t.Errorf("tol %v accepted", tol)
			}
		}
	})
}

// TestWithConvention: moving T0 to another convention and back is the
// identity, and the event times do not move.
func TestWithConvention(t *testing.T) {
	for _, ecc := range []float64{0, 0.35} {
		e := testEphem()
		e.Pdot, e.PdotErr = 2e-11, 5e-12
		e.Ecc, e.OmegaDeg = ecc, 75
		for _, c := range []ephem.Convention{ephem.ConvAscendingNode, ephem.ConvSuperiorConjunction, ephem.ConvCustom} {
			off := 0.0
			if c == ephem.ConvCustom {
				off = 0.37
			}
			n, err := e.WithConvention(c, off)
			if err != nil {
				t.Fatal(err)
			}
			back, err := n.WithConvention(ephem.ConvInferiorConjunction, 0)
			if err != nil {
				t.Fatal(err)
			}
			if d := math.Abs(back.T0.SubDays(e.T0)) * 86400; d > 1e-6 {
				t.Errorf("e=%v %s: T0 round trip off by %.3g s", ecc, c, d)
			}
			if d := math.Abs(back.PeriodDays-e.PeriodDays) / e.PeriodDays; d > 1e-14 {
				t.Errorf("e=%v %s: period round trip off by %.3g (relative)", ecc, c, d)
			}
			if d := math.Abs(back.T0ErrDays - e.T0ErrDays); d > 1e-12 {
				t.Errorf("e=%v %s: σT0 round trip off by %.3g d", ecc, c, d)
			}
		}
	}
}
