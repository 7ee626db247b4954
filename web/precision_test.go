package web

import (
	"encoding/json"
	"net/http"
	"strings"
	"testing"
)

// TestTargetFormRVGoal saves a target with an RV goal through the form and
// reads it back on the edit page; bad values are refused on their fields
// with the value kept.
func TestTargetFormRVGoal(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 1)
	c := h.client("editor")
	rv := func(model, k, sigma, want string) map[string]string {
		return map[string]string{"rv_model": model, "rv_k_kms": k, "rv_sigma_kms": sigma, "rv_want_rel_k": want}
	}
	for _, tt := range []struct {
		name  string
		set   map[string]string
		errID string
	}{
		{"ErrKZero", rv("circular", "0", "3", ""), "err-rv_k_kms"},
		{"ErrSigmaNegative", rv("eccentric", "40", "-2", ""), "err-rv_sigma_kms"},
		{"ErrWant", rv("circular", "40", "2", "3"), "err-rv_want_rel_k"},
		{"ErrNoModel", rv("", "40", "2", ""), "err-rv_model"},
		{"ErrKNotNumber", rv("circular", "fast", "2", ""), "err-rv_k_kms"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			form := validTargetForm(f.listID)
			for k, v := range tt.set {
				form.Set(k, v)
			}
			resp, body := h.postBody(c, "/targets", form)
			if resp.StatusCode != http.StatusUnprocessableEntity || !hasTestID(body, tt.errID) {
				t.Errorf("status %d, %s shown %v", resp.StatusCode, tt.errID, hasTestID(body, tt.errID))
			}
		})
	}
	form := validTargetForm(f.listID)
	for k, v := range rv("circular", "85", "4.5", "0.03") {
		form.Set(k, v)
	}
	resp := h.post(c, "/targets", form)
	loc := resp.Header.Get("Location")
	if resp.StatusCode != http.StatusSeeOther || !strings.HasPrefix(loc, "/targets/") {
		t.Fatalf("create = %d to %q", resp.StatusCode, loc)
	}
	_, body := h.get(c, strings.SplitN(loc, "?", 2)[0])
	if !strings.Contains(body, "circular, K 85 km/s, σv 4.5 km/s per exposure, wanted σK/K ≤ 3 %") {
		t.Error("the target page does not show the RV goal")
	}
	_, body = h.get(c, strings.SplitN(loc, "?", 2)[0]+"/edit")
	for _, want := range []string{`value="85"`, `value="4.5"`, `value="0.03"`, `<option value="circular" selected>`} {
		if !strings.Contains(body, want) {
			t.Errorf("edit page lacks %s", want)
		}
	}
}

// TestAPITargetRVGoal sends a target with an RV goal through the API, reads
// it back, and has a bad σv refused naming its field.
func TestAPITargetRVGoal(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 1)
	tok := h.token("editor")
	tg := newTarget("RV api")
	tg["rv"] = map[string]any{"model": "eccentric", "k_kms": 42, "sigma_kms": 1.5, "want_rel_k": 0.01}
	code, out := h.apiCall(tok, "POST", "/api/v1/lists/"+i64s(f.listID)+"/targets", tg)
	if code != http.StatusCreated {
		t.Fatalf("create = %d: %v", code, out)
	}
	code, got := h.apiCall(tok, "GET", "/api/v1/targets/"+i64s(int64(out["id"].(float64))), nil)
	rv, _ := got["rv"].(map[string]any)
	if code != http.StatusOK || rv["model"] != "eccentric" || rv["k_kms"] != 42.0 || rv["sigma_kms"] != 1.5 || rv["want_rel_k"] != 0.01 {
		t.Errorf("read back = %d, rv %v", code, got["rv"])
	}
	bad := newTarget("RV bad")
	bad["rv"] = map[string]any{"model": "circular", "k_kms": 42, "sigma_kms": 0}
	code, out = h.apiCall(tok, "POST", "/api/v1/lists/"+i64s(f.listID)+"/targets", bad)
	if code != http.StatusUnprocessableEntity || !strings.Contains(toJSON(t, out), `"field":"rv_sigma_kms"`) {
		t.Errorf("bad σv = %d: %v", code, out)
	}
}

func toJSON(t *testing.T, v any) string {
	t.Helper()
	b, err := json.Marshal(v)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}
