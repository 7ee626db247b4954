package web

import (
	"bytes"
	"context"
	"encoding/json"
	"io"
	"net/http"
	"strings"
	"testing"
	"time"
)

// apiCall sends a JSON API request with token and decodes the answer.
func (h *harness) apiCall(token, method, path string, body any) (int, map[string]any) {
	h.t.Helper()
	var rd io.Reader
	if body != nil {
		b, _ := json.Marshal(body)
		rd = bytes.NewReader(b)
	}
	if s, ok := body.(string); ok {
		rd = strings.NewReader(s)
	}
	req, _ := http.NewRequest(method, h.ts.URL+path, rd)
	if token != "" {
		req.Header.Set("Authorization", "Bearer "+token)
	}
	req.Header.Set("Content-Type", "application/json")
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		h.t.Fatal(err)
	}
	defer resp.Body.Close()
	var out map[string]any
	b, _ := io.ReadAll(resp.Body)
	if len(b) > 0 {
		if err := json.Unmarshal(b, &out); err != nil {
			h.t.Fatalf("%s %s: not JSON: %s", method, path, b)
		}
	}
	return resp.StatusCode, out
}

func (h *harness) token(name string) string {
	h.t.Helper()
	_, tok, err := h.store.CreateAPIToken(context.Background(), h.actor(name), "test", time.Hour)
	if err != nil {
		h.t.Fatal(err)
	}
	return tok
}

func newTarget(name string) map[string]any {
	return map[string]any{
		"name": name, "ra_deg": 150.25, "dec_deg": -12.5, "priority": 2,
		"ephemeris": map[string]any{"t0": "2460500.1234567", "t0_standard": "BJD_TDB", "t0_convention": "inferior_conjunction",
			"period_days": 0.0923, "t0_err_days": 1e-5, "period_err_days": 1e-9},
		"goals": []any{map[string]any{"phase": 0.25, "phase_halfwidth": 0.05, "exposure_s": 60, "overhead_s": 5},
			map[string]any{"event": "superior_conjunction", "phase_halfwidth": 0.04, "exposure_s": 60, "overhead_s": 5}},
	}
}

