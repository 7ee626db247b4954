package planner_test

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"runtime"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
)

// The survey-scale benchmarks: long, so they run only with
// PHASECAST_BENCH_LARGE=1, and one cell at a time under /usr/bin/time -v
// for the peak memory (testdata/scaling/run.sh builds the table of
// docs/benchmarks.md that way):
//
//	PHASECAST_BENCH_LARGE=1 go test -run '^$' -bench 'Scale/run/survey/targets=1000/nights=30$' -benchtime 1x -timeout 2h ./planner/

// largeBench skips b unless PHASECAST_BENCH_LARGE=1.
func largeBench(b *testing.B) {
	b.Helper()
	if os.Getenv("PHASECAST_BENCH_LARGE") != "1" {
		b.Skip("survey-scale benchmark: set PHASECAST_BENCH_LARGE=1")
	}
}

// surveyTargets is an invented survey list of n binaries, as a survey
// release hands them over: spread uniformly over the whole sky (some never
// rise at the benchmark site), periods 0.05 to 1 day, priorities 1 to 5,
// both quadratures (0.25 and 0.75 ± 0.05), each wanting as many 300 s
// exposures (30 s readout) as fit on 2 nights, 60 s acquisition.
func surveyTargets(n int) []planner.Target {
	r := rand.New(rand.NewPCG(21, 2026))
	ts := make([]planner.Target, n)
	for i := range ts {
		t := planner.Target{
			Name: fmt.Sprintf("SV-%05d", i+1), RADeg: 360 * r.Float64(), DecDeg: math.Asin(2*r.Float64()-1) * 180 / math.Pi,
			Priority: 1 + r.IntN(5), AcquireS: 60,
			Ephem: ephem.Ephemeris{T0: ephem.NewJD2(2461000.5 + r.Float64()), PeriodDays: 0.05 + 0.95*r.Float64(),
				PeriodErr: 1e-8, T0ErrDays: 1e-4, Convention: ephem.ConvInferiorConjunction},
		}
		for _, ph := range []float64{0.25, 0.75} {
			t.Goals = append(t.Goals, planner.Goal{Center: ph, HalfWidth: 0.05, ExposureS: 300, OverheadS: 30, MinNights: 2})
		}
		ts[i] = t
	}
	return ts
}

// scaleLists are the two invented lists of the scaling table: "bench"
// (benchTargets: periods 1.5–10 h, 3 exposures of 2–6 min on 2 nights for
// runs) and "survey" (surveyTargets).
var scaleLists = map[string]func(n int) []planner.Target{
	"bench": func(n int) []planner.Target {
		ts := benchTargets(n)
		for i := range ts {
			for k := range ts[i].Goals {
				ts[i].Goals[k].NExposures = 3
				ts[i].Goals[k].MinNights = 2
			}
		}
		return ts
	},
	"survey": surveyTargets,
}

// BenchmarkScale is the scaling table: kind plan (PlanNight on each night
// on its own, in turn), run (PlanRun) and windows (QueueWindows), for both
// lists, targets 10/100/1,000/3,000 × nights 1/10/30/365, from 2026-03-01
// at the benchmark site. Each cell reports the CPU time per operation and
// the Go heap's high-water mark (peak-heap-MB: the largest HeapInuse seen
// by a sampler every 10 ms; /usr/bin/time -v gives the process's peak RSS).
// Select one cell with anchored names, e.g.
// -bench 'Scale/^run$/^survey$/^targets=100$/^nights=30$'.
func BenchmarkScale(b *testing.B) {
	largeBench(b)
	for _, kind := range []string{"plan", "run", "windows"} {
		for _, list := range []string{"bench", "survey"} {
			for _, nt := range []int{10, 100, 1000, 3000} {
				for _, nn := range []int{1, 10, 30, 365} {
					b.Run(fmt.Sprintf("%s/%s/targets=%d/nights=%d", kind, list, nt, nn), func(b *testing.B) { scaleCase(b, kind, list, nt, nn) })
				}
			}
		}
	}
}

