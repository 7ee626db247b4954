package export_test

import (
	"encoding/json"
	"testing"

	"phasecast/planner/export"
)

// TestRunReadsEarlierSavedPlans: the web keeps run plans saved before the
// run document had one shape, whose best nights were dates and whose
// night warnings were messages; they still read.
func TestRunReadsEarlierSavedPlans(t *testing.T) {
	const saved = `{"run":"R","run_id":3,"made_at":"2026-03-14T20:00:00Z","past_nights":1,
		"nights":[{"date":"2026-03-14","part":"full","from":"2026-03-14T15:00:00Z","to":"2026-03-15T15:00:00Z","past":false,
			"blocks":[],"unscheduled":[],"warnings":["starts in twilight"]}],
		"targets":[{"target_id":7,"target":"T","priority":1,"goals":[],"planned_phases":[],"observed_phases":[],"reach_goals":[1],
			"best_nights":["2026-03-14"]}],
		"objective":{"value":5,"max_value":6,"greedy_value":4,"independent_value":4,"rounds":1}}`
	var d export.Run
	if err := json.Unmarshal([]byte(saved), &d); err != nil {
		t.Fatal(err)
	}
	if len(d.Nights) != 1 || len(d.Nights[0].Warnings) != 1 || d.Nights[0].Warnings[0].Message != "starts in twilight" {
		t.Errorf("warnings %+v", d.Nights[0].Warnings)
	}
	if len(d.Targets) != 1 || len(d.Targets[0].BestNights) != 1 || d.Targets[0].BestNights[0].Date != "2026-03-14" {
		t.Errorf("best nights %+v", d.Targets[0].BestNights)
	}
	if o := d.Objective; o.IndependentValue == nil || *o.IndependentValue != 4 || o.Value != 5 {
		t.Errorf("objective %+v", o)
	}
	// The document as written now reads back the same.
	b, err := export.JSON(d)
	if err != nil {
		t.Fatal(err)
	}
	var again export.Run
	if err := json.Unmarshal(b, &again); err != nil {
		t.Fatal(err)
	}
	if b2, _ := export.JSON(again); string(b2) != string(b) {
		t.Errorf("round trip changed the document:\n%s\n%s", b, b2)
	}
}
