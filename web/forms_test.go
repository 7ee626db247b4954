package web

import (
	"bytes"
	"mime/multipart"
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// validTargetForm is a complete, acceptable target form.
func validTargetForm(list int64) url.Values {
	return url.Values{"list": {i64s(list)}, "version": {"0"}, "name": {"Form target"}, "ra": {"10:00:00"}, "dec": {"-10:00:00"},
		"priority": {"2"}, "t0": {"2460500.12345"}, "t0_standard": {"BJD_TDB"}, "t0_form": {"JD"}, "t0_convention": {"inferior_conjunction"},
		"period_days": {"0.1"}, "goals[0].center": {"0.25"}, "goals[0].phase_halfwidth": {"0.05"}, "goals[0].exposure_s": {"60"},
		"goals[0].overhead_s": {"5"}, "goals[0].n_exposures": {"0"}, "goals[0].min_nights": {"0"}, "goals[0].eclipse_duration_days": {""}}
}

func TestTargetFormRejects(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 1)
	c := h.client("editor")
	tests := []struct {
		name, field, value, errID string
	}{
		{"ErrRA", "ra", "25:00:00", "err-ra"},
		{"ErrDec", "dec", "north", "err-dec"},
		{"ErrPeriodNotNumber", "period_days", "fast", "err-period_days"},
		{"ErrPeriodNotPositive", "period_days", "-1", "err-period_days"},
		{"ErrPriority", "priority", "9", "err-priority"},
		{"ErrT0", "t0", "yesterday", "err-t0"},
		{"ErrGoalPhase", "goals[0].center", "1.5", "err-goals[0].center"},
		{"ErrGoalEvent", "goals[0].center", "full_moon", "err-goals[0].center"},
		{"ErrHalfWidth", "goals[0].phase_halfwidth", "0.7", "err-goals[0].phase_halfwidth"},
		{"ErrExposure", "goals[0].exposure_s", "0", "err-goals[0].exposure_s"},
		{"ErrName", "name", "", "err-name"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			form := validTargetForm(f.listID)
			form.Set(tt.field, tt.value)
			resp, body := h.postBody(c, "/targets", form)
			if resp.StatusCode != http.StatusUnprocessableEntity || !hasTestID(body, tt.errID) {
				t.Errorf("status %d, %s shown %v", resp.StatusCode, tt.errID, hasTestID(body, tt.errID))
			}
			if tt.value != "" && !strings.Contains(body, tt.value) {
				t.Errorf("the typed value %q is not kept in the form", tt.value)
			}
		})
	}
	t.Run("OK", func(t *testing.T) {
		resp := h.post(c, "/targets", validTargetForm(f.listID))
		if resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("status %d, want 303", resp.StatusCode)
		}
	})
	t.Run("ErrStaleVersion", func(t *testing.T) {
		id := f.targetIDs[0]
		_, body := h.get(c, "/targets/"+i64s(id)+"/edit")
		if !strings.Contains(body, `name="version" value="1"`) {
			t.Fatal("edit form lacks version 1")
		}
		form := validTargetForm(f.listID)
		form.Set("version", "1")
		form.Set("name", "First edit")
		if resp := h.post(c, "/targets/"+i64s(id), form); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("first edit = %d", resp.StatusCode)
		}
		form.Set("name", "Second edit on the old version")
		resp, body := h.postBody(c, "/targets/"+i64s(id), form)
		if resp.StatusCode != http.StatusConflict || !hasTestID(body, "conflict") || !strings.Contains(body, "First edit") {
			t.Errorf("stale edit = %d, conflict shown %v", resp.StatusCode, hasTestID(body, "conflict"))
		}
		if !strings.Contains(body, "Second edit on the old version") {
			t.Error("the user's unsaved change is lost")
		}
	})
}

