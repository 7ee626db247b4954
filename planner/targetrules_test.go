package planner

import (
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
)

// rulesTarget is a valid invented target.
func rulesTarget() Target {
	return Target{Name: "Rule-1", RADeg: 10, DecDeg: -20, Priority: 3,
		Ephem: ephem.Ephemeris{T0: ephem.NewJD2(2460000.5), PeriodDays: 0.1, Convention: ephem.ConvInferiorConjunction},
		Goals: []Goal{{Center: 0.25, HalfWidth: 0.05, ExposureS: 60}}}
}

// TestTargetProblems checks each rule of the one target rulebook: the field
// it names (as the files, forms and API name it) for one bad value.
func TestTargetProblems(t *testing.T) {
	if ps := TargetProblems(rulesTarget()); ps != nil {
		t.Fatalf("a valid target breaks %v", ps)
	}
	tests := []struct {
		name  string
		mod   func(t *Target)
		field string
	}{
		{"RA", func(t *Target) { t.RADeg = 360 }, "ra"},
		{"Dec", func(t *Target) { t.DecDeg = math.NaN() }, "dec"},
		{"PMRA", func(t *Target) { t.PMRAmasyr = MaxPMmasyr + 1 }, "pm_ra_masyr"},
		{"PMDec", func(t *Target) { t.PMDecmasyr = -MaxPMmasyr - 1 }, "pm_dec_masyr"},
		{"Mag", func(t *Target) { t.Mag = 41 }, "mag"},
		{"Priority", func(t *Target) { t.Priority = 6 }, "priority"},
		{"Acquire", func(t *Target) { t.AcquireS = MaxAcquireS + 1 }, "acquire_s"},
		{"TooManyGoals", func(t *Target) { t.Goals = make([]Goal, MaxGoals+1) }, "goals"},
		{"Event", func(t *Target) { t.Goals[0].Event = "apastron" }, "goals[0].event"},
		{"Center", func(t *Target) { t.Goals[0].Center = 1 }, "goals[0].center"},
		{"HalfWidth", func(t *Target) { t.Goals[0].HalfWidth = 0.5 }, "goals[0].phase_halfwidth"},
		{"Exposure", func(t *Target) { t.Goals[0].ExposureS = 0 }, "goals[0].exposure_s"},
		{"Overhead", func(t *Target) { t.Goals[0].OverheadS = -1 }, "goals[0].overhead_s"},
		{"NExposures", func(t *Target) { t.Goals[0].NExposures = MaxGoalExposures + 1 }, "goals[0].n_exposures"},
		{"MinNights", func(t *Target) { t.Goals[0].MinNights = MaxRunNights + 1 }, "goals[0].min_nights"},
		{"EclipseLongerThanPeriod", func(t *Target) { t.Goals[0].EclipseDurDays = 0.1 }, "goals[0].eclipse_duration_days"},
		{"PeriastronOfCircularOrbit", func(t *Target) { t.Goals[0].Event = string(ephem.EventPeriastron) }, "goals[0].event"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			tg := rulesTarget()
			tc.mod(&tg)
			ps := TargetProblems(tg)
			if len(ps) == 0 || ps[0].Field != tc.field || ps[0].Accepted == "" {
				t.Errorf("problems %+v, want first %s with what is accepted", ps, tc.field)
			}
		})
	}
}

// TestPlannerKeepsTheRulebook: the planners refuse what the store refuses,
// rules that only the store checked before (an eclipse as long as the
// orbit, a proper motion beyond the limit) included, naming the field as
// the store does.
func TestPlannerKeepsTheRulebook(t *testing.T) {
	from := time.Date(2026, 3, 14, 12, 0, 0, 0, time.UTC)
	for _, tc := range []struct {
		name  string
		mod   func(t *Target)
		field string
	}{
		{"Eclipse", func(t *Target) { t.Goals[0].EclipseDurDays = 0.2 }, `targets[0] "Rule-1".goals[0].eclipse_duration_days`},
		{"ProperMotion", func(t *Target) { t.PMRAmasyr = 1e6 }, `targets[0] "Rule-1".pm_ra_masyr`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tg := rulesTarget()
			tc.mod(&tg)
			_, err := PlanNight(NightRequest{Site: ephem.Site{LatDeg: -30, LonEastDeg: 20}, From: from, To: from.Add(24 * time.Hour),
				Constraints: DefaultConstraints(), Targets: []Target{tg}})
			var ie *ephem.InputError
			if !errors.As(err, &ie) || ie.Field != tc.field || !strings.Contains(err.Error(), ie.Accepted) {
				t.Errorf("PlanNight: %v; want an error about %s", err, tc.field)
			}
		})
	}
}
