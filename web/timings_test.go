package web

import (
	"net/http"
	"net/url"
	"strings"
	"testing"

	"phasecast/ephem"
)

// TestTimingsAndRefinement adds event timings to a target through its page,
// sees the O−C chart and the proposed refinement, adopts it, and finds the
// old ephemeris kept in the history.
func TestTimingsAndRefinement(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 1)
	id := i64s(f.targetIDs[0])
	c := h.client("editor")
	tg, err := h.store.GetTarget(t.Context(), h.actor("editor"), f.targetIDs[0])
	if err != nil {
		t.Fatal(err)
	}
	e := tg.Ephemeris.Ephem
	// Invented timings 30 s late, 1000 and 5000 cycles on: a period a
	// little long.
	for _, cyc := range []int64{1000, 3000, 5000} {
		at := e.TimeAt(cyc, 0).AddSeconds(float64(cyc) * 0.006)
		form := url.Values{"event": {""}, "t": {ephem.FormatEpoch(at, ephem.FormJD, 8)}, "t_standard": {"BJD_TDB"}, "t_form": {"JD"},
			"err_s": {"5"}, "observer": {"test"}}
		if resp := h.post(c, "/targets/"+id+"/timings", form); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("add timing = %d", resp.StatusCode)
		}
	}
	t.Run("ErrBadTiming", func(t *testing.T) {
		form := url.Values{"event": {""}, "t": {"soon"}, "t_standard": {"BJD_TDB"}, "t_form": {"JD"}, "err_s": {"-"}}
		resp, body := h.postBody(c, "/targets/"+id+"/timings", form)
		if resp.StatusCode != http.StatusUnprocessableEntity || !hasTestID(body, "err-t") || !hasTestID(body, "err-err_s") {
			t.Errorf("bad timing = %d, inline errors t %v, err_s %v", resp.StatusCode, hasTestID(body, "err-t"), hasTestID(body, "err-err_s"))
		}
	})
	_, body := h.get(c, "/targets/"+id)
	for _, want := range []string{"oc-chart", "timings", "fit", "refine"} {
		if !hasTestID(body, want) {
			t.Errorf("target page lacks %s", want)
		}
	}
	if !strings.Contains(body, "30.0") {
		t.Error("the O−C column does not show the 30 s residual of the 5000th cycle")
	}
	resp := h.post(c, "/targets/"+id+"/refine", url.Values{"version": {i64s(tg.Version)}})
	if resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("refine = %d", resp.StatusCode)
	}
	hist, err := h.store.ListEphemerides(t.Context(), h.actor("viewer"), f.targetIDs[0])
	if err != nil || len(hist) != 2 || hist[0].Source != "fit" || hist[0].Fit == nil || len(hist[0].Fit.TimingIDs) != 3 {
		t.Fatalf("history after refining: %v, %d records", err, len(hist))
	}
	if d := (hist[0].Ephem.PeriodDays - e.PeriodDays) * 86400; d < 0.005 || d > 0.007 {
		t.Errorf("refined period longer by %.4f s, want 0.006 s", d)
	}
	if resp := h.post(h.client("viewer"), "/targets/"+id+"/refine", url.Values{"version": {"2"}}); resp.StatusCode != http.StatusForbidden {
		t.Errorf("viewer refines = %d, want 403", resp.StatusCode)
	}
}
