package ephem_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"phasecast/ephem"
)

// synthTimings draws n timings of a true ephemeris at random cycles in
// [lo, hi], each with a random 1σ error in [sigLo, sigHi] days and Gaussian
// noise of that size.
func synthTimings(tb testing.TB, rng *rand.Rand, truth ephem.Ephemeris, n int, lo, hi int64, sigLo, sigHi float64) []ephem.Timing {
	tb.Helper()
	out := make([]ephem.Timing, n)
	for i := range out {
		c := lo + rng.Int64N(hi-lo+1)
		s := sigLo + (sigHi-sigLo)*rng.Float64()
		out[i] = ephem.Timing{Value: truth.TimeAt(c, 0).AddDays(s * rng.NormFloat64()), Std: ephem.StdBJDTDB, ErrDays: s}
	}
	return out
}

// TestFitCalibration: in 1,000 seeded trials the true T0 and P lie within
// the reported 1σ in 62–74 % of trials (68.3 % expected for Gaussian errors;
// the band is ±4 binomial σ), and an injected Ṗ is recovered within its 3σ.
func TestFitCalibration(t *testing.T) {
	truth := testEphem()
	guessFor := func(e ephem.Ephemeris) ephem.Ephemeris {
		g := e
		g.T0 = g.T0.AddDays(3e-5)
		g.PeriodDays += 2e-9
		g.Pdot, g.PdotErr = 0, 0
		return g
	}
	t.Run("Linear", func(t *testing.T) {
		rng := rand.New(rand.NewPCG(11, 12))
		const trials = 1000
		inT0, inP := 0, 0
		for trial := range trials {
			tm := synthTimings(t, rng, truth, 25, -2000, 3000, 2e-5, 1e-4)
			res, err := ephem.FitEphemeris(tm, guessFor(truth), false)
			if err != nil {
				t.Fatalf("trial %d: %v", trial, err)
			}
			trueT0 := truth.TimeAt(res.CycleShift, 0)
			if math.Abs(res.Ephem.T0.SubDays(trueT0)) <= res.Ephem.T0ErrDays {
				inT0++
			}
			if math.Abs(res.Ephem.PeriodDays-truth.PeriodDays) <= res.Ephem.PeriodErr {
				inP++
			}
		}
		fT0, fP := float64(inT0)/trials, float64(inP)/trials
		t.Logf("true T0 inside 1σ in %.1f %% of trials, true P in %.1f %%", 100*fT0, 100*fP)
		for _, f := range []float64{fT0, fP} {
			if f < 0.62 || f > 0.74 {
				t.Errorf("coverage %.3f outside 0.62–0.74", f)
			}
		}
	})
	t.Run("Quadratic", func(t *testing.T) {
		rng := rand.New(rand.NewPCG(31, 22))
		q := truth
		q.Pdot = -2e-11
		const trials = 1000
		in1, in3 := 0, 0
		var signif float64
		for trial := range trials {
			tm := synthTimings(t, rng, q, 30, -20000, 30000, 2e-5, 1e-4)
			g := guessFor(q)
			g.PeriodErr = 1e-9 // the linear guess drifts by Q·E² ≈ 0.025 cycle at the ends
			res, err := ephem.FitEphemeris(tm, g, true)
			if err != nil {
				t.Fatalf("trial %d: %v", trial, err)
			}
			// Ṗ is referred to the new T0: Ṗ' = Ṗ/(1+Ṗ·shift).
			want := q.Pdot / (1 + q.Pdot*float64(res.CycleShift))
			d := math.Abs(res.Ephem.Pdot - want)
			if d <= res.Ephem.PdotErr {
				in1++
			}
			if d <= 3*res.Ephem.PdotErr {
				in3++
			}
			signif += math.Abs(res.Ephem.Pdot) / res.Ephem.PdotErr / trials
		}
		t.Logf("injected Ṗ = %g: within 1σ in %.1f %%, within 3σ in %.1f %% of trials; mean significance %.1fσ", q.Pdot, 100*float64(in1)/trials, 100*float64(in3)/trials, signif)
		if f := float64(in3) / trials; f < 0.985 {
			t.Errorf("Ṗ within 3σ in only %.3f of trials", f)
		}
		if f := float64(in1) / trials; f < 0.62 || f > 0.74 {
			t.Errorf("Ṗ within 1σ in %.3f of trials, want 0.62–0.74", f)
		}
		if signif < 5 {
			t.Errorf("mean significance of the injected Ṗ only %.1fσ: the test cannot tell it from zero", signif)
		}
	})
}

