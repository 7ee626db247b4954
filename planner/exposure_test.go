package planner

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
)

// testInstrument is an invented 1.5 m telescope with a CCD.
func testInstrument() *Instrument {
	return &Instrument{
		Name: "1.5 m imager", ApertureM: 1.5, Throughput: 0.3, ZeroPoints: map[string]float64{"R": 2.1e10},
		ReadNoiseE: 5, DarkEPerSPix: 0.002, PixelArcsec: 0.35, SeeingArcsec: 1.1,
	}
}

// snrNight is an invented site and an invented 88-minute binary on a night
// with the target up all the dark time; each goal sizes its exposures for
// S/N 40 in V.
func snrNight(mag, snr float64) NightRequest {
	site := ephem.Site{LatDeg: -27.85, LonEastDeg: -69.12, ElevM: 2650}
	loc := time.FixedZone("local", -4*3600)
	from, to := NightWindow(2026, 12, 1, loc)
	t := Target{
		Name: "SNR-1", RADeg: 63.14125, DecDeg: -12.80194, Priority: 1, AcquireS: 120, Band: "V", Mag: mag,
		Ephem: ephem.Ephemeris{T0: ephem.NewJD2(2460500.4321987), PeriodDays: 0.0612345678, Convention: ephem.ConvInferiorConjunction},
		Goals: []Goal{
			{Center: 0.25, HalfWidth: 0.06, ExposureS: 60, OverheadS: 20, SNR: snr},
			{Center: 0.75, HalfWidth: 0.06, ExposureS: 60, OverheadS: 20, SNR: snr},
		},
	}
	return NightRequest{Site: site, From: from, To: to, Targets: []Target{t}, Constraints: DefaultConstraints(), Instrument: testInstrument()}
}

// TestPlanSizesExposuresBySNR: each block's exposure is sized for its own
// window's sky, stays within the smear limit, and the block reports the S/N
// per exposure and sky brightness at its middle as ephem computes them.
func TestPlanSizesExposuresBySNR(t *testing.T) {
	req := snrNight(17.5, 40)
	p, err := PlanNight(req)
	if err != nil {
		t.Fatal(err)
	}
	checkPlanRules(t, req, p)
	tg := req.Targets[0]
	limit := DefaultMaxSmear * tg.Ephem.PeriodDays * 86400
	distinct := map[float64]bool{}
	det, k, dark, err := req.Instrument.Detector(ephem.BandV)
	if err != nil {
		t.Fatal(err)
	}
	for _, b := range p.Blocks {
		if !b.SizedBySNR || !b.SNROK {
			t.Fatalf("block at %s not sized by S/N: %+v", b.Start.Format(time.RFC3339), b)
		}
		if b.ExposureS > limit+1e-9 || b.ExposureS == 60 {
			t.Errorf("block at %s: exposure %g s (smear limit %g s; the typed 60 s must not be used)", b.Start.Format(time.RFC3339), b.ExposureS, limit)
		}
		mid := b.Start.Add(b.End.Sub(b.Start) / 2)
		e, err := ephem.ExposureAt(req.Site, tg.Star(), mid, det, k, dark, tg.Mag)
		if err != nil {
			t.Fatal(err)
		}
		if got, want := b.SNR, e.Rates.SNR(b.ExposureS); math.Abs(got-want) > 1e-9*want {
			t.Errorf("block S/N %g, ephem gives %g", got, want)
		}
		if b.SkyMag != e.Sky.Mag {
			t.Errorf("block sky %g, ephem gives %g", b.SkyMag, e.Sky.Mag)
		}
		// Sized within the same window, the S/N at the block's middle
		// stays near the goal (the sky and airmass change little over a
		// 10-minute window of this orbit).
		if math.Abs(b.SNR-40) > 4 {
			t.Errorf("block at %s: S/N %.2f per exposure, goal 40", b.Start.Format(time.RFC3339), b.SNR)
		}
		distinct[math.Round(b.ExposureS*100)] = true
	}
	if len(p.Blocks) < 3 || len(distinct) < 3 {
		t.Errorf("%d blocks with %d distinct exposures: want exposures that vary through the night", len(p.Blocks), len(distinct))
	}
}

