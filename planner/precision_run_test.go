package planner_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"phasecast/ephem"
	"phasecast/planner"
)

// TestRunPrecision plans a seeded run with RV goals on two targets and
// measured timings on one, and checks the forecast: the exposure counts are
// those of the run's exposures, information only grows night by night (σK
// and σP never increase), the last night's forecast is the one after the
// plan, and the exposures still needed shrink once the plan is in.
func TestRunPrecision(t *testing.T) {
	req := runScenario(5, 5, 4)
	req.Targets[0].RV = &planner.RVGoal{Model: planner.RVCircular, KKms: 60, SigmaVKms: 5, WantRelK: 0.01}
	req.Targets[1].Ephem.Ecc, req.Targets[1].Ephem.OmegaDeg = 0.3, 75
	req.Targets[1].RV = &planner.RVGoal{Model: planner.RVEccentric, KKms: 25, SigmaVKms: 3}
	g := req.Targets[2].Goals[0]
	req.Targets[2].Goals = append(req.Targets[2].Goals, planner.Goal{Center: 0, HalfWidth: 0.04, ExposureS: g.ExposureS, OverheadS: g.OverheadS, MinNights: 2})
	rp := mustPlanRun(t, req)
	e2 := req.Targets[2].Ephem
	var timings []ephem.Timing
	for _, c := range []int64{-400, -250, -30, -2} {
		timings = append(timings, ephem.Timing{Value: e2.TimeAt(c, 0), Std: ephem.StdBJDTDB, ErrDays: 2e-4})
	}
	tps, err := rp.Precision(map[string][]ephem.Timing{req.Targets[2].Name: timings})
	if err != nil {
		t.Fatal(err)
	}
	if len(tps) != 3 {
		t.Fatalf("%d targets with a forecast, want 3", len(tps))
	}
	for _, tp := range tps {
		if tp.RV != nil {
			n, nObs := 0, 0
			for _, e := range rp.Exposures {
				if e.TargetIndex == tp.TargetIndex && !e.Failed {
					n++
					if !e.Planned {
						nObs++
					}
				}
			}
			f := tp.RV
			if f.After.N != n || f.Now.N != nObs {
				t.Errorf("%s: N now %d after %d, want %d and %d", tp.Target, f.Now.N, f.After.N, nObs, n)
			}
			if n < 2 || !f.After.Determined {
				t.Fatalf("%s: %d planned exposures, after %+v: the scenario should determine K", tp.Target, n, f.After)
			}
			prev := 0.0
			for k, p := range f.PerNight {
				if !p.Determined {
					continue
				}
				if prev > 0 && p.SigmaK > prev*(1+1e-12) {
					t.Errorf("%s night %d: σK %.4g above the previous night's %.4g", tp.Target, k, p.SigmaK, prev)
				}
				prev = p.SigmaK
			}
			if last := f.PerNight[len(f.PerNight)-1]; last.N != f.After.N || math.Abs(last.SigmaK-f.After.SigmaK) > 1e-12*f.After.SigmaK ||
				math.Abs(last.SigmaGamma-f.After.SigmaGamma) > 1e-12*f.After.SigmaGamma {
				t.Errorf("%s: last night %+v, after the plan %+v", tp.Target, last, f.After)
			}
			t.Logf("%s: %d exposures, σK %.3f km/s (σK/K %.2f %%), σγ %.3f, σφ0 %.5f; need %d more for %g (ok %v)",
				tp.Target, n, f.After.SigmaK, 100*f.After.RelK, f.After.SigmaGamma, f.After.SigmaPhase0, f.NeedAfter, f.Goal.WantRelK, f.NeedOK)
			if f.Goal.WantRelK > 0 && (!f.NeedOK || f.NeedAfter > f.NeedNow || f.NeedAfter == 0) {
				t.Errorf("%s: need now %d, after %d (ok %v): want 0 < after ≤ now for σK/K ≤ 1 %%", tp.Target, f.NeedNow, f.NeedAfter, f.NeedOK)
			}
		}
		if tp.Timing != nil {
			f := tp.Timing
			if f.Now.N != len(timings) || f.After.N != len(timings)+f.Planned || f.ErrDays != 2e-4 {
				t.Errorf("%s: timings now %d after %d (planned %d, error %g)", tp.Target, f.Now.N, f.After.N, f.Planned, f.ErrDays)
			}
			if f.Planned == 0 || !(f.After.SigmaPDays < f.Now.SigmaPDays) {
				t.Errorf("%s: %d planned timings leave σP at %g (now %g)", tp.Target, f.Planned, f.After.SigmaPDays, f.Now.SigmaPDays)
			}
			t.Logf("%s: %d planned timings, σP %.3g → %.3g d", tp.Target, f.Planned, f.Now.SigmaPDays, f.After.SigmaPDays)
		}
	}
}

