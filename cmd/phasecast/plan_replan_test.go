package main

import (
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

var replanArgs = []string{"plan", "--lat", "-27.85", "--lon", "-69.12", "--elev", "2650", "--tz", "America/Santiago", "--date", "2026-12-01",
	"--targets", filepath.Join("..", "..", "planner", "testdata", "night_targets.csv"), "--n-exposures", "4"}

// TestPlanStart replans the README's night from 01:30 UTC with six
// exposures of Quilla-88m taken: no block starts (nor acquires) before
// 01:30, the goal at 0.25 (4 of 4 done) is not planned again, the goal at
// 0.75 (2 of 4) gets at most 2 a block, and the JSON says what was kept.
func TestPlanStart(t *testing.T) {
	log := writeFile(t, "obs.csv", "target,start_utc,exposure_s,n_exposures,overhead_s\n"+
		"Quilla-88m,2026-12-02T00:31:48Z,120,4,15\nQuilla-88m,2026-12-02T01:15:54Z,120,2,15\n")
	stdout, stderr, code := runCmd(t, append(append([]string{}, replanArgs...), "--start", "2026-12-02T01:30:00Z", "--observed", log, "--json")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var out struct {
		Blocks []struct {
			Target    string   `json:"target"`
			PhaseGoal *float64 `json:"phase_goal"`
			Start     string   `json:"start"`
			AcquireS  float64  `json:"acquire_s"`
			N         int      `json:"n_exposures"`
		} `json:"blocks"`
		Replan *struct {
			Start  string `json:"start"`
			Done   []any  `json:"done"`
			Served []struct {
				Target    string  `json:"target"`
				PhaseGoal float64 `json:"phase_goal"`
				Done      int     `json:"done"`
				Remaining int     `json:"remaining"`
				Served    bool    `json:"served"`
			} `json:"served"`
		} `json:"replan"`
	}
	if err := json.Unmarshal([]byte(stdout), &out); err != nil {
		t.Fatal(err)
	}
	if out.Replan == nil || out.Replan.Start != "2026-12-02T01:30:00Z" || len(out.Replan.Done) != 6 {
		t.Fatalf("replan part %+v", out.Replan)
	}
	startAt := time.Date(2026, 12, 2, 1, 30, 0, 0, time.UTC)
	for _, b := range out.Blocks {
		s, _ := time.Parse(time.RFC3339, b.Start)
		if s.Add(-time.Duration(b.AcquireS * 1e9)).Before(startAt) {
			t.Errorf("%s block at %s (acquiring %g s) starts before 01:30", b.Target, b.Start, b.AcquireS)
		}
		if b.Target == "Quilla-88m" && b.PhaseGoal != nil {
			switch *b.PhaseGoal {
			case 0.25:
				t.Errorf("the served goal 0.25 is planned again at %s", b.Start)
			case 0.75:
				if b.N > 2 {
					t.Errorf("goal 0.75 block at %s has %d exposures; 2 are still wanted", b.Start, b.N)
				}
			}
		}
	}
	for _, gs := range out.Replan.Served {
		if gs.Target == "Quilla-88m" && gs.PhaseGoal == 0.25 && (!gs.Served || gs.Done != 4) {
			t.Errorf("goal 0.25: %+v", gs)
		}
	}
	stdout, _, code = runCmd(t, append(append([]string{}, replanArgs...), "--start", "2026-12-02T01:30:00Z", "--observed", log)...)
	if code != 0 || !strings.Contains(stdout, "Replanned from 2026-12-02 01:30:00 UTC") || !strings.Contains(stdout, "0 (served: not planned again)") {
		t.Errorf("text output:\n%s", stdout)
	}
}

func TestPlanStartBadInput(t *testing.T) {
	late := writeFile(t, "late.csv", "target,mid_utc,exposure_s\nQuilla-88m,2026-12-02T03:00:00Z,120\n")
	for _, tc := range []struct {
		name string
		argv []string
		want string
	}{
		{"ErrObservedAlone", []string{"--observed", late}, "--observed goes with --start"},
		{"ErrStartNotTime", []string{"--start", "soon"}, "--start soon: not a time"},
		{"ErrStartOutside", []string{"--start", "2026-12-03T01:30:00Z"}, "--start 2026-12-03T01:30:00Z: outside the night; accepted: an instant from 2026-12-01T15:00:00Z"},
		{"ErrLogAfterStart", []string{"--start", "2026-12-02T01:30:00Z", "--observed", late}, "line 2: mid-time 2026-12-02T03:00:00Z is not tonight before --start"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, stderr, code := runCmd(t, append(append([]string{}, replanArgs...), tc.argv...)...)
			if code != 2 || !strings.Contains(stderr, tc.want) {
				t.Fatalf("exit %d, stderr %q; want exit 2 with %q", code, stderr, tc.want)
			}
		})
	}
}

// TestPlanSheet: --sheet csv has one line per block of the plan under the
// documented header, --sheet json the same rows with three labelled
// points, and a bad format is refused.
func TestPlanSheet(t *testing.T) {
	plan := runJSON(t, replanArgs...)
	blocks := plan["blocks"].([]any)
	stdout, stderr, code := runCmd(t, append(append([]string{}, replanArgs...), "--sheet", "csv")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	lines := strings.Split(strings.TrimSpace(stdout), "\n")
	if len(lines) != len(blocks)+1 || !strings.HasPrefix(lines[0], "target,goal_phase,cycle,") {
		t.Fatalf("%d CSV lines for %d blocks:\n%s", len(lines), len(blocks), stdout)
	}
	stdout, _, code = runCmd(t, append(append([]string{}, replanArgs...), "--sheet", "json")...)
	var doc struct {
		Rows []struct {
			Points []struct {
				Label string `json:"label"`
			} `json:"points"`
		} `json:"rows"`
	}
	if err := json.Unmarshal([]byte(stdout), &doc); code != 0 || err != nil || len(doc.Rows) != len(blocks) {
		t.Fatalf("sheet json: exit %d, %v, %d rows", code, err, len(doc.Rows))
	}
	if p := doc.Rows[0].Points; len(p) != 3 || p[0].Label != "start" || p[1].Label != "mid" || p[2].Label != "end" {
		t.Errorf("points %+v", p)
	}
	if _, stderr, code := runCmd(t, append(append([]string{}, replanArgs...), "--sheet", "pdf")...); code != 2 || !strings.Contains(stderr, "--sheet pdf: not a sheet format; accepted: csv or json") {
		t.Errorf("bad format: exit %d %q", code, stderr)
	}
}
