package store_test

import (
	"context"
	"testing"

	"phasecast/store"
)

// TestPlanQuotaPerRun: a run keeps its newest MaxPlansPerRun saved plans;
// saving more deletes the oldest ones, and another run's plans are left
// alone.
func TestPlanQuotaPerRun(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	r, err := w.s.CreateRun(ctx, w.editor, w.team.ID, runInput("Quota", w.site.ID, w.list.ID))
	if err != nil {
		t.Fatal(err)
	}
	other, err := w.s.CreateRun(ctx, w.editor, w.team.ID, runInput("Neighbour", w.site.ID, w.list.ID))
	if err != nil {
		t.Fatal(err)
	}
	kept, err := w.s.SavePlan(ctx, w.editor, other.ID, planInput())
	if err != nil {
		t.Fatal(err)
	}
	var ids []int64
	for range store.MaxPlansPerRun + 7 {
		p, err := w.s.SavePlan(ctx, w.editor, r.ID, planInput())
		if err != nil {
			t.Fatal(err)
		}
		ids = append(ids, p.ID)
	}
	ps, err := w.s.ListPlans(ctx, w.viewer, r.ID)
	if err != nil {
		t.Fatal(err)
	}
	if len(ps) != store.MaxPlansPerRun {
		t.Fatalf("the run keeps %d plans, want %d", len(ps), store.MaxPlansPerRun)
	}
	if got, want := ps[0].ID, ids[len(ids)-1]; got != want {
		t.Errorf("newest kept plan %d, want %d", got, want)
	}
	if got, want := ps[len(ps)-1].ID, ids[7]; got != want {
		t.Errorf("oldest kept plan %d, want %d (the first 7 deleted)", got, want)
	}
	_, err = w.s.GetPlan(ctx, w.viewer, ids[0])
	wantCode(t, err, store.ENOTFOUND)
	if _, err := w.s.GetPlan(ctx, w.viewer, kept.ID); err != nil {
		t.Errorf("the other run's plan: %v", err)
	}
}