func TestTargetRVValidated(t *testing.T) {
	req := runScenario(5, 2, 1)
	req.Targets[0].RV = &planner.RVGoal{Model: planner.RVCircular, KKms: -1, SigmaVKms: 5}
	_, err := planner.PlanRun(t.Context(), req, nil)
	var ie *ephem.InputError
	if !errors.As(err, &ie) || ie.Field != `targets[0] "RS-01".rv_k_kms` || ie.Value != "-1" {
		t.Fatalf("error %v, want targets[0] \"RS-01\".rv_k_kms -1", err)
	}
}

// TestRunPrecisionMonteCarlo simulates velocities at the mid-times a planned
// run gives one target (phases recomputed here from the mid-times, each
// velocity the curve's mean over its exposure by a Simpson rule written
// here), with Gaussian errors, fits γ and K by the test's own linear least
// squares, and compares the scatter of K over 2000 trials with the
// forecast's σK after the plan: within 5 %. The target's ephemeris errors
// are zero, so its phase is known and the fit is linear.
func TestRunPrecisionMonteCarlo(t *testing.T) {
	req := runScenario(5, 5, 4)
	tg := &req.Targets[0]
	tg.Ephem.T0ErrDays, tg.Ephem.PeriodErr = 0, 0
	const K, sv = 60.0, 5.0
	tg.RV = &planner.RVGoal{Model: planner.RVCircular, KKms: K, SigmaVKms: sv}
	rp := mustPlanRun(t, req)
	tps, err := rp.Precision(nil)
	if err != nil || len(tps) != 1 || tps[0].RV == nil || !tps[0].RV.After.Determined {
		t.Fatalf("forecast %+v, %v", tps, err)
	}
	pred := tps[0].RV.After.SigmaK
	phi0, err := tg.Ephem.EventPhase(ephem.EventSuperiorConjunction, 0)
	if err != nil {
		t.Fatal(err)
	}
	// ⟨sin 2π(φ − φ0)⟩ over each exposure, Simpson with 200 intervals.
	var basis [][]float64
	for _, e := range rp.Exposures {
		if e.TargetIndex != 0 || e.Failed {
			continue
		}
		_, phi, _ := ephem.PhaseAtUTC(req.Site, tg.Star(), tg.Ephem, e.Mid)
		d := e.ExposureS / 86400 / tg.Ephem.PeriodDays
		const n = 200
		var s float64
		for i := 0; i <= n; i++ {
			v := math.Sin(2 * math.Pi * (phi - d/2 + d*float64(i)/n - phi0))
			switch {
			case i == 0 || i == n:
				s += v
			case i%2 == 1:
				s += 4 * v
			default:
				s += 2 * v
			}
		}
		basis = append(basis, []float64{1, s / (3 * n)})
	}
	if len(basis) != tps[0].RV.After.N {
		t.Fatalf("%d exposures here, %d in the forecast", len(basis), tps[0].RV.After.N)
	}
	rng := rand.New(rand.NewPCG(12, 34))
	ks := make([]float64, 2000)
	y := make([]float64, len(basis))
	for k := range ks {
		var a [2][2]float64
		var r [2]float64
		for i, f := range basis {
			y[i] = 20 + K*f[1] + sv*rng.NormFloat64()
			for p := range 2 {
				r[p] += f[p] * y[i]
				for q := range 2 {
					a[p][q] += f[p] * f[q]
				}
			}
		}
		det := a[0][0]*a[1][1] - a[0][1]*a[1][0]
		ks[k] = (a[0][0]*r[1] - a[1][0]*r[0]) / det // Cramer's rule for the K component
	}
	var m, s float64
	for _, k := range ks {
		m += k
	}
	m /= float64(len(ks))
	for _, k := range ks {
		s += (k - m) * (k - m)
	}
	got := math.Sqrt(s / float64(len(ks)-1))
	t.Logf("%d planned exposures: scatter of K %.4f km/s, predicted σK %.4f km/s, ratio %.4f", len(basis), got, pred, got/pred)
	if math.Abs(got-pred) > 0.05*pred {
		t.Errorf("scatter of K %.4f km/s, predicted σK %.4f km/s: more than 5 %% apart", got, pred)
	}
}