// TestPlanSNRUnreachable: a goal whose S/N needs more than the smear limit
// everywhere is listed with that reason and the best S/N reachable.
func TestPlanSNRUnreachable(t *testing.T) {
	req := snrNight(23, 100)
	p, err := PlanNight(req)
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Blocks) != 0 || len(p.Unscheduled) != 2 {
		t.Fatalf("%d blocks, %d unscheduled; want 0 and 2", len(p.Blocks), len(p.Unscheduled))
	}
	for _, u := range p.Unscheduled {
		if u.Reason != UnschedSNRUnreachable || !strings.Contains(u.Detail, "best S/N reachable is") || !strings.Contains(u.Detail, "smear limit of 0.02") {
			t.Errorf("unscheduled %+v", u)
		}
	}
	// The best S/N quoted is what the smear-limited exposure gives under
	// the best sky of the night: below the goal, and above what the worst
	// occurrence would give.
	sh := p.Unscheduled[0].Detail
	i := strings.LastIndex(sh, " ")
	var best float64
	if _, err := fmt.Sscan(sh[i+1:], &best); err != nil || best <= 0 || best >= 100 {
		t.Errorf("best S/N %q (%v) not in 0..100", sh[i+1:], err)
	}
}

// TestPlanWithoutInstrumentUnchanged: an S/N goal without an instrument uses
// its typed exposure, and a band without an S/N goal keeps the typed
// exposure but gains the S/N figure.
func TestPlanWithoutInstrumentUnchanged(t *testing.T) {
	req := snrNight(17.5, 40)
	req.Instrument = nil
	p, err := PlanNight(req)
	if err != nil {
		t.Fatal(err)
	}
	for _, b := range p.Blocks {
		if b.ExposureS != 60 || b.SizedBySNR || b.SNROK {
			t.Fatalf("without an instrument: %+v", b)
		}
	}
	req = snrNight(17.5, 0)
	p, err = PlanNight(req)
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Blocks) == 0 {
		t.Fatal("no blocks")
	}
	for _, b := range p.Blocks {
		if b.ExposureS != 60 || b.SizedBySNR || !b.SNROK || b.SNR <= 0 {
			t.Fatalf("typed exposure with an instrument: %+v", b)
		}
	}
}

func TestSizeExposureCapsAtSmear(t *testing.T) {
	req := snrNight(17.5, 40)
	tg := req.Targets[0]
	at := time.Date(2026, 12, 2, 4, 30, 0, 0, time.UTC)
	s, err := SizeExposure(req.Site, tg, tg.Goals[0], *req.Instrument, at)
	if err != nil {
		t.Fatal(err)
	}
	if !s.Reached || s.SNR < 40 || s.SNR > 40.5 || s.ExposureS < s.NeededS || s.ExposureS-s.NeededS >= 0.1 || math.Abs(s.ExposureS*10-math.Round(s.ExposureS*10)) > 1e-9 {
		t.Errorf("reachable goal: %+v", s)
	}
	g := tg.Goals[0]
	g.MaxSmear = 0.5 * s.ExposureS / (tg.Ephem.PeriodDays * 86400)
	c, err := SizeExposure(req.Site, tg, g, *req.Instrument, at)
	if err != nil {
		t.Fatal(err)
	}
	if c.Reached || math.Abs(c.ExposureS-c.LimitS) > 1e-9 || c.SNR >= 40 || math.Abs(c.NeededS-s.NeededS) > 1e-9 {
		t.Errorf("capped at half: %+v (uncapped %+v)", c, s)
	}
}

