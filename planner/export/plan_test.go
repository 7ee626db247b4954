package export_test

import (
	"encoding/json"
	"strings"
	"testing"
	"time"

	"phasecast/planner"
	"phasecast/planner/export"
)

func TestDocTime(t *testing.T) {
	santiago := time.FixedZone("-03", -3*3600)
	tests := []struct {
		name string
		in   time.Time
		want string
	}{
		{"WholeSeconds", time.Date(2026, 12, 2, 0, 31, 48, 0, time.UTC), `"2026-12-02T00:31:48Z"`},
		{"Fraction", time.Date(2026, 12, 2, 0, 31, 48, 250_000_000, time.UTC), `"2026-12-02T00:31:48.25Z"`},
		{"Microseconds", time.Date(2026, 12, 2, 0, 31, 48, 123_456_789, time.UTC), `"2026-12-02T00:31:48.123456Z"`},
		{"OffsetWrittenAsUTC", time.Date(2026, 12, 1, 21, 31, 48, 0, santiago), `"2026-12-02T00:31:48Z"`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			b, err := json.Marshal(export.DocTime(tt.in))
			if err != nil {
				t.Fatal(err)
			}
			if got := string(b); got != tt.want {
				t.Fatalf("got %s, want %s", got, tt.want)
			}
			var back export.DocTime
			if err := json.Unmarshal(b, &back); err != nil {
				t.Fatal(err)
			}
			if got, want := time.Time(back), tt.in.Truncate(time.Microsecond); !got.Equal(want) {
				t.Errorf("round trip: got %v, want %v", got, want)
			}
		})
	}
}

func TestDocSecond(t *testing.T) {
	tests := []struct {
		name string
		in   time.Time
		want string
	}{
		{"RoundsUp", time.Date(2026, 12, 1, 23, 18, 55, 600_000_000, time.UTC), `"2026-12-01T23:18:56Z"`},
		{"RoundsDown", time.Date(2026, 12, 1, 23, 18, 56, 400_000_000, time.UTC), `"2026-12-01T23:18:56Z"`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			b, err := json.Marshal(export.DocSecond(tt.in))
			if err != nil {
				t.Fatal(err)
			}
			if got := string(b); got != tt.want {
				t.Errorf("got %s, want %s", got, tt.want)
			}
		})
	}
}

func TestDocTimeBadInput(t *testing.T) {
	for _, in := range []string{`12`, `"2026-12-01 23:18:56"`, `"yesterday"`} {
		t.Run(in, func(t *testing.T) {
			var d export.DocTime
			err := json.Unmarshal([]byte(in), &d)
			if err == nil || !strings.Contains(err.Error(), "RFC 3339") {
				t.Errorf("got %v, want an error naming RFC 3339", err)
			}
		})
	}
}

