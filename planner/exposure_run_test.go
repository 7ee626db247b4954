package planner_test

import (
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
)

// TestRunSizesBySNR: a run with an instrument sizes S/N goals' blocks with
// the night planner's rule, every block within the best-night search's
// capacity for its night (checkCapacity), and a goal the smear limit stops
// short gets no block on any night.
func TestRunSizesBySNR(t *testing.T) {
	loc := time.FixedZone("local", -4*3600)
	var nights []planner.RunNight
	for d := 1; d <= 3; d++ {
		nights = append(nights, planner.RunNight{Year: 2026, Month: 12, Day: d})
	}
	eph := ephem.Ephemeris{T0: ephem.NewJD2(2460500.4321987), PeriodDays: 0.0612345678, Convention: ephem.ConvInferiorConjunction}
	bright := planner.Target{Name: "RUN-S1", RADeg: 63.14125, DecDeg: -12.80194, Priority: 1, AcquireS: 120, Band: "V", Mag: 17.5, Ephem: eph,
		Goals: []planner.Goal{{Center: 0.25, HalfWidth: 0.06, ExposureS: 60, OverheadS: 20, SNR: 40, NExposures: 6}}}
	faint := bright
	faint.Name, faint.Mag, faint.Priority = "RUN-S2", 23, 2
	faint.Goals = []planner.Goal{{Center: 0.75, HalfWidth: 0.06, ExposureS: 60, OverheadS: 20, SNR: 100, NExposures: 6}}
	req := planner.RunRequest{
		Site: ephem.Site{LatDeg: -27.85, LonEastDeg: -69.12, ElevM: 2650}, Zone: loc, Nights: nights,
		Targets: []planner.Target{bright, faint}, Constraints: planner.DefaultConstraints(),
		Instrument: &planner.Instrument{ApertureM: 1.5, Throughput: 0.3, ReadNoiseE: 5, DarkEPerSPix: 0.002, PixelArcsec: 0.35, SeeingArcsec: 1.1},
	}
	rp, err := planner.PlanRun(t.Context(), req, nil)
	if err != nil {
		t.Fatal(err)
	}
	checkCapacity(t, rp)
	blocks := 0
	for _, np := range rp.Nights {
		if np.Plan == nil {
			continue
		}
		for _, b := range np.Plan.Blocks {
			if b.Target == "RUN-S2" {
				t.Errorf("%s: the faint goal got a block: %+v", np.Night, b)
			}
			if b.Target == "RUN-S1" && (!b.SizedBySNR || !b.SNROK || b.ExposureS == 60 || b.SNR < 36 || b.SNR > 44) {
				t.Errorf("%s: block not sized for S/N 40: %+v", np.Night, b)
			}
			blocks++
		}
	}
	if blocks == 0 {
		t.Fatal("no blocks in three nights")
	}
	for _, gn := range rp.Reach[1].Goals[0].Nights {
		if gn.Capacity != 0 {
			t.Errorf("faint goal's capacity on night %d = %d, want 0 (the smear limit stops its S/N short)", gn.Night, gn.Capacity)
		}
	}
}
