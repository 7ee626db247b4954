package planner_test

import (
	"context"
	"fmt"
	"testing"
	"time"

	"phasecast/planner"
)

// benchRun is an invented run of nNights full nights from 2026-03-01 at the
// benchmark site (31° S, zone UTC−3) for the targets of benchTargets, each
// quadrature wanting 3 exposures on 2 nights.
func benchRun(nTargets, nNights int) planner.RunRequest {
	nights, _ := planner.NightsFrom(2026, 3, 1, nNights)
	ts := benchTargets(nTargets)
	for i := range ts {
		for k := range ts[i].Goals {
			ts[i].Goals[k].NExposures = 3
			ts[i].Goals[k].MinNights = 2
		}
	}
	return planner.RunRequest{Site: benchSite, Zone: time.FixedZone("UTC-3", -3*3600), Nights: nights, Targets: ts,
		Constraints: planner.DefaultConstraints(), Bins: 10}
}

func benchPlanRun(b *testing.B, nTargets, nNights int) {
	b.Helper()
	req := benchRun(nTargets, nNights)
	var rp *planner.RunPlan
	cpu := startCPU()
	for b.Loop() {
		var err error
		if rp, err = planner.PlanRun(context.Background(), req, nil); err != nil {
			b.Fatal(err)
		}
	}
	blocks := 0
	for _, np := range rp.Nights {
		blocks += len(np.Plan.Blocks)
	}
	b.ReportMetric(float64(blocks), "blocks")
	b.ReportMetric(float64(rp.Solves), "solves")
	b.ReportMetric(100*float64(rp.Value)/float64(rp.MaxValue), "%J")
	cpu.report(b)
}

// BenchmarkPlanRun50x10 is the figure: a 10-night run of 50 targets.
func BenchmarkPlanRun50x10(b *testing.B) { benchPlanRun(b, 50, 10) }

// BenchmarkPlanRunScaling measures the growth in targets and nights (10,
// 100, 1000 × 30, 180, 365); the largest cases take minutes, so only with
// PHASECAST_BENCH_LARGE=1 and -benchtime=1x.
func BenchmarkPlanRunScaling(b *testing.B) {
	largeBench(b)
	for _, nt := range []int{10, 100, 1000} {
		for _, nn := range []int{30, 180, 365} {
			b.Run(fmt.Sprintf("targets=%d/nights=%d", nt, nn), func(b *testing.B) { benchPlanRun(b, nt, nn) })
		}
	}
}