func TestFitResult(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	truth := testEphem()
	tm := synthTimings(t, rng, truth, 40, -500, 4000, 3e-5, 6e-5)
	res, err := ephem.FitEphemeris(tm, truth, false)
	if err != nil {
		t.Fatal(err)
	}
	if rho := res.Cov[0][1] / math.Sqrt(res.Cov[0][0]*res.Cov[1][1]); math.Abs(rho) > 0.1 {
		t.Errorf("correlation of T0 and P after the move %.3f, want near 0", rho)
	}
	if !strings.Contains(res.Note, "T0 moved to cycle") {
		t.Errorf("Note %q does not say T0 moved", res.Note)
	}
	var chi2 float64
	for i, x := range tm {
		oc := x.Value.SubDays(res.Ephem.TimeAt(res.Cycles[i], 0))
		if math.Abs(oc-res.Residuals[i]) > 1e-9 {
			t.Errorf("timing %d: residual %.3g, O−C recomputed %.3g", i, res.Residuals[i], oc)
		}
		if got, want := res.Cycles[i]+res.CycleShift, int64(math.Round(x.Value.SubDays(truth.T0)/truth.PeriodDays)); got != want {
			t.Errorf("timing %d: cycle %d in the guess numbering, want %d", i, got, want)
		}
		chi2 += (oc / x.ErrDays) * (oc / x.ErrDays)
	}
	if math.Abs(chi2-res.ChiSq) > 1e-6*chi2 {
		t.Errorf("ChiSq %v, recomputed %v", res.ChiSq, chi2)
	}
	if want := chi2 / float64(len(tm)-2); math.Abs(res.RedChiSq-want) > 1e-9 {
		t.Errorf("RedChiSq %v, want %v", res.RedChiSq, want)
	}
	if res.Ephem.Convention != truth.Convention || res.Quadratic {
		t.Errorf("convention %q, quadratic %v", res.Ephem.Convention, res.Quadratic)
	}
	if err := res.Ephem.Validate(); err != nil {
		t.Error(err)
	}
}

// TestFitBootstrap: a guess far too loose to number distant timings, with
// timings dense enough to count cycles from one to the next.
func TestFitBootstrap(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	truth := testEphem()
	var tm []ephem.Timing
	for c := int64(0); c < 40000; c += 200 + rng.Int64N(300) {
		tm = append(tm, ephem.Timing{Value: truth.TimeAt(c, 0).AddDays(4e-5 * rng.NormFloat64()), Std: ephem.StdBJDTDB, ErrDays: 4e-5})
	}
	g := truth
	g.PeriodDays += 5e-7 // 0.35 cycle off after 40,000 cycles
	g.PeriodErr = 1e-6   // σ of 0.7 cycle after 40,000 cycles, 0.02 after 1,000
	// The guess alone cannot number the last timing...
	ends := []ephem.Timing{tm[0], tm[1], tm[len(tm)-1]}
	var ae *ephem.AmbiguityError
	if _, err := ephem.FitEphemeris(ends, g, false); !errors.As(err, &ae) {
		t.Fatalf("without the timings in between: err = %v, want *AmbiguityError", err)
	}
	// ...but counting from timing to timing can.
	res, err := ephem.FitEphemeris(tm, g, false)
	if err != nil {
		t.Fatal(err)
	}
	if d := math.Abs(res.Ephem.PeriodDays - truth.PeriodDays); d > 4*res.Ephem.PeriodErr {
		t.Errorf("P off by %.3g d (σ %.3g)", d, res.Ephem.PeriodErr)
	}
}