func TestSNRInputErrors(t *testing.T) {
	cases := []struct {
		name  string
		edit  func(*NightRequest)
		field string
	}{
		{"unknown band", func(r *NightRequest) { r.Targets[0].Band = "H" }, `targets[0] "SNR-1".band`},
		{"magnitude too faint", func(r *NightRequest) { r.Targets[0].Mag = 31 }, `targets[0] "SNR-1".mag`},
		{"negative snr", func(r *NightRequest) { r.Targets[0].Goals[1].SNR = -3 }, `targets[0] "SNR-1".goals[1].snr`},
		{"snr without band", func(r *NightRequest) { r.Targets[0].Band = "" }, `targets[0] "SNR-1".goals[0].snr`},
		{"smear too large", func(r *NightRequest) { r.Targets[0].Goals[0].MaxSmear = 0.5 }, `targets[0] "SNR-1".goals[0].max_smear`},
		{"zero aperture", func(r *NightRequest) { r.Instrument.ApertureM = 0 }, "instrument.aperture"},
		{"instrument band", func(r *NightRequest) { r.Instrument.Extinction = map[string]float64{"Q": 0.1} }, "instrument.band"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			req := snrNight(17.5, 40)
			c.edit(&req)
			_, err := PlanNight(req)
			var ie *ephem.InputError
			if !errors.As(err, &ie) || ie.Field != c.field || ie.Value == "" || ie.Accepted == "" {
				t.Fatalf("err = %v, want an InputError on %s", err, c.field)
			}
		})
	}
}

func TestTargetsCSVBrightnessColumns(t *testing.T) {
	const head = "name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority,band,mag,snr,max_smear\n"
	good := head +
		"SNR-1,04:12:33.9,-12:48:07,2460500.4321987,0.0612345678,0.25;0.75,0.06,60,20,1,V,17.5,40,0.015\n" +
		"SNR-2,04:20:00,-10:00:00,2460500.1,0.2,0.5,0.05,120,20,2,,,,\n"
	ts, err := ParseTargetsCSV(strings.NewReader(good))
	if err != nil {
		t.Fatal(err)
	}
	a, b := ts[0], ts[1]
	if a.Band != "V" || a.Mag != 17.5 || len(a.Goals) != 2 || a.Goals[1].SNR != 40 || a.Goals[1].MaxSmear != 0.015 {
		t.Errorf("row 1 = %+v", a)
	}
	if b.Band != "" || b.Mag != 0 || b.Goals[0].SNR != 0 || b.Goals[0].MaxSmear != 0 {
		t.Errorf("row 2 (empty optional cells) = %+v", b)
	}
	bad := head +
		"B-1,04:12:33.9,-12:48:07,2460500.4321987,0.06,0.25,0.06,60,20,1,H,17.5,,\n" +
		"B-2,04:12:33.9,-12:48:07,2460500.4321987,0.06,0.25,0.06,60,20,1,V,31,,\n" +
		"B-3,04:12:33.9,-12:48:07,2460500.4321987,0.06,0.25,0.06,60,20,1,,,50,\n" +
		"B-4,04:12:33.9,-12:48:07,2460500.4321987,0.06,0.25,0.06,60,20,1,V,15,50,0.6\n"
	_, err = ParseTargetsCSV(strings.NewReader(bad))
	var te *TableError
	if !errors.As(err, &te) {
		t.Fatalf("err = %v, want a TableError", err)
	}
	want := map[string]int{"band": 2, "mag": 3, "snr": 4, "max_smear": 5}
	for column, line := range want {
		found := false
		for _, c := range te.Cells {
			if c.Column == column && c.Line == line && c.Reason != "" {
				found = true
			}
		}
		if !found {
			t.Errorf("no error for %s on line %d in %v", column, line, te.Cells)
		}
	}
}