// TestNewPlanDoc checks the keys of the `plan --json` contract and the
// document's rules: null goal for a filler, repeated warnings given once,
// a goal's warning carrying its centre, null for an event that does not
// happen.
func TestNewPlanDoc(t *testing.T) {
	t0 := time.Date(2026, 12, 2, 1, 0, 0, 0, time.UTC)
	sunset := time.Date(2026, 12, 1, 23, 18, 56, 0, time.UTC)
	goal := planner.Goal{Center: 0.25, HalfWidth: 0.04}
	p := &planner.Plan{
		Constraints: planner.Constraints{Twilight: planner.TwilightNautical, SunAltMaxDeg: -12, MaxAirmass: 2},
		Blocks: []planner.Block{
			{Target: "A", GoalIndex: 0, Goal: goal, Start: t0, End: t0.Add(9 * time.Minute), N: 4, ExposureS: 120, OverheadS: 15},
			{Target: "B", Filler: true, Start: t0.Add(10 * time.Minute), End: t0.Add(20 * time.Minute), N: 5, ExposureS: 100, OverheadS: 20},
		},
		Unscheduled: []planner.Unscheduled{{Target: "C", GoalIndex: 1, Goal: planner.Goal{Center: 0.5}, Reason: "never_observable", Detail: "never up"}},
		Warnings: []planner.Warning{
			{Code: planner.WarnSmear, Target: "A", GoalIndex: 0, Message: "smears"},
			{Code: planner.WarnSmear, Target: "A", GoalIndex: 0, Message: "smears"},
			{Code: planner.WarnNotOptimal, Target: "", GoalIndex: -1, Message: "stopped"},
		},
		Value: 7,
	}
	b, err := json.Marshal(export.NewPlanDoc(p, planner.NightEvents{Sunset: &sunset, MoonIlluminated: 0.5}, 120))
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Night       map[string]any   `json:"night"`
		Blocks      []map[string]any `json:"blocks"`
		Unscheduled []map[string]any `json:"unscheduled"`
		Warnings    []map[string]any `json:"warnings"`
		Constraints map[string]any   `json:"constraints"`
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if got, want := doc.Night["sunset"], "2026-12-01T23:18:56Z"; got != want {
		t.Errorf("night.sunset: got %v, want %v", got, want)
	}
	if v, ok := doc.Night["sunrise"]; !ok || v != nil {
		t.Errorf("night.sunrise: got %v (present %t), want null", v, ok)
	}
	if len(doc.Blocks) != 2 {
		t.Fatalf("got %d blocks, want 2", len(doc.Blocks))
	}
	for _, k := range []string{"target", "phase_goal", "start", "end", "n_exposures", "exposure_s", "phase_start", "phase_end", "airmass_max"} {
		if _, ok := doc.Blocks[0][k]; !ok {
			t.Errorf("block has no key %q", k)
		}
	}
	if got, want := doc.Blocks[0]["phase_goal"], 0.25; got != want {
		t.Errorf("blocks[0].phase_goal: got %v, want %v", got, want)
	}
	if got := doc.Blocks[1]["phase_goal"]; got != nil {
		t.Errorf("filler phase_goal: got %v, want null", got)
	}
	if len(doc.Unscheduled) != 1 {
		t.Fatalf("got %d unscheduled, want 1", len(doc.Unscheduled))
	}
	for k, want := range map[string]any{"target": "C", "phase_goal": 0.5, "reason": "never up", "reason_code": "never_observable"} {
		if got := doc.Unscheduled[0][k]; got != want {
			t.Errorf("unscheduled[0].%s: got %v, want %v", k, got, want)
		}
	}
	if len(doc.Warnings) != 2 {
		t.Fatalf("got %d warnings, want 2 (the repeat given once): %v", len(doc.Warnings), doc.Warnings)
	}
	if got, want := doc.Warnings[0]["phase_goal"], 0.25; got != want {
		t.Errorf("warnings[0].phase_goal: got %v, want %v", got, want)
	}
	if _, ok := doc.Warnings[1]["phase_goal"]; ok {
		t.Errorf("plan-wide warning has a phase_goal: %v", doc.Warnings[1])
	}
	if got, want := doc.Constraints["acquire_s"], 120.0; got != want {
		t.Errorf("constraints.acquire_s: got %v, want %v", got, want)
	}
	if v, ok := doc.Constraints["ha_min_hours"]; !ok || v != nil {
		t.Errorf("constraints.ha_min_hours: got %v (present %t), want null", v, ok)
	}
}

// TestDocTimeLeapSecond: a document's time may carry second 60 on a
// leap-second day (RFC 3339 §5.6), read as the instant it ends; elsewhere
// it is refused, saying why.
func TestDocTimeLeapSecond(t *testing.T) {
	var got export.DocTime
	if err := json.Unmarshal([]byte(`"2016-12-31T23:59:60Z"`), &got); err != nil {
		t.Fatal(err)
	}
	if want := time.Date(2017, 1, 1, 0, 0, 0, 0, time.UTC); !time.Time(got).Equal(want) {
		t.Errorf("got %v, want %v", time.Time(got), want)
	}
	err := json.Unmarshal([]byte(`"2017-06-30T23:59:60Z"`), &got)
	if err == nil || !strings.Contains(err.Error(), "leap second") {
		t.Errorf("second 60 on an ordinary day: %v", err)
	}
}
