package web

import (
	"encoding/csv"
	"encoding/json"
	"net/http"
	"strings"
	"testing"

	"phasecast/planner/export"
)

// TestNightTelescope: the Night page links the telescope sheet; the page
// has three labelled points per block, and the CSV and JSON downloads are
// the document `plan --sheet` writes, one row per block of /night.json.
func TestNightTelescope(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 3)
	c := h.client("viewer")
	q := "?site=" + i64s(f.siteID) + "&list=" + i64s(f.listID) + "&date=2026-03-14"
	_, night := h.get(c, "/night"+q)
	if !hasTestID(night, "night-telescope") {
		t.Fatal("the Night page does not link the telescope sheet")
	}
	_, js := h.get(c, "/night.json"+q)
	var plan struct {
		Blocks []any `json:"blocks"`
	}
	if err := json.Unmarshal([]byte(js), &plan); err != nil {
		t.Fatal(err)
	}
	if len(plan.Blocks) == 0 {
		t.Fatal("the fixture night has no block")
	}
	resp, body := h.get(c, "/night/telescope"+q)
	if resp.StatusCode != http.StatusOK || strings.Count(body, "<td>start</td>") != len(plan.Blocks) || strings.Count(body, "<td>end</td>") != len(plan.Blocks) {
		t.Fatalf("telescope page = %d, %d start points for %d blocks", resp.StatusCode, strings.Count(body, "<td>start</td>"), len(plan.Blocks))
	}
	resp, js = h.get(c, "/night/telescope.json"+q)
	var doc export.SheetDoc
	if err := json.Unmarshal([]byte(js), &doc); resp.StatusCode != http.StatusOK || err != nil || len(doc.Rows) != len(plan.Blocks) {
		t.Fatalf("telescope.json = %d, %v, %d rows", resp.StatusCode, err, len(doc.Rows))
	}
	_, cs := h.get(c, "/night/telescope.csv"+q)
	recs, err := csv.NewReader(strings.NewReader(cs)).ReadAll()
	if err != nil || len(recs) != len(plan.Blocks)+1 || strings.Join(recs[0], ",") != strings.Join(export.SheetCSVHeader, ",") {
		t.Fatalf("telescope.csv: %v, %d lines", err, len(recs))
	}
}