// TestQueueWindowsSizeBySNR: with an instrument, each queue window of an S/N
// goal carries the exposure sized at its middle and counts exposures of that
// length; a goal the smear limit stops short has windows with no exposures
// and the best S/N reachable.
func TestQueueWindowsSizeBySNR(t *testing.T) {
	night := snrNight(17.5, 40)
	faint := night.Targets[0]
	faint.Name, faint.Mag, faint.Goals = "SNR-2", 23, faint.Goals[:1]
	faint.Goals[0].SNR = 100
	req := WindowRequest{Site: night.Site, From: night.From, To: night.From.Add(72 * time.Hour),
		Targets: []Target{night.Targets[0], faint}, Constraints: night.Constraints, Instrument: night.Instrument}
	lists, err := QueueWindows(t.Context(), req, nil)
	if err != nil {
		t.Fatal(err)
	}
	seen := 0
	for _, gw := range lists {
		tg := req.Targets[gw.TargetIndex]
		for _, w := range gw.Windows {
			if w.Sizing == nil {
				t.Fatalf("%s window at %s not sized", gw.Target, w.Start.Format(time.RFC3339))
			}
			mid := w.Start.Add(w.End.Sub(w.Start) / 2)
			want, err := SizeExposure(req.Site, tg, gw.Goal, *req.Instrument, mid)
			if err != nil {
				t.Fatal(err)
			}
			if *w.Sizing != want {
				t.Errorf("window sizing %+v, SizeExposure at its middle gives %+v", *w.Sizing, want)
			}
			d := w.End.Sub(w.Start).Seconds()
			n := int(math.Floor((d + gw.Goal.OverheadS) / (want.ExposureS + gw.Goal.OverheadS)))
			switch {
			case gw.Target == "SNR-2" && (w.Sizing.Reached || w.Exposures != 0 || w.Sizing.SNR >= 100):
				t.Errorf("faint target's window %+v", w)
			case gw.Target == "SNR-1" && (!w.Sizing.Reached || (d >= want.ExposureS && w.Exposures != n)):
				t.Errorf("window of %g s: %d exposures of %g s, want %d", d, w.Exposures, want.ExposureS, n)
			}
			seen++
		}
	}
	if seen < 10 {
		t.Errorf("only %d windows in three nights", seen)
	}
}

// TestMagAtPhase checks the variable's magnitude: the extremes at their
// phases, linear between them along both arcs.
func TestMagAtPhase(t *testing.T) {
	v := Target{Band: "V", Mag: 17, FaintMag: 18, FaintPhase: 0, BrightMag: 16, BrightPhase: 0.25}
	cases := []struct{ phi, want float64 }{
		{0, 18}, {0.25, 16}, {0.125, 17}, // the short arc
		{0.625, 17}, {0.5, 16 + 2.0/3}, {0.99, 18 - 2*0.01/0.75}, // the long arc
	}
	for _, c := range cases {
		if got := v.MagAtPhase(c.phi); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("MagAtPhase(%g) = %.12g, want %.12g", c.phi, got, c.want)
		}
	}
	if got := (Target{Mag: 15.5}).MagAtPhase(0.3); got != 15.5 {
		t.Errorf("constant star: %g", got)
	}
}

// TestSizeExposureVariable: a goal at the faint phase needs a longer
// exposure than one at the bright phase, each by its own magnitude.
func TestSizeExposureVariable(t *testing.T) {
	req := snrNight(17.5, 40)
	tg := req.Targets[0]
	tg.FaintMag, tg.FaintPhase, tg.BrightMag, tg.BrightPhase = 18.5, 0.75, 17.0, 0.25
	at := time.Date(2026, 12, 2, 4, 30, 0, 0, time.UTC)
	bright, err := SizeExposure(req.Site, tg, tg.Goals[0], *req.Instrument, at)
	if err != nil {
		t.Fatal(err)
	}
	faint, err := SizeExposure(req.Site, tg, tg.Goals[1], *req.Instrument, at)
	if err != nil {
		t.Fatal(err)
	}
	steady := tg
	steady.FaintMag, steady.BrightMag, steady.Mag = 0, 0, 18.5
	want, err := SizeExposure(req.Site, steady, tg.Goals[1], *req.Instrument, at)
	if err != nil {
		t.Fatal(err)
	}
	if !(faint.NeededS > bright.NeededS) || faint.NeededS != want.NeededS {
		t.Errorf("bright phase %g s, faint phase %g s (a steady 18.5 mag star: %g s)", bright.NeededS, faint.NeededS, want.NeededS)
	}
	bad := tg
	bad.BrightMag = 19
	req.Targets = []Target{bad}
	_, err = PlanNight(req)
	var ie *ephem.InputError
	if !errors.As(err, &ie) || !strings.HasSuffix(ie.Field, ".bright_mag") {
		t.Errorf("bright fainter than faint: %v", err)
	}
}

