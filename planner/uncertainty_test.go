package planner

import (
	"context"
	"math"
	"strings"
	"testing"

	"phasecast/ephem"
)

func TestUncertaintyRule(t *testing.T) {
	tests := []struct {
		name                string
		sigma, half, maxErr float64
		want                PhaseTrust
	}{
		{"Trusted", 0.01, 0.05, 0.25, PhaseTrusted},
		{"ThreeSigmaAtHalfWidth", 0.05 / 3, 0.05, 0.25, PhaseTrusted},
		{"Flagged", 0.02, 0.05, 0.25, PhaseFlagged},
		{"NoWindowNeverFlagged", 0.2, 0, 0.25, PhaseTrusted},
		{"RefusedAboveLimit", 0.26, 0.05, 0.25, PhaseRefused},
		{"StricterLimit", 0.06, 0.05, 0.05, PhaseRefused},
		{"Meaningless", 0.34, 0.05, 0.5, PhaseMeaningless},
		{"MeaninglessWhateverLimit", 1.7, 0.05, 1, PhaseMeaningless},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := UncertaintyRule(tc.sigma, tc.half, tc.maxErr); got != tc.want {
				t.Errorf("got %d, want %d", got, tc.want)
			}
			if note := UncertaintyNote(tc.sigma, tc.half, tc.maxErr); (note == "") != (tc.want == PhaseTrusted) {
				t.Errorf("note %q for trust %d", note, tc.want)
			}
		})
	}
}

// TestQueueWindowsFollowThePlannersRule: the redback of the scenario with
// a period so uncertain that σφ is 0.34 tonight gets no queue window (the
// planner refuses it too), and the windows say why; a flagged one keeps
// its windows marked Uncertain, as the planner's blocks are warned.
func TestQueueWindowsFollowThePlannersRule(t *testing.T) {
	req := scenarioNight(false)
	tg := req.Targets[0]
	// σφ = E·σP/P grows with the cycle count E from T0 (phase propagation
	// as in ephem.Ephemeris.PhaseErr): σP is set for the wanted σφ.
	set := func(sigmaPhase float64) []GoalWindows {
		t.Helper()
		x := tg
		mid := req.From.Add(req.To.Sub(req.From) / 2)
		x.Ephem.T0ErrDays, x.Ephem.PeriodErr = 0, 1e-6
		per := x.Ephem.PhaseErr(ephem.BJDTDB(req.Site, x.Star(), mid)) // linear in σP when σT0 = 0
		x.Ephem.PeriodErr = 1e-6 * sigmaPhase / per
		ws, err := QueueWindows(context.Background(), WindowRequest{Site: req.Site, From: req.From, To: req.To, Targets: []Target{x}, Constraints: req.Constraints}, nil)
		if err != nil {
			t.Fatal(err)
		}
		p, err := PlanNight(NightRequest{Site: req.Site, From: req.From, To: req.To, Targets: []Target{x}, Constraints: req.Constraints})
		if err != nil {
			t.Fatal(err)
		}
		refused := UncertaintyRule(sigmaPhase, 0, DefaultMaxPhaseErr) >= PhaseRefused
		if refused != (len(p.Blocks) == 0) {
			t.Errorf("σφ %.2f: %d planner blocks, refused %v", sigmaPhase, len(p.Blocks), refused)
		}
		return ws
	}
	for _, gw := range set(0.34) {
		if len(gw.Windows) != 0 || gw.Refused == 0 || !strings.Contains(gw.RefusedNote, "meaningless") {
			t.Errorf("σφ 0.34, goal %d: %d windows, %d refused (%q)", gw.GoalIndex, len(gw.Windows), gw.Refused, gw.RefusedNote)
		}
	}
	flagged := 0
	for _, gw := range set(0.02) {
		for _, w := range gw.Windows {
			if !w.Uncertain {
				t.Errorf("σφ 0.02 in a ±0.03 window: window at %s not marked uncertain", w.Start)
			}
			flagged++
		}
	}
	if flagged == 0 {
		t.Error("no window with σφ 0.02: the flagged case tested nothing")
	}
}

// TestPadSigmaWidensWindows: with PadSigma k the night's goal windows and
// the queue windows grow by k σ of phase on each side, alike.
func TestPadSigmaWidensWindows(t *testing.T) {
	req := scenarioNight(false)
	x := req.Targets[0]
	mid := req.From.Add(req.To.Sub(req.From) / 2)
	x.Ephem.T0ErrDays = 0.002 // σφ ≈ 0.008 at the night
	sigma := x.Ephem.PhaseErr(ephem.BJDTDB(req.Site, x.Star(), mid))
	req.Targets = []Target{x}
	length := func(k float64) (night, queue float64) {
		t.Helper()
		r := req
		r.Options.PadSigma = k
		m, err := newNightModel(r)
		if err != nil {
			t.Fatal(err)
		}
		for _, o := range m.occs {
			night = math.Max(night, o.occ.hi-o.occ.lo)
		}
		ws, err := QueueWindows(context.Background(), WindowRequest{Site: r.Site, From: r.From, To: r.To, Targets: r.Targets, Constraints: r.Constraints, Options: r.Options}, nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, gw := range ws {
			for _, w := range gw.Windows {
				queue = math.Max(queue, w.End.Sub(w.Start).Seconds())
			}
		}
		return night, queue
	}
	n0, q0 := length(0)
	n3, q3 := length(3)
	P := x.Ephem.PeriodDays * 86400
	if want := 2 * 3 * sigma * P; math.Abs((n3-n0)-want) > 0.01*want {
		t.Errorf("night windows grew by %.1f s with 3σ, want %.1f s", n3-n0, want)
	}
	if q3 <= q0 {
		t.Errorf("queue windows did not grow: %.1f s → %.1f s", q0, q3)
	}
	if _, err := PlanNight(NightRequest{Site: req.Site, From: req.From, To: req.To, Targets: req.Targets, Constraints: req.Constraints, Options: Options{PadSigma: 11}}); err == nil || !strings.Contains(err.Error(), "pad_sigma") {
		t.Errorf("PadSigma 11: error %v, want one naming pad_sigma", err)
	}
	t.Logf("σφ %.4f: longest night window %.0f → %.0f s, queue window %.0f → %.0f s", sigma, n0, n3, q0, q3)
}
