package web

import (
	"context"
	"strings"
	"testing"
	"time"

	"phasecast/store"
)

// TestTonightReplan: the Tonight page offers "replan the rest of tonight";
// the replan keeps the exposure recorded tonight, says so, and plans no
// block before now.
func TestTonightReplan(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 3)
	c := h.client("editor")
	_, body := h.get(c, "/tonight")
	if !hasTestID(body, "tonight-replan") || !strings.Contains(body, "Replan the rest of tonight") {
		t.Fatal("Tonight offers no replan")
	}
	mid := testNow.Add(-20 * time.Minute)
	if _, err := h.store.AddObservations(context.Background(), h.actor("editor"), []store.ObservationInput{{TargetID: f.targetIDs[0],
		MidUTC: mid, ExposureS: 120, Status: store.ObsDone, Source: store.ObsFromManual}}); err != nil {
		t.Fatal(err)
	}
	_, body = h.get(c, "/tonight?replan=1")
	src := panel(body, "tonight-source", "</p>")
	if !strings.Contains(src, "Replanned from") || !strings.Contains(src, "1 exposure(s) recorded tonight are kept") {
		t.Errorf("replan source %q", src)
	}
	if !strings.Contains(body, "Replan again from now") {
		t.Error("the replanned page does not offer to replan again")
	}
	n, _, _, err := h.srv.tonightNight(context.Background(), &user{actor: h.actor("editor"), team: store.Membership{TeamID: h.teamID}}, map[string][]string{"replan": {"1"}})
	if err != nil {
		t.Fatal(err)
	}
	if n.plan == nil || !n.replanned {
		t.Fatal("no replanned plan")
	}
	for _, b := range n.plan.Blocks {
		if b.Start.Add(-time.Duration(b.AcquireS * 1e9)).Before(testNow) {
			t.Errorf("block %s at %s starts before now %s", b.Target, b.Start, testNow)
		}
	}
}