func TestFitAmbiguity(t *testing.T) {
	truth := testEphem()
	at := func(c int64, dt float64) ephem.Timing {
		return ephem.Timing{Value: truth.TimeAt(c, 0).AddDays(dt), Std: ephem.StdBJDTDB, ErrDays: 5e-5}
	}
	t.Run("TwoClustersNoPeriodError", func(t *testing.T) {
		// Two nights 5,000 cycles apart: N and N±1 cycles fit the same.
		tm := []ephem.Timing{at(0, 0), at(1, 2e-5), at(2, -1e-5), at(5000, 0), at(5001, 3e-5)}
		g := truth
		g.PeriodErr, g.CovT0P, g.T0ErrDays = 0, 0, 0
		_, err := ephem.FitEphemeris(tm, g, false)
		var ae *ephem.AmbiguityError
		if !errors.As(err, &ae) || ae.Index != -1 {
			t.Fatalf("err = %v, want *AmbiguityError for the whole set", err)
		}
		t.Log(err)
	})
	t.Run("TwoClustersPeriodKnown", func(t *testing.T) {
		tm := []ephem.Timing{at(0, 0), at(1, 2e-5), at(2, -1e-5), at(5000, 0), at(5001, 3e-5)}
		if _, err := ephem.FitEphemeris(tm, truth, false); err != nil {
			t.Fatalf("with σP = %g the count is certain, got %v", truth.PeriodErr, err)
		}
	})
	t.Run("TimingOffByHalfCycle", func(t *testing.T) {
		tm := []ephem.Timing{at(0, 0), at(10, 0), at(20, 0.4*truth.PeriodDays), at(30, 0)}
		_, err := ephem.FitEphemeris(tm, truth, false)
		var ae *ephem.AmbiguityError
		if !errors.As(err, &ae) || ae.Index != 2 || !strings.Contains(ae.Reason, "quarter cycle") {
			t.Fatalf("err = %v, want *AmbiguityError on timing 2 (a quarter cycle off)", err)
		}
		t.Log(err)
	})
	t.Run("GuessTooLoose", func(t *testing.T) {
		g := truth
		g.PeriodErr = 1e-5
		tm := []ephem.Timing{at(0, 0), at(1, 0), at(2, 0), at(90000, 0)}
		_, err := ephem.FitEphemeris(tm, g, false)
		var ae *ephem.AmbiguityError
		if !errors.As(err, &ae) || ae.Index != 3 {
			t.Fatalf("err = %v, want *AmbiguityError on timing 3", err)
		}
		t.Log(err)
	})
}

