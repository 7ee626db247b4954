package web

import (
	"fmt"
	"testing"
	"time"

	"phasecast/planner"
)

// TestWarningGroups: 38 identical smear warnings of one target collapse to
// one line with a count; the unreachable periastron of another target,
// the most severe, comes first.
func TestWarningGroups(t *testing.T) {
	start := time.Date(2026, 3, 15, 3, 0, 0, 0, time.UTC)
	smear := "one 60s exposure spans 0.0250 in phase, 25% of the goal window (0.100 wide)"
	p := &planner.Plan{}
	for i := range 38 {
		b := planner.Block{Target: "Fast one", GoalIndex: 0, Start: start.Add(time.Duration(i) * 10 * time.Minute)}
		b.Warnings = []planner.Warning{{Code: planner.WarnSmear, Target: "Fast one", GoalIndex: 0, Message: smear}}
		if i == 5 {
			b.Warnings = append(b.Warnings, planner.Warning{Code: planner.WarnMoonNear, Target: "Fast one", GoalIndex: 0, Message: "the Moon (80% illuminated) is up and 12.0° away"})
		}
		p.Blocks = append(p.Blocks, b)
		p.Warnings = append(p.Warnings, b.Warnings...) // the plan repeats its blocks' warnings
	}
	p.Warnings = append(p.Warnings,
		planner.Warning{Code: planner.WarnUnreachable, Target: "Eccentric", GoalIndex: 1, Message: "goal at phase 0.000 cannot be reached tonight: periastron is in daylight"},
		planner.Warning{Code: planner.WarnNotOptimal, Target: "", GoalIndex: -1, Message: "the search stopped early"})
	got := warningGroups(p, time.UTC)
	want := []struct {
		target string
		items  []string
	}{
		{"Eccentric", []string{"serious 1 goal at phase 0.000 cannot be reached tonight: periastron is in daylight"}},
		{"Whole night", []string{"caution 1 the search stopped early"}},
		{"Fast one", []string{"caution 1 the Moon (80% illuminated) is up and 12.0° away", "note 38 " + smear}},
	}
	if len(got) != len(want) {
		t.Fatalf("%d groups, want %d: %+v", len(got), len(want), got)
	}
	for i, w := range want {
		g := got[i]
		if g.Target != w.target || len(g.Items) != len(w.items) {
			t.Errorf("group %d = %s with %d items, want %s with %d", i, g.Target, len(g.Items), w.target, len(w.items))
			continue
		}
		for k, it := range g.Items {
			if s := fmt.Sprintf("%s %d %s", it.Level, it.Count, it.Text); s != w.items[k] {
				t.Errorf("group %s item %d = %q, want %q", g.Target, k, s, w.items[k])
			}
		}
	}
	if when := got[2].Items[1].When; when != "blocks at 03:00, 03:10, 03:20 and 35 more" {
		t.Errorf("smear blocks = %q", when)
	}
}
