package planner

import (
	"fmt"
	"math/rand/v2"
	"testing"
	"time"

	"phasecast/ephem"
)

// benchNight is an invented 30-target night: a site at 31° S in March,
// targets spread over the evening-to-morning sky, periods of 1.5 to 10
// hours, three goals each (phases 0.0, 0.25, 0.75 ± 0.05), exposures of 2 to
// 6 minutes, as many as fit, 1-minute resolution.
func benchNight(nTargets int) NightRequest {
	r := rand.New(rand.NewPCG(30, 3))
	site := ephem.Site{LatDeg: -31.2, LonEastDeg: -68.9, ElevM: 2400}
	loc := time.FixedZone("UTC-3", -3*3600)
	from, to := NightWindow(2026, 3, 20, loc)
	req := NightRequest{Site: site, From: from, To: to, Constraints: DefaultConstraints()}
	for i := range nTargets {
		t := Target{
			Name: fmt.Sprintf("BT-%02d", i+1), RADeg: 60 + 240*r.Float64(), DecDeg: -75 + 95*r.Float64(),
			Priority: 1 + r.IntN(5), AcquireS: 120,
			Ephem: ephem.Ephemeris{T0: ephem.NewJD2(2460000.5 + r.Float64()), PeriodDays: (1.5 + 8.5*r.Float64()) / 24,
				Convention: ephem.ConvInferiorConjunction},
		}
		exp := float64(120 + 60*r.IntN(5))
		for _, ph := range []float64{0, 0.25, 0.75} {
			t.Goals = append(t.Goals, Goal{Center: ph, HalfWidth: 0.05, ExposureS: exp, OverheadS: 20, NExposures: NAsManyAsFit})
		}
		req.Targets = append(req.Targets, t)
	}
	return req
}

func BenchmarkPlan30Targets(b *testing.B) {
	req := benchNight(30)
	var p *Plan
	for b.Loop() {
		var err error
		if p, err = PlanNight(req); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(len(p.Blocks)), "blocks")
	b.ReportMetric(float64(p.Candidates), "candidates")
	b.ReportMetric(float64(p.Rounds), "rounds")
	b.ReportMetric(float64(p.States), "states")
}

func BenchmarkVisibility30Targets(b *testing.B) {
	req := benchNight(30)
	for b.Loop() {
		if _, _, err := newEngine(req); err != nil {
			b.Fatal(err)
		}
	}
}