func TestFitBadInput(t *testing.T) {
	truth := testEphem()
	good := func() []ephem.Timing {
		return []ephem.Timing{
			{Value: truth.TimeAt(0, 0), Std: ephem.StdBJDTDB, ErrDays: 1e-4},
			{Value: truth.TimeAt(10, 0), Std: ephem.StdBJDTDB, ErrDays: 1e-4},
			{Value: truth.TimeAt(25, 0), Std: ephem.StdBJDTDB, ErrDays: 1e-4},
		}
	}
	cases := []struct {
		name  string
		edit  func([]ephem.Timing, *ephem.Ephemeris) []ephem.Timing
		quad  bool
		field string
	}{
		{"ErrStandardMissing", func(tm []ephem.Timing, _ *ephem.Ephemeris) []ephem.Timing { tm[1].Std = ""; return tm }, false, "timings[1].standard"},
		{"ErrStandardNotBJD", func(tm []ephem.Timing, _ *ephem.Ephemeris) []ephem.Timing { tm[2].Std = ephem.StdHJDUTC; return tm }, false, "timings[2].standard"},
		{"ErrErrorZero", func(tm []ephem.Timing, _ *ephem.Ephemeris) []ephem.Timing { tm[0].ErrDays = 0; return tm }, false, "timings[0].err"},
		{"ErrErrorNegative", func(tm []ephem.Timing, _ *ephem.Ephemeris) []ephem.Timing { tm[0].ErrDays = -1e-4; return tm }, false, "timings[0].err"},
		{"ErrValueNaN", func(tm []ephem.Timing, _ *ephem.Ephemeris) []ephem.Timing { tm[1].Value.Frac = math.NaN(); return tm }, false, "timings[1].value"},
		{"ErrValueInf", func(tm []ephem.Timing, _ *ephem.Ephemeris) []ephem.Timing { tm[1].Value.Day = math.Inf(-1); return tm }, false, "timings[1].value"},
		{"ErrTooFew", func(tm []ephem.Timing, _ *ephem.Ephemeris) []ephem.Timing { return tm[:1] }, false, "timings"},
		{"ErrTooFewQuadratic", func(tm []ephem.Timing, _ *ephem.Ephemeris) []ephem.Timing { return tm[:2] }, true, "timings"},
		{"ErrSameCycle", func(tm []ephem.Timing, _ *ephem.Ephemeris) []ephem.Timing {
			tm[1].Value, tm[2].Value = tm[0].Value, tm[0].Value.AddDays(1e-5)
			return tm
		}, false, "timings"},
		{"ErrGuessPeriodZero", func(tm []ephem.Timing, g *ephem.Ephemeris) []ephem.Timing { g.PeriodDays = 0; return tm }, false, "guess.period"},
		{"ErrGuessPeriodErrNegative", func(tm []ephem.Timing, g *ephem.Ephemeris) []ephem.Timing { g.PeriodErr = -1; return tm }, false, "guess.period_err"},
		{"ErrGuessConventionMissing", func(tm []ephem.Timing, g *ephem.Ephemeris) []ephem.Timing { g.Convention = ""; return tm }, false, "guess.convention"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			g := truth
			tm := c.edit(good(), &g)
			_, err := ephem.FitEphemeris(tm, g, c.quad)
			var ie *ephem.InputError
			if !errors.As(err, &ie) || ie.Field != c.field {
				t.Fatalf("err = %v, want *InputError on %q", err, c.field)
			}
		})
	}
	t.Run("OKGuessWithoutT0", func(t *testing.T) {
		g := truth
		g.T0, g.T0ErrDays, g.CovT0P = ephem.JD2{}, 0, 0
		res, err := ephem.FitEphemeris(good(), g, false)
		if err != nil {
			t.Fatal(err)
		}
		if d := math.Abs(res.Ephem.PeriodDays - truth.PeriodDays); d > 1e-9 {
			t.Errorf("P off by %g", d)
		}
	})
}

func BenchmarkFit1000(b *testing.B) {
	rng := rand.New(rand.NewPCG(7, 8))
	truth := testEphem()
	tm := synthTimings(b, rng, truth, 1000, -5000, 5000, 2e-5, 1e-4)
	b.ResetTimer()
	for b.Loop() {
		if _, err := ephem.FitEphemeris(tm, truth, false); err != nil {
			b.Fatal(err)
		}
	}
}

// TestFitNeverNaN: random, often silly, timing sets either fail with an
// error or give finite numbers everywhere.
func TestFitNeverNaN(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 14))
	truth := testEphem()
	fails := 0
	for trial := range 300 {
		n := 2 + rng.IntN(8)
		tm := make([]ephem.Timing, n)
		for i := range tm {
			c := rng.Int64N(1 + rng.Int64N(100000))
			tm[i] = ephem.Timing{
				Value:   truth.TimeAt(c, 0).AddDays(math.Pow(10, -6+5*rng.Float64()) * rng.NormFloat64()),
				Std:     ephem.StdBJDTDB,
				ErrDays: math.Pow(10, -7+5*rng.Float64()),
			}
		}
		g := truth
		g.PeriodErr = math.Pow(10, -12+6*rng.Float64())
		res, err := ephem.FitEphemeris(tm, g, rng.IntN(2) == 0)
		if err != nil {
			fails++
			continue
		}
		vals := []float64{res.Ephem.T0.Day, res.Ephem.T0.Frac, res.Ephem.PeriodDays, res.Ephem.PeriodErr, res.Ephem.T0ErrDays,
			res.Ephem.Pdot, res.Ephem.PdotErr, res.ChiSq, res.RedChiSq}
		vals = append(vals, res.Residuals...)
		for _, row := range res.Cov {
			vals = append(vals, row[:]...)
		}
		for _, v := range vals {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("trial %d: non-finite value in %+v", trial, res)
			}
		}
	}
	t.Logf("%d of 300 random sets refused with an error", fails)
}

