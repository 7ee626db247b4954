package planner_test

import (
	"context"
	"fmt"
	"math/rand/v2"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
)

// benchTargets is an invented list of n targets over the whole sky seen from
// 31° S (declinations −85..+35), periods 1.5 to 10 hours, both quadratures
// (phases 0.25 and 0.75 ± 0.05), exposures of 2 to 6 minutes with 20 s
// overhead, 120 s acquisition.
func benchTargets(n int) []planner.Target {
	r := rand.New(rand.NewPCG(300, 6))
	var ts []planner.Target
	for i := range n {
		t := planner.Target{
			Name: fmt.Sprintf("BQ-%04d", i+1), RADeg: 360 * r.Float64(), DecDeg: -85 + 120*r.Float64(),
			Priority: 1 + r.IntN(5), AcquireS: 120,
			Ephem: ephem.Ephemeris{T0: ephem.NewJD2(2461000.5 + r.Float64()), PeriodDays: (1.5 + 8.5*r.Float64()) / 24,
				PeriodErr: 1e-8, T0ErrDays: 1e-4, Convention: ephem.ConvInferiorConjunction},
		}
		exp := float64(120 + 60*r.IntN(5))
		for _, ph := range []float64{0.25, 0.75} {
			t.Goals = append(t.Goals, planner.Goal{Center: ph, HalfWidth: 0.05, ExposureS: exp, OverheadS: 20})
		}
		ts = append(ts, t)
	}
	return ts
}

var benchSite = ephem.Site{LatDeg: -31.2, LonEastDeg: -68.9, ElevM: 2400}

func benchWindows(b *testing.B, nTargets, nNights int) {
	b.Helper()
	from := time.Date(2026, 3, 1, 16, 0, 0, 0, time.UTC)
	req := planner.WindowRequest{Site: benchSite, From: from, To: from.AddDate(0, 0, nNights),
		Targets: benchTargets(nTargets), Constraints: planner.DefaultConstraints()}
	var n int
	cpu := startCPU()
	for b.Loop() {
		got, err := planner.QueueWindows(context.Background(), req, nil)
		if err != nil {
			b.Fatal(err)
		}
		n = 0
		for _, g := range got {
			n += len(g.Windows)
		}
	}
	b.ReportMetric(float64(n), "windows")
	cpu.report(b)
}

// cpuMeter measures the CPU time a benchmark's loop uses, all threads
// together: on a machine shared with other jobs the wall time per op
// swells with the load, the CPU time much less; on an idle 2-core machine
// the wall time of a well-parallelised op is about half of it.
type cpuMeter struct {
	start time.Duration
	ok    bool
}

func startCPU() cpuMeter {
	t, ok := processCPU()
	return cpuMeter{t, ok}
}

func (c cpuMeter) report(b *testing.B) {
	if t, ok := processCPU(); ok && c.ok && b.N > 0 {
		b.ReportMetric(float64(t-c.start)/float64(b.N)/1e6, "cpu-ms/op")
	}
}

// BenchmarkQueueWindows300x180 is the figure: queue windows for 300
// targets (600 goals) over 180 nights on all cores.
func BenchmarkQueueWindows300x180(b *testing.B) { benchWindows(b, 300, 180) }

// BenchmarkQueueWindowsScaling measures the growth in targets and nights
// (10, 100, 1000 × 30, 180, 365); long, so only with
// PHASECAST_BENCH_LARGE=1 (see BenchmarkScale for the scaling table).
func BenchmarkQueueWindowsScaling(b *testing.B) {
	largeBench(b)
	for _, nt := range []int{10, 100, 1000} {
		for _, nn := range []int{30, 180, 365} {
			b.Run(fmt.Sprintf("targets=%d/nights=%d", nt, nn), func(b *testing.B) { benchWindows(b, nt, nn) })
		}
	}
}