func TestSiteFormRejects(t *testing.T) {
	h := newHarness(t)
	c := h.client("owner")
	base := url.Values{"name": {"S"}, "lat": {"30"}, "lon": {"-110"}, "elev": {"2000"}, "zone": {"America/Phoenix"}, "twilight": {"nautical"},
		"max_airmass": {"2"}, "horizon": {"0 10\n180 5\n"}}
	tests := []struct {
		name, field, value, errID string
	}{
		{"ErrLat", "lat", "95", "err-lat"},
		{"ErrLon", "lon", "east", "err-lon"},
		{"ErrZone", "zone", "Mars/Olympus", "err-zone"},
		{"ErrAirmass", "max_airmass", "0.5", "err-max_airmass"},
		{"ErrHorizon", "horizon", "0 10\n400 5\n", "err-horizon"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			form := url.Values{}
			for k, v := range base {
				form[k] = v
			}
			form.Set(tt.field, tt.value)
			resp, body := h.postBody(c, "/sites", form)
			if resp.StatusCode != http.StatusUnprocessableEntity || !hasTestID(body, tt.errID) {
				t.Errorf("status %d, %s shown %v", resp.StatusCode, tt.errID, hasTestID(body, tt.errID))
			}
		})
	}
	t.Run("Preview", func(t *testing.T) {
		form := url.Values{}
		for k, v := range base {
			form[k] = v
		}
		form.Set("preview", "1")
		resp, body := h.postBody(c, "/sites", form)
		if resp.StatusCode != http.StatusOK || strings.Count(body, `class="f1 vertex"`) != 2 {
			t.Errorf("preview = %d with %d vertices, want 200 with 2", resp.StatusCode, strings.Count(body, `class="f1 vertex"`))
		}
	})
}

func TestNightFormRejects(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 2)
	c := h.client("viewer")
	base := "/night?site=" + i64s(f.siteID) + "&list=" + i64s(f.listID)
	tests := []struct {
		name, query, errID string
	}{
		{"ErrDate", "&date=2026-02-30", "err-date"},
		{"ErrAirmass", "&date=2026-03-14&max_airmass=0.3", "err-max_airmass"},
		{"ErrAirmassText", "&date=2026-03-14&max_airmass=low", "err-max_airmass"},
		{"ErrMoonIllum", "&date=2026-03-14&max_moon_illum=2", "err-max_moon_illum"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			resp, body := h.get(c, base+tt.query)
			if resp.StatusCode != http.StatusUnprocessableEntity || !hasTestID(body, tt.errID) {
				t.Errorf("status %d, %s shown %v", resp.StatusCode, tt.errID, hasTestID(body, tt.errID))
			}
		})
	}
}

func TestImportPreviewAndErrors(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 1)
	c := h.client("editor")
	upload := func(path, content string) (*http.Response, string) {
		var buf bytes.Buffer
		mw := multipart.NewWriter(&buf)
		fw, _ := mw.CreateFormFile("file", "targets.csv")
		fw.Write([]byte(content))
		mw.WriteField("format", "")
		mw.Close()
		return send(t, c, http.MethodPost, h.ts.URL+path, &buf, http.Header{"Content-Type": {mw.FormDataContentType()}, "Sec-Fetch-Site": {"same-origin"}})
	}
	preview := "/lists/" + i64s(f.listID) + "/import/preview"
	good := "name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority\n" +
		"IMP-1,08:00:00,+20:00:00,2460500.1,0.1,0.25;0.75,0.05,60,5,1\n" +
		"IMP-2,09:00:00,+10:00:00,2460500.2,0.2,0.5,0.05,60,5,2\n"
	t.Run("Preview", func(t *testing.T) {
		resp, body := upload(preview, good)
		if resp.StatusCode != http.StatusOK || !hasTestID(body, "import-preview") || !strings.Contains(body, "2 to add") {
			t.Fatalf("preview = %d", resp.StatusCode)
		}
		targets, _ := h.store.ListTargets(t.Context(), h.actor("editor"), f.listID)
		if len(targets) != 1 {
			t.Errorf("the preview wrote: %d targets on the list, want 1", len(targets))
		}
	})
	t.Run("ErrLineNumbers", func(t *testing.T) {
		bad := "name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority\n" +
			"IMP-1,08:00:00,+95:00:00,2460500.1,0.1,0.25,0.05,60,5,1\n" +
			"IMP-2,09:00:00,+10:00:00,2460500.2,-3,0.5,0.05,60,5,2\n"
		resp, body := upload(preview, bad)
		if resp.StatusCode != http.StatusUnprocessableEntity || !hasTestID(body, "import-errors") {
			t.Fatalf("bad file = %d", resp.StatusCode)
		}
		for _, want := range []string{"line 2", "dec", "line 3", "period_days"} {
			if !strings.Contains(body, want) {
				t.Errorf("the errors do not mention %q", want)
			}
		}
	})
	t.Run("Commit", func(t *testing.T) {
		resp := h.post(c, "/lists/"+i64s(f.listID)+"/import", url.Values{"content": {good}, "format": {""}})
		if resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("import = %d", resp.StatusCode)
		}
		targets, _ := h.store.ListTargets(t.Context(), h.actor("editor"), f.listID)
		if len(targets) != 3 {
			t.Errorf("%d targets after the import, want 3", len(targets))
		}
	})
}