func TestAPI(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 3)
	editor, viewer, outsider := h.token("editor"), h.token("viewer"), h.token("outsider")
	list := "/api/v1/lists/" + i64s(f.listID)

	t.Run("ErrNoToken", func(t *testing.T) {
		if code, body := h.apiCall("", "GET", "/api/v1/lists", nil); code != http.StatusUnauthorized || body["error"] == nil {
			t.Errorf("status %d, body %v; want 401 with an error", code, body)
		}
		if code, _ := h.apiCall("not-a-token", "GET", "/api/v1/lists", nil); code != http.StatusUnauthorized {
			t.Errorf("bad token: status %d, want 401", code)
		}
	})
	t.Run("ReadLists", func(t *testing.T) {
		code, body := h.apiCall(viewer, "GET", "/api/v1/lists", nil)
		if code != http.StatusOK || len(body["lists"].([]any)) != 1 {
			t.Errorf("status %d, body %v", code, body)
		}
		code, body = h.apiCall(viewer, "GET", list+"/targets", nil)
		if code != http.StatusOK || len(body["targets"].([]any)) != 3 {
			t.Errorf("status %d, %d targets", code, len(body["targets"].([]any)))
		}
	})
	t.Run("ErrOtherTeam", func(t *testing.T) {
		if code, _ := h.apiCall(outsider, "GET", list+"/targets", nil); code != http.StatusNotFound {
			t.Errorf("outsider reads the list: %d, want 404", code)
		}
		if code, _ := h.apiCall(outsider, "GET", "/api/v1/targets/"+i64s(f.targetIDs[0]), nil); code != http.StatusNotFound {
			t.Errorf("outsider reads a target: %d, want 404", code)
		}
	})
	t.Run("ErrViewerWrites", func(t *testing.T) {
		if code, _ := h.apiCall(viewer, "POST", list+"/targets", newTarget("V-1")); code != http.StatusForbidden {
			t.Errorf("viewer creates: %d, want 403", code)
		}
	})
	var id, version float64
	t.Run("Create", func(t *testing.T) {
		code, body := h.apiCall(editor, "POST", list+"/targets", newTarget("API-1"))
		if code != http.StatusCreated {
			t.Fatalf("status %d: %v", code, body)
		}
		id, version = body["id"].(float64), body["version"].(float64)
		if e := body["ephemeris"].(map[string]any); e["t0"] != "2460500.1234567" || e["t0_bjd_tdb"] == "" {
			t.Errorf("ephemeris = %v: T0 not kept as written", e)
		}
	})
	t.Run("Update", func(t *testing.T) {
		in := newTarget("API-1 renamed")
		in["version"] = version
		code, body := h.apiCall(editor, "PUT", "/api/v1/targets/"+i64s(int64(id)), in)
		if code != http.StatusOK || body["name"] != "API-1 renamed" || body["version"].(float64) <= version {
			t.Fatalf("status %d: %v", code, body)
		}
	})
	t.Run("ErrStaleVersion", func(t *testing.T) {
		in := newTarget("API-1 again")
		in["version"] = version // the old one
		code, body := h.apiCall(editor, "PUT", "/api/v1/targets/"+i64s(int64(id)), in)
		cur, _ := body["current"].(map[string]any)
		if code != http.StatusConflict || cur == nil || cur["name"] != "API-1 renamed" {
			t.Errorf("status %d, current %v; want 409 with the current target", code, cur)
		}
	})
	t.Run("ErrInvalid", func(t *testing.T) {
		in := newTarget("Bad")
		in["dec_deg"] = 95.0
		code, body := h.apiCall(editor, "POST", list+"/targets", in)
		e, _ := body["error"].(map[string]any)
		if code != http.StatusUnprocessableEntity || e == nil || !strings.Contains(e["message"].(string), "dec") {
			t.Errorf("status %d, body %v; want 422 naming dec", code, body)
		}
	})
	t.Run("ErrUnknownField", func(t *testing.T) {
		in := newTarget("Bad")
		in["colour"] = "blue"
		if code, body := h.apiCall(editor, "POST", list+"/targets", in); code != http.StatusBadRequest {
			t.Errorf("status %d, body %v; want 400", code, body)
		}
	})
	t.Run("ErrMalformed", func(t *testing.T) {
		if code, _ := h.apiCall(editor, "POST", list+"/targets", `{"name": `); code != http.StatusBadRequest {
			t.Errorf("status %d; want 400", code)
		}
	})
	t.Run("Night", func(t *testing.T) {
		code, body := h.apiCall(viewer, "GET", "/api/v1/night?site="+i64s(f.siteID)+"&list="+i64s(f.listID)+"&date=2026-03-14", nil)
		if code != http.StatusOK || body["blocks"] == nil || body["unscheduled"] == nil || body["caution"] == nil {
			t.Errorf("status %d, keys %v", code, keys(body))
		}
	})
	t.Run("Delete", func(t *testing.T) {
		_, body := h.apiCall(editor, "GET", "/api/v1/targets/"+i64s(int64(id)), nil)
		v := int64(body["version"].(float64))
		if code, _ := h.apiCall(editor, "DELETE", "/api/v1/targets/"+i64s(int64(id))+"?version="+i64s(v), nil); code != http.StatusNoContent {
			t.Errorf("delete: %d, want 204", code)
		}
		if code, _ := h.apiCall(editor, "GET", "/api/v1/targets/"+i64s(int64(id)), nil); code != http.StatusNotFound {
			t.Errorf("after delete: %d, want 404", code)
		}
	})
	t.Run("ListUpdate", func(t *testing.T) {
		code, body := h.apiCall(editor, "PUT", list, map[string]any{"name": "Renamed", "version": 1})
		if code != http.StatusOK || body["name"] != "Renamed" {
			t.Fatalf("status %d: %v", code, body)
		}
		if code, _ := h.apiCall(editor, "PUT", list, map[string]any{"name": "Again", "version": 1}); code != http.StatusConflict {
			t.Errorf("stale list update = %d, want 409", code)
		}
	})
	t.Run("ErrNoRoute", func(t *testing.T) {
		if code, body := h.apiCall(editor, "GET", "/api/v1/nothing", nil); code != http.StatusNotFound || body["error"] == nil {
			t.Errorf("status %d, body %v", code, body)
		}
	})
}

func keys(m map[string]any) []string {
	var out []string
	for k := range m {
		out = append(out, k)
	}
	return out
}