// TestFitFixedCycles: timings far from a poorly known guess cannot be
// numbered (an *AmbiguityError); with the cycle of two of them given by
// hand the fit numbers the rest from them and recovers the true period, and
// reports the hand cycles as given. With every cycle given by hand, a wrong
// one is honoured too (the fit then goes through it, with a much worse χ²). A cycle out of range
// is refused naming the timing.
func TestFitFixedCycles(t *testing.T) {
	truth := testEphem()
	rng := rand.New(rand.NewPCG(14, 14))
	tm := synthTimings(t, rng, truth, 12, 4000, 6000, 2e-5, 5e-5)
	guess := truth
	guess.PeriodDays += 3e-7 // 3e-7 d × 5000 cycles = 0.0015 d: well inside a quarter cycle,
	guess.PeriodErr = 2e-5   // but σP × 5000 = 0.1 d: the neighbouring cycles are not excluded
	_, err := ephem.FitEphemeris(tm, guess, false)
	var ae *ephem.AmbiguityError
	if !errors.As(err, &ae) {
		t.Fatalf("without hand cycles: err = %v, want an AmbiguityError", err)
	}
	cycleOf := func(i int) int64 {
		c, _ := truth.CyclePhase(tm[i].Value)
		if _, ph := truth.CyclePhase(tm[i].Value); ph > 0.5 {
			c++
		}
		return c
	}
	lo, hi := 0, 0
	for i := range tm {
		if tm[i].Value.SubDays(tm[lo].Value) < 0 {
			lo = i
		}
		if tm[i].Value.SubDays(tm[hi].Value) > 0 {
			hi = i
		}
	}
	fixed := append([]ephem.Timing(nil), tm...)
	cl, ch := cycleOf(lo), cycleOf(hi)
	fixed[lo].Cycle, fixed[hi].Cycle = &cl, &ch
	res, err := ephem.FitEphemeris(fixed, guess, false)
	if err != nil {
		t.Fatalf("with the first and last cycles by hand: %v", err)
	}
	if d := math.Abs(res.Ephem.PeriodDays - truth.PeriodDays); d > 3*res.Ephem.PeriodErr {
		t.Errorf("P = %.12f ± %.2g, truth %.12f (off %.2g)", res.Ephem.PeriodDays, res.Ephem.PeriodErr, truth.PeriodDays, d)
	}
	for i := range tm {
		if got, want := res.Cycles[i]+res.CycleShift, cycleOf(i); got != want {
			t.Errorf("timing %d: cycle %d, want %d", i, got, want)
		}
	}
	// Every cycle by hand, the last one wrong by one: the fit takes them
	// as given.
	wrong := append([]ephem.Timing(nil), tm...)
	for i := range wrong {
		c := cycleOf(i)
		wrong[i].Cycle = &c
	}
	cw := ch + 1
	wrong[hi].Cycle = &cw
	resW, err := ephem.FitEphemeris(wrong, guess, false)
	if err != nil {
		t.Fatalf("wrong hand cycle: %v", err)
	}
	if got := resW.Cycles[hi] + resW.CycleShift; got != cw {
		t.Errorf("the hand cycle %d is not honoured: fitted cycle %d", cw, got)
	}
	if resW.ChiSq < 100*res.ChiSq {
		t.Errorf("a wrong hand cycle fits as well (χ² %.3g against %.3g)", resW.ChiSq, res.ChiSq)
	}
	bad := append([]ephem.Timing(nil), tm...)
	huge := int64(ephem.MaxFixedCycle + 1)
	bad[3].Cycle = &huge
	var ie *ephem.InputError
	if _, err := ephem.FitEphemeris(bad, guess, false); !errors.As(err, &ie) || ie.Field != "timings[3].cycle" {
		t.Errorf("cycle %d: err = %v, want an InputError on timings[3].cycle", huge, err)
	}
}