func TestTargetsCSVVariableColumns(t *testing.T) {
	const head = "name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority,band,snr,faint_mag,faint_phase,bright_mag,bright_phase\n"
	ts, err := ParseTargetsCSV(strings.NewReader(head +
		"V-1,04:12:33.9,-12:48:07,2460500.4321987,0.0612345678,0.25,0.06,60,20,1,V,40,18.5,0.0,17.2,0.5\n"))
	if err != nil {
		t.Fatal(err)
	}
	if v := ts[0]; !v.Variable() || v.FaintMag != 18.5 || v.BrightPhase != 0.5 || v.MagAtPhase(0.25) != (18.5+17.2)/2 {
		t.Errorf("variable row = %+v", v)
	}
	_, err = ParseTargetsCSV(strings.NewReader(head +
		"V-2,04:12:33.9,-12:48:07,2460500.4321987,0.06,0.25,0.06,60,20,1,V,40,18.5,0.0,,\n" +
		"V-3,04:12:33.9,-12:48:07,2460500.4321987,0.06,0.25,0.06,60,20,1,V,40,17,0.0,18,0.5\n"))
	var te *TableError
	if !errors.As(err, &te) || len(te.Cells) != 2 || te.Cells[0].Line != 2 || te.Cells[1].Line != 3 {
		t.Fatalf("err = %v, want one error on each of lines 2 and 3", err)
	}
}

// BenchmarkPlanNightSNR plans the S/N night of TestPlanSizesExposuresBySNR;
// compare with BenchmarkPlanNightTyped (the same night, typed exposures).
func BenchmarkPlanNightSNR(b *testing.B) {
	req := snrNight(17.5, 40)
	for b.Loop() {
		if _, err := PlanNight(req); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkPlanNightTyped is BenchmarkPlanNightSNR without the instrument.
func BenchmarkPlanNightTyped(b *testing.B) {
	req := snrNight(17.5, 40)
	req.Instrument = nil
	for b.Loop() {
		if _, err := PlanNight(req); err != nil {
			b.Fatal(err)
		}
	}
}

// TestPlanSNRProperties plans seeded random nights (randomNight) with an
// instrument and S/N goals on half the targets, and checks every rule of
// the plan against the full path (checkPlanRules) with the sized exposures,
// plus the sizing's own: within the smear limit, and an unscheduled
// snr_unreachable goal only where no window could reach the S/N.
func TestPlanSNRProperties(t *testing.T) {
	r := rand.New(rand.NewPCG(15, 15))
	nights := 16
	if testing.Short() {
		nights = 6
	}
	bands := []string{"U", "B", "V", "R", "I", "g", "r", "i", "z"}
	sized, short := 0, 0
	for n := range nights {
		req := randomNight(r, 5)
		req.Instrument = testInstrument()
		for i := range req.Targets {
			if r.IntN(2) == 0 {
				continue
			}
			tg := &req.Targets[i]
			tg.Band, tg.Mag = bands[r.IntN(len(bands))], 12+8*r.Float64()
			for k := range tg.Goals {
				tg.Goals[k].SNR = 10 + 90*r.Float64()
			}
		}
		p, err := PlanNight(req)
		if err != nil {
			t.Fatalf("night %d: %v", n, err)
		}
		checkPlanRules(t, req, p)
		for _, b := range p.Blocks {
			if !b.SizedBySNR {
				continue
			}
			sized++
			tg := req.Targets[b.TargetIndex]
			if limit := b.Goal.maxSmear() * tg.Ephem.PeriodDays * 86400; b.ExposureS > limit+1e-9 || !b.SNROK {
				t.Errorf("night %d %s: exposure %g s over the smear limit %g s (or no S/N)", n, b.Target, b.ExposureS, limit)
			}
		}
		for _, u := range p.Unscheduled {
			if u.Reason == UnschedSNRUnreachable {
				short++
				if !SizesBySNR(req.Targets[u.TargetIndex], u.Goal) {
					t.Errorf("night %d %s: snr_unreachable for a goal without an S/N", n, u.Target)
				}
			}
		}
		if t.Failed() {
			t.Fatalf("night %d (site %+v, %s) failed", n, req.Site, req.From.Format(time.DateOnly))
		}
	}
	if sized == 0 {
		t.Fatal("no sized block in any random night: the test checks nothing")
	}
	t.Logf("%d random nights: %d sized blocks, %d goals short of their S/N", nights, sized, short)
}
