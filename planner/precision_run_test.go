package planner_test

import (
	"errors"
	"math"
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