// The survey-scale goals, one benchmark each (PHASECAST_BENCH_LARGE=1).
func BenchmarkRunSurvey300x30(b *testing.B)  { largeBench(b); scaleCase(b, "run", "survey", 300, 30) }
func BenchmarkRunSurvey1000x30(b *testing.B) { largeBench(b); scaleCase(b, "run", "survey", 1000, 30) }
func BenchmarkRunBench1000x30(b *testing.B)  { largeBench(b); scaleCase(b, "run", "bench", 1000, 30) }
func BenchmarkWindowsSurvey3000x365(b *testing.B) {
	largeBench(b)
	scaleCase(b, "windows", "survey", 3000, 365)
}
func BenchmarkWindowsBench3000x365(b *testing.B) {
	largeBench(b)
	scaleCase(b, "windows", "bench", 3000, 365)
}

// BenchmarkPlanNightSurvey1000 is one night of the 1,000-target survey list
// (PlanNight, exact): short enough for the default benchmark run.
func BenchmarkPlanNightSurvey1000(b *testing.B) { scaleCase(b, "plan", "survey", 1000, 1) }

// scaleCase runs one cell of the scaling table.
func scaleCase(b *testing.B, kind, list string, nt, nn int) {
	b.Helper()
	zone := time.FixedZone("UTC-3", -3*3600)
	targets := scaleLists[list](nt)
	nights, err := planner.NightsFrom(2026, 3, 1, nn)
	if err != nil {
		b.Fatal(err)
	}
	var op func() error
	switch kind {
	case "plan":
		op = func() error {
			for _, n := range nights {
				from, to := planner.NightWindow(n.Year, n.Month, n.Day, zone)
				if _, err := planner.PlanNight(planner.NightRequest{Site: benchSite, From: from, To: to,
					Targets: targets, Constraints: planner.DefaultConstraints()}); err != nil {
					return err
				}
			}
			return nil
		}
	case "run":
		req := planner.RunRequest{Site: benchSite, Zone: zone, Nights: nights, Targets: targets,
			Constraints: planner.DefaultConstraints(), Bins: 10}
		op = func() error {
			rp, err := planner.PlanRun(context.Background(), req, nil)
			if err == nil {
				b.ReportMetric(100*float64(rp.Value)/float64(rp.RequiredValue), "%J")
				b.ReportMetric(float64(rp.Value)/1e6, "J")
			}
			return err
		}
	case "windows":
		from := time.Date(2026, 3, 1, 16, 0, 0, 0, time.UTC)
		req := planner.WindowRequest{Site: benchSite, From: from, To: from.AddDate(0, 0, nn),
			Targets: targets, Constraints: planner.DefaultConstraints()}
		op = func() error {
			_, err := planner.QueueWindows(context.Background(), req, nil)
			return err
		}
	default:
		b.Fatalf("kind %q", kind)
	}
	peak := startHeapPeak()
	cpu := startCPU()
	for b.Loop() {
		if err := op(); err != nil {
			b.Fatal(err)
		}
	}
	cpu.report(b)
	b.ReportMetric(peak.stop(), "peak-heap-MB")
}

// heapPeak samples the Go heap in use every 10 ms and keeps the largest.
type heapPeak struct {
	done chan struct{}
	max  chan float64
}

func startHeapPeak() heapPeak {
	h := heapPeak{done: make(chan struct{}), max: make(chan float64, 1)}
	go func() {
		var ms runtime.MemStats
		peak := 0.0
		tick := time.NewTicker(10 * time.Millisecond)
		defer tick.Stop()
		for {
			runtime.ReadMemStats(&ms)
			peak = math.Max(peak, float64(ms.HeapInuse)/(1<<20))
			select {
			case <-h.done:
				h.max <- peak
				return
			case <-tick.C:
			}
		}
	}()
	return h
}

// stop ends the sampling and returns the peak, MB.
func (h heapPeak) stop() float64 {
	close(h.done)
	return <-h.max
}
