package web

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"net/http"
	"strings"
	"testing"

	"phasecast/planner/export/exporttest"
	"phasecast/store"
)

func TestNightExportsParseBack(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 6)
	c := h.client("viewer")
	q := "?site=" + i64s(f.siteID) + "&list=" + i64s(f.listID) + "&date=2026-03-14"
	resp, body := h.get(c, "/night.json"+q)
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("night.json = %d", resp.StatusCode)
	}
	var plan struct {
		Blocks []struct {
			Target string `json:"target"`
			Start  string `json:"start"`
		} `json:"blocks"`
		Unscheduled []any `json:"unscheduled"`
	}
	if err := json.Unmarshal([]byte(body), &plan); err != nil {
		t.Fatalf("night.json does not parse: %v", err)
	}
	if len(plan.Blocks) == 0 {
		t.Fatal("no blocks in the test night; the fixtures should give some")
	}
	t.Run("CSV", func(t *testing.T) {
		resp, body := h.get(c, "/night.csv"+q)
		if cd := resp.Header.Get("Content-Disposition"); !strings.Contains(cd, `filename="test-ridge-2026-03-14-night.csv"`) {
			t.Errorf("Content-Disposition = %q", cd)
		}
		rows, err := csv.NewReader(strings.NewReader(body)).ReadAll()
		if err != nil {
			t.Fatalf("night.csv does not parse: %v", err)
		}
		if len(rows) != len(plan.Blocks)+1 || rows[0][0] != "target" {
			t.Errorf("CSV has %d rows (header %v), want %d blocks + header", len(rows), rows[0], len(plan.Blocks))
		}
		for i, b := range plan.Blocks {
			if rows[i+1][0] != b.Target || rows[i+1][3] != b.Start {
				t.Errorf("row %d = %v, want %s at %s", i+1, rows[i+1][:4], b.Target, b.Start)
			}
		}
	})
	t.Run("ICS", func(t *testing.T) {
		resp, first := h.get(c, "/night.ics"+q)
		if ct := resp.Header.Get("Content-Type"); !strings.HasPrefix(ct, "text/calendar") {
			t.Errorf("Content-Type = %q", ct)
		}
		cal, err := exporttest.ParseICal(strings.NewReader(first))
		if err != nil {
			t.Fatalf("night.ics does not parse: %v", err)
		}
		if len(cal.Events) != len(plan.Blocks) {
			t.Errorf("%d events, want %d", len(cal.Events), len(plan.Blocks))
		}
		_, second := h.get(c, "/night.ics"+q)
		if first != second {
			t.Error("two exports of the same plan differ (UID/DTSTAMP not stable)")
		}
	})
	t.Run("Sheet", func(t *testing.T) {
		resp, body := h.get(c, "/night/sheet"+q)
		if resp.StatusCode != http.StatusOK || !hasTestID(body, "blocks") || !hasTestID(body, "caution") {
			t.Errorf("sheet = %d", resp.StatusCode)
		}
	})
	t.Run("ErrBadDate", func(t *testing.T) {
		resp, _ := h.get(c, "/night.csv?site="+i64s(f.siteID)+"&date=2026-13-40")
		if resp.StatusCode != http.StatusUnprocessableEntity {
			t.Errorf("bad date = %d, want 422", resp.StatusCode)
		}
	})
}

func TestWindowsExportsParseBack(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 2)
	c := h.client("viewer")
	q := "?site=" + i64s(f.siteID) + "&list=" + i64s(f.listID) + "&t=" + i64s(f.targetIDs[1]) + "&from=2026-03-14&to=2026-03-16"
	resp, body := h.get(c, "/windows"+q)
	if resp.StatusCode != http.StatusOK || !hasTestID(body, "windows") {
		t.Fatalf("windows page = %d", resp.StatusCode)
	}
	_, js := h.get(c, "/windows.json"+q)
	var out struct {
		Windows []struct {
			Target string `json:"target"`
			Start  string `json:"start"`
		} `json:"windows"`
	}
	if err := json.Unmarshal([]byte(js), &out); err != nil || len(out.Windows) == 0 {
		t.Fatalf("windows.json: %v, %d windows", err, len(out.Windows))
	}
	_, cs := h.get(c, "/windows.csv"+q)
	rows, err := csv.NewReader(strings.NewReader(cs)).ReadAll()
	if err != nil || len(rows) != len(out.Windows)+1 {
		t.Errorf("windows.csv: %v, %d rows for %d windows", err, len(rows), len(out.Windows))
	}
	_, ics := h.get(c, "/windows.ics"+q)
	cal, err := exporttest.ParseICal(strings.NewReader(ics))
	if err != nil || len(cal.Events) != len(out.Windows) {
		t.Errorf("windows.ics: %v, %d events for %d windows", err, len(cal.Events), len(out.Windows))
	}
	resp, _ = h.get(c, "/windows?site="+i64s(f.siteID)+"&from=2026-03-14&to=2028-03-14")
	if resp.StatusCode != http.StatusUnprocessableEntity {
		t.Errorf("two-year range = %d, want 422", resp.StatusCode)
	}
}

func TestListExportRoundTrip(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 4)
	ctx := context.Background()
	// A name a spreadsheet would run as a formula.
	tg, err := h.store.GetTarget(ctx, h.actor("owner"), f.targetIDs[0])
	if err != nil {
		t.Fatal(err)
	}
	in := store.TargetInput{Target: tg.Target, T0: tg.Ephemeris.T0}
	in.Target.Name = "=HYPERLINK(\"http://x\")"
	if _, err := h.store.UpdateTarget(ctx, h.actor("owner"), tg.ID, tg.Version, in); err != nil {
		t.Fatal(err)
	}
	c := h.client("viewer")
	resp, body := h.get(c, "/lists/"+i64s(f.listID)+"/export.csv")
	if cd := resp.Header.Get("Content-Disposition"); !strings.Contains(cd, "test-list-targets.csv") {
		t.Errorf("Content-Disposition = %q", cd)
	}
	rows, err := csv.NewReader(strings.NewReader(body)).ReadAll()
	if err != nil {
		t.Fatalf("export.csv does not parse: %v", err)
	}
	found := false
	for _, r := range rows {
		for _, cell := range r {
			if strings.HasPrefix(cell, "=") {
				t.Errorf("formula-like cell exported as is: %q", cell)
			}
			found = found || cell == `'=HYPERLINK("http://x")`
		}
	}
	if !found {
		t.Error("the formula-like name is not neutralised with an apostrophe")
	}
	_, js := h.get(c, "/lists/"+i64s(f.listID)+"/export.json")
	var raw bytes.Buffer
	if err := h.store.ExportTargets(ctx, h.actor("viewer"), f.listID, &raw, store.FormatJSON); err != nil {
		t.Fatal(err)
	}
	if js != raw.String() {
		t.Error("the JSON export differs from the store's")
	}
	res, err := h.store.PreviewImport(ctx, h.actor("editor"), f.listID, strings.NewReader(js), store.FormatJSON)
	if err != nil || res.Unchanged != 4 {
		t.Errorf("re-importing the JSON export: %v, %d unchanged of 4", err, res.Unchanged)
	}
}
